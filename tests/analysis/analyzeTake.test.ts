import { describe, expect, it } from 'vitest';
import { analyzeTake } from '../../src/analysis/analyzeTake.js';
import type { DecodedWav } from '../../src/audio/wavRead.js';
import { UserError } from '../../src/errors.js';
import { expectClose } from '../helpers/expectClose.js';
import { sumOfSines, uniformNoise } from '../dsp/testSignals.js';

const SAMPLE_RATE = 48000;

function take(channels: Float64Array[]): DecodedWav {
  const f32 = channels.map((c) => Float32Array.from(c));
  return { path: 'take.wav', sampleRate: SAMPLE_RATE, channels: f32, format: 'float32', frames: f32[0].length };
}

describe('analyzeTake', () => {
  it('reads the levels of a stereo -20 dBFS 1 kHz sine and detects the tone', () => {
    const amplitude = 10 ** (-20 / 20);
    const sine = sumOfSines(3 * SAMPLE_RATE, SAMPLE_RATE, [{ hz: 1000, amplitude }]);
    const report = analyzeTake(take([sine, sine]));
    expectClose(report.peakDbfs!, -20, { atol: 0.01 });
    // A sine's RMS is its peak / sqrt(2): crest factor 3.01 dB (textbook).
    expectClose(report.rmsDbfs!, -20 - 10 * Math.log10(2), { atol: 0.01 });
    expectClose(report.crestDb!, 10 * Math.log10(2), { atol: 0.02 });
    expectClose(report.truePeakDbfs!, -20, { atol: 0.05 });
    // EBU Tech 3341 scaling: a stereo 1 kHz sine at X dBFS reads X LUFS.
    expectClose(report.lufs!, -20, { atol: 0.1 });
    expect(report.toneSource).toBe('detected');
    expectClose(report.fundamentalHz!, 1000, { atol: 0.01 });
    expect(report.thdPercent!).toBeLessThan(1e-3);
    // Spectrum: strongest point at the tone, within the 1.42 dB Hann scalloping loss (Harris 1978, Table 1).
    const strongest = report.spectrum.reduce((a, b) => (b.db > a.db ? b : a));
    expectClose(strongest.hz, 1000, { atol: 6 });
    expect(strongest.db).toBeLessThanOrEqual(-20 + 0.01);
    expect(strongest.db).toBeGreaterThanOrEqual(-20 - 1.43);
    expect(report.spectrum.length).toBeGreaterThan(100);
    expect(report.spectrum.length).toBeLessThanOrEqual(200);
    for (let i = 1; i < report.spectrum.length; i++) expect(report.spectrum[i].hz).toBeGreaterThan(report.spectrum[i - 1].hz);
  });

  it('says so when --fundamental names a frequency where no tone is, instead of a THD in the thousands of percent', () => {
    const sine = sumOfSines(2 * SAMPLE_RATE, SAMPLE_RATE, [{ hz: 220, amplitude: 0.5 }]);
    const report = analyzeTake(take([sine]), { fundamentalHz: 3100 });
    expect(report.toneSource).toBe('not-found');
    expect(report.toneNote).toMatch(/^No tone near 3100 Hz/);
    expect(report.thdPercent).toBeNull();
    expect(report.fundamentalHz).toBeNull();
    // The tone that is there is still measured when named.
    expectClose(analyzeTake(take([sine]), { fundamentalHz: 220 }).fundamentalHz!, 220, { atol: 0.05 });
  });

  it('reports the harmonics of a distorted tone', () => {
    const x = sumOfSines(2 * SAMPLE_RATE, SAMPLE_RATE, [
      { hz: 440, amplitude: 0.5 },
      { hz: 1320, amplitude: 0.5 * 10 ** (-30 / 20), phase: 1 },
    ]);
    const report = analyzeTake(take([x]));
    expect(report.toneSource).toBe('detected');
    expectClose(report.harmonics.find((h) => h.order === 3)!.dbc, -30, { atol: 0.1 });
    expectClose(report.thdPercent!, 100 * 10 ** (-30 / 20), { rtol: 0.01 });
    expect(Object.keys(report.harmonics[0]).sort()).toEqual(['dbc', 'hz', 'order']);
  });

  it('finds no steady tone in noise, given a fundamental or not', () => {
    const noise = uniformNoise(2 * SAMPLE_RATE, 3).map((v) => 0.1 * v);
    const report = analyzeTake(take([noise]));
    expect(report.toneSource).toBe('none');
    expect(report.fundamentalHz).toBeNull();
    expect(report.thdPercent).toBeNull();
    expect(report.thdnPercent).toBeNull();
    expect(report.harmonics).toEqual([]);
    const given = analyzeTake(take([noise]), { fundamentalHz: 500 });
    expect(given.toneSource).toBe('not-found');
    expect(given.thdPercent).toBeNull();
  });

  it('keeps the JSON finite for digital silence', () => {
    const report = analyzeTake(take([new Float64Array(SAMPLE_RATE)]));
    expect(report.peakDbfs).toBeNull();
    expect(report.rmsDbfs).toBeNull();
    expect(report.truePeakDbfs).toBeNull();
    expect(report.lufs).toBeNull();
    expect(report.crestDb).toBeNull();
    expect(report.toneSource).toBe('none');
    const json = JSON.stringify(report);
    expect(json).not.toMatch(/NaN|Infinity/);
  });

  it('rejects a fundamental at or above Nyquist with a UserError naming the file', () => {
    const x = sumOfSines(SAMPLE_RATE, SAMPLE_RATE, [{ hz: 1000, amplitude: 0.5 }]);
    expect(() => analyzeTake(take([x]), { fundamentalHz: 30000 })).toThrow(UserError);
    expect(() => analyzeTake(take([x]), { fundamentalHz: 30000 })).toThrow(/take\.wav.*30000 Hz/);
  });
});
