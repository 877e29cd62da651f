// The README's list of accepted WAV formats matches what the reader accepts (src/audio/wavFormat.ts):
// every sample format, the rate range and the channel limit.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { MAX_CHANNELS, MAX_SAMPLE_RATE_HZ, MIN_SAMPLE_RATE_HZ, type WavSampleFormat } from '../../src/audio/wavFormat.js';

const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8').replace(/\s+/g, ' ');

/** How the README names each format the reader decodes. */
const FORMAT_WORDING: Record<WavSampleFormat, RegExp> = {
  pcm8: /integer PCM of 8 bits/,
  pcm16: /PCM of 8 bits \(offset binary\), 16,/,
  pcm24: /16, 24 or 32 bits/,
  pcm32: /24 or 32 bits/,
  float32: /IEEE float of 32 or 64 bits/,
  float64: /float of 32 or 64 bits/,
};

describe('README', () => {
  it('lists every accepted WAV format, the rate range and the channel limit', () => {
    for (const wording of Object.values(FORMAT_WORDING)) expect(readme).toMatch(wording);
    expect(readme).toContain(`${MIN_SAMPLE_RATE_HZ / 1000} to ${MAX_SAMPLE_RATE_HZ / 1000} kHz`);
    expect(MAX_CHANNELS).toBe(2);
    expect(readme).toContain('mono or stereo');
    expect(readme).toContain('WAVE_FORMAT_EXTENSIBLE');
  });
});
