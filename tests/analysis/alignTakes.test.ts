// Aligning a recording to a reference (src/analysis/alignTakes.ts): a known fractional delay and gain
// on a band-limited signal are recovered (cross-correlation peak with parabolic refinement), the
// linear-phase shift is an exact fractional delay for a band-limited signal (sampling theorem: a sine
// shifted by d samples is the sine with phase 2 pi f d / fs), and an unrelated signal is refused.
import { describe, expect, test } from 'vitest';
import { advance, alignRecording } from '../../src/analysis/alignTakes.js';
import { gaussianNoise, sumOfSines } from '../dsp/testSignals.js';
import { expectClose } from '../helpers/expectClose.js';

const RATE = 48000;

function bandLimited(length: number, seed: number): Float64Array {
  // A chord of partials well inside the band: a stand-in for a played take.
  const tones = [110, 165, 220, 330, 440, 660, 880, 1320, 2640].map((hz, i) => ({ hz: hz * (1 + seed * 0.013), amplitude: 1 / (i + 1), phase: i * 0.7 + seed }));
  return sumOfSines(length, RATE, tones);
}

describe('alignRecording', () => {
  test('recovers a delay of 37.3 samples and the sign of the lag, through gain and noise', () => {
    const reference = bandLimited(RATE, 1);
    const noise = gaussianNoise(RATE, 0.01, 5);
    const recording = advance(reference, -37.3).map((x, n) => 0.5 * x + noise[n]);
    const alignment = alignRecording(reference, recording, RATE, 'rec.wav');
    expectClose(alignment.latencySamples, 37.3, { atol: 0.05 });
    expect(alignment.correlation).toBeGreaterThan(0.9);
    const early = alignRecording(reference, advance(reference, 12), RATE, 'rec.wav');
    expectClose(early.latencySamples, -12, { atol: 0.05 });
  });

  test('refuses a recording of another take with one line naming it', () => {
    expect(() => alignRecording(bandLimited(RATE, 1), gaussianNoise(RATE, 1, 9), RATE, 'other.wav')).toThrow(/^other\.wav: does not correlate with the model's render/);
  });
});

describe('advance', () => {
  test('shifts a sine by a fractional number of samples exactly (away from the ends)', () => {
    const hz = 1000;
    const sine = sumOfSines(4096, RATE, [{ hz, amplitude: 1 }]);
    const shifted = advance(sine, 2.25);
    for (let n = 500; n < 3500; n += 97) expectClose(shifted[n], Math.sin((2 * Math.PI * hz * (n + 2.25)) / RATE), { atol: 2e-3 });
  });
});
