/**
 * The audio band every measurement and prediction works in: 20 Hz to 20 kHz (common practice; the
 * band AES17 measurements and IEC 61672-1 weightings are stated over).
 */
export const AUDIO_BAND_LOW_HZ = 20;
export const AUDIO_BAND_HIGH_HZ = 20_000;

/** Nominal midband frequencies of the octave bands in the audio band, 31.5 Hz to 16 kHz (IEC 61260-1). */
export const OCTAVE_BANDS_HZ: readonly number[] = [31.5, 63, 125, 250, 500, 1000, 2000, 4000, 8000, 16000];
