// 16-bit TPDF dither: it linearises the quantiser, so a level below one LSB survives on average
// (Vanderkooy & Lipshitz, "Dither in digital audio", JAES 35(12), 1987; common practice), while
// plain rounding erases it; the dither is seeded, so files stay byte-identical run to run.
import { describe, expect, it } from 'vitest';
import { encodeWav } from '../../src/audio/wavWrite.js';

const LSB = 1 / 32768;
const FRAMES = 48000;

function codes(bytes: Uint8Array): Int16Array {
  return new Int16Array(bytes.buffer.slice(bytes.byteOffset + 44, bytes.byteOffset + 44 + 2 * FRAMES));
}

describe('16-bit TPDF dither', () => {
  const dc = new Float64Array(FRAMES).fill(0.3 * LSB);

  it('keeps a 0.3 LSB level on average, which plain rounding erases', () => {
    const dithered = codes(encodeWav([dc], 48000, '16', true));
    const mean = dithered.reduce((sum, c) => sum + c, 0) / FRAMES;
    // Total error of TPDF + rounding has variance 1/6 + 1/12 LSB^2 (sigma 0.5 LSB): 4 sigma / sqrt(N).
    expect(Math.abs(mean - 0.3)).toBeLessThan((4 * 0.5) / Math.sqrt(FRAMES));
    expect(codes(encodeWav([dc], 48000, '16', false)).every((c) => c === 0)).toBe(true);
  });

  it('stays within 1.5 LSB of the signal and gives the same bytes every time', () => {
    const sine = Float64Array.from({ length: FRAMES }, (_, n) => 0.5 * Math.sin((2 * Math.PI * 440 * n) / 48000));
    const first = encodeWav([sine], 48000, '16', true);
    expect(Buffer.from(encodeWav([sine], 48000, '16', true)).equals(Buffer.from(first))).toBe(true);
    const written = codes(first);
    for (let n = 0; n < FRAMES; n++) expect(Math.abs(written[n] - sine[n] * 32768)).toBeLessThanOrEqual(1.5);
  });
});
