/**
 * The audio band every measurement and prediction works in: 20 Hz to 20 kHz (common practice; the
 * band AES17 measurements and IEC 61672-1 weightings are stated over).
 */
export const AUDIO_BAND_LOW_HZ = 20;
export const AUDIO_BAND_HIGH_HZ = 20_000;
