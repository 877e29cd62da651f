/**
 * Facts of the RIFF/WAVE container shared by the reader and the writer.
 *
 * Source: Microsoft/IBM, "Multimedia Programming Interface and Data Specifications 1.0" (1991),
 * RIFF and WAVE chapters, and Microsoft's WAVEFORMATEXTENSIBLE note (from memory): a little-endian
 * "RIFF" chunk of form type "WAVE" holding a "fmt " chunk (format tag, channels, sample rate, byte
 * rate, block align, bits per sample) and a "data" chunk of interleaved frames; chunks are padded to
 * an even length.
 */

/** Sample encodings clipbench reads; the writer produces pcm16, pcm24 and float32. */
export type WavSampleFormat = 'pcm8' | 'pcm16' | 'pcm24' | 'pcm32' | 'float32' | 'float64';

export const WAVE_FORMAT_PCM = 0x0001;
export const WAVE_FORMAT_IEEE_FLOAT = 0x0003;
export const WAVE_FORMAT_EXTENSIBLE = 0xfffe;

/**
 * Bytes 2..15 of every KSDATAFORMAT_SUBTYPE GUID as stored in a file (the first two bytes carry the
 * plain format tag): {xxxxxxxx-0000-0010-8000-00AA00389B71}.
 */
export const SUBFORMAT_GUID_TAIL: readonly number[] = [
  0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71,
];

/** Names of common encodings we refuse, so the error says what the file is. */
export const UNSUPPORTED_FORMAT_NAMES: ReadonlyMap<number, string> = new Map([
  [0x0002, 'Microsoft ADPCM'],
  [0x0006, 'A-law'],
  [0x0007, 'mu-law'],
  [0x0011, 'IMA ADPCM'],
  [0x0031, 'GSM 6.10'],
  [0x0050, 'MPEG'],
  [0x0055, 'MPEG Layer 3 (MP3)'],
]);

export const MIN_SAMPLE_RATE_HZ = 44_100;
export const MAX_SAMPLE_RATE_HZ = 192_000;
export const MAX_CHANNELS = 2;

/** Integer PCM full scale is 2^(bits-1): a code c reads as c / 2^(bits-1), so -1 is reachable, +1 is not. */
export function pcmFullScale(bits: number): number {
  return 2 ** (bits - 1);
}

/** Largest finite IEEE 754 binary32 value; 32-bit float samples must stay within it. */
export const FLOAT32_MAX = 3.4028234663852886e38;
