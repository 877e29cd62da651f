import { describe, expect, it } from 'vitest';
import { applyLoudnessMatch } from '../../src/render/loudnessMatch.js';
import { integratedLoudness } from '../../src/dsp/loudness.js';
import { expectClose } from '../helpers/expectClose.js';

const RATE = 48000;

function sine(seconds: number, hz: number, amplitude: number): Float64Array {
  const out = new Float64Array(Math.round(seconds * RATE));
  for (let n = 0; n < out.length; n++) out[n] = amplitude * Math.sin((2 * Math.PI * hz * n) / RATE);
  return out;
}

function peakDbfs(channel: Float64Array): number {
  let peak = 0;
  for (const x of channel) peak = Math.max(peak, Math.abs(x));
  return 20 * Math.log10(peak);
}

describe('applyLoudnessMatch', () => {
  it('brings a 1 kHz sine to the target: a mono sine reads 3.01 dB below its stereo pair', () => {
    // EBU Tech 3341 case: a 1 kHz stereo sine at -23 dBFS (peak) reads -23.0 LUFS, so one channel
    // alone reads -23 - 10 log10(2) = -26.01 LUFS; a mono sine at -18 LUFS has its peak at -14.99 dBFS.
    const channels = [sine(3, 1000, 0.02)];
    const report = applyLoudnessMatch(channels, RATE, { targetLufs: -18, ceilingDbfs: -1 });
    expect(report.ceilingLimited).toBe(false);
    expectClose(peakDbfs(channels[0]), -18 + 10 * Math.log10(2), { atol: 0.05 });
    expectClose(integratedLoudness(channels, RATE), -18, { atol: 0.05 });
    expectClose(report.loudnessAfterLufs ?? NaN, -18, { atol: 1e-9 });
    expectClose(report.gainDb, -18 - (report.loudnessBeforeLufs ?? NaN), { atol: 1e-9 });
    // A sine's crest factor is sqrt(2): 3.01 dB (textbook).
    expectClose(report.crestDb ?? NaN, 10 * Math.log10(2), { atol: 0.01 });
  });

  it('holds a spiky signal under the ceiling and says so', () => {
    // A quiet sine with a full-scale click: reaching -10 LUFS would put the click far above 0 dBFS.
    const channel = sine(2, 440, 0.01);
    channel[48000] = 0.9;
    const report = applyLoudnessMatch([channel], RATE, { targetLufs: -10, ceilingDbfs: -1 });
    expect(report.ceilingLimited).toBe(true);
    expectClose(peakDbfs(channel), -1, { atol: 1e-9 });
    expectClose(report.peakDbfs ?? NaN, -1, { atol: 1e-9 });
    expect(report.loudnessAfterLufs ?? 0).toBeLessThan(-10 - 0.5);
    expectClose(integratedLoudness([channel], RATE), report.loudnessAfterLufs ?? NaN, { atol: 0.01 });
  });

  it('leaves silence untouched and reports no loudness', () => {
    const channel = new Float64Array(RATE);
    const report = applyLoudnessMatch([channel], RATE, { targetLufs: -18, ceilingDbfs: -1 });
    expect(report).toMatchObject({ loudnessBeforeLufs: null, loudnessAfterLufs: null, gainDb: 0, ceilingLimited: false, peakDbfs: null });
    expect(channel.every((x) => x === 0)).toBe(true);
  });
});
