import { describe, expect, it } from 'vitest';
import type { Design, Stage } from '../../src/design/types.js';
import { buildChain } from '../../src/circuit/chain.js';
import { coherentBin, createToneAnalyzer } from '../../src/analysis/coherentTone.js';
import { findOnset } from '../../src/analysis/levelSweep.js';
import { measureResponse, predictResponse, responseFrequencies, unwrapPhase } from '../../src/analysis/response.js';
import { staticTransferCurve } from '../../src/analysis/transferCurve.js';
import { measureAliasing } from '../../src/analysis/aliasing.js';
import { settleSeconds } from '../../src/analysis/toneRun.js';
import { measureDesign, DEFAULT_MEASURE_OPTIONS } from '../../src/analysis/measureDesign.js';
import { expectClose } from '../helpers/expectClose.js';
import { lambertClipperVolts } from '../circuit/lambert.js';
import { D1N4148, IDEAL_OPAMP, TL072 } from '../circuit/parts.js';

const RATE = 48000;

function design(stages: Stage<number>[], knobs: Record<string, number> = {}): Design<number> {
  return { name: 'test', supplyVolts: 9, temperatureC: 25, knobs, stages };
}

const driveChain: Stage<number>[] = [
  { id: 'in', type: 'input', series: 1000, coupling: 100e-9, pulldown: 1e6 },
  { id: 'amp', type: 'gain', opamp: TL072, rf: 47000, rg: 4700, cg: 47e-9, cf: 100e-12, feedbackDiode: null, feedbackUp: 0, feedbackDown: 0 },
  { id: 'clip', type: 'clipper', series: 2200, cap: 10e-9, diode: D1N4148, downDiode: D1N4148, up: 1, down: 1 },
  { id: 'tone', type: 'tone', r: 6000, cap: 22e-9 },
];

describe('coherent tone analysis', () => {
  it('reads back harmonics placed at known levels exactly (coherent sampling, rectangular window)', () => {
    const n = 4096;
    const k0 = 37;
    const levels = [1, 0.1, 0.01, 0.001]; // fundamental, -20, -40, -60 dBc
    const signal = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      levels.forEach((a, h) => (signal[i] += a * Math.sin((2 * Math.PI * (h + 1) * k0 * i) / n + h)));
    }
    const result = createToneAnalyzer(n, RATE).analyze(signal, k0);
    expectClose(result.fundamentalVolts, 1, { rtol: 1e-9 });
    expectClose(result.harmonics[0].dbc!, -20, { atol: 1e-6 });
    expectClose(result.harmonics[1].dbc!, -40, { atol: 1e-6 });
    expectClose(result.harmonics[2].dbc!, -60, { atol: 1e-6 });
    // THD = sqrt(0.1^2 + 0.01^2 + 0.001^2) (definition, IEC 60268-3).
    expectClose(result.thdPercent!, 100 * Math.hypot(0.1, 0.01, 0.001), { rtol: 1e-9 });
  });

  it('finds an ideal square wave THD of sqrt(pi^2/8 - 1) = 48.34 % (Fourier series, odd harmonics 1/k)', () => {
    const n = 65536;
    const k0 = 16; // harmonics up to Nyquist: odd k <= 2047 (band-limited synthesis)
    const signal = new Float64Array(n);
    for (let k = 1; k * k0 < n / 2; k += 2) {
      for (let i = 0; i < n; i++) signal[i] += Math.sin((2 * Math.PI * k * k0 * i) / n) / k;
    }
    const result = createToneAnalyzer(n, n).analyze(signal, k0, n / 2);
    // The truncated series lacks the energy above Nyquist: sum over odd k > 2047 of 1/k^2 ~ 1/4094.
    const missing = 1 / (2 * 2047);
    expectClose(result.thdPercent!, 100 * Math.sqrt(Math.PI ** 2 / 8 - 1 - missing), { rtol: 1e-6 });
    expectClose(100 * Math.sqrt(Math.PI ** 2 / 8 - 1), 48.34, { atol: 0.005 });
    expect(result.evenShare).toBeLessThan(1e-20);
  });
});

describe('onset interpolation', () => {
  it('interpolates the threshold crossing on log-log axes', () => {
    // THD = 0.5 % at 10 mV, 2 % at 40 mV: a straight line of slope 1 on log-log axes, so 1 %
    // is reached at exactly 20 mV (geometric mean).
    const points = [
      { volts: 0.01, thdPercent: 0.5, outputPeakVolts: 0 },
      { volts: 0.04, thdPercent: 2, outputPeakVolts: 0 },
    ];
    expectClose(findOnset(points, 1) ?? NaN, 0.02, { rtol: 1e-12 });
    expect(findOnset(points, 10)).toBeNull();
  });
});

describe('frequency response', () => {
  it('predicts an RC low-pass like the textbook formula 1/sqrt(1 + (f/fc)^2)', () => {
    const r = 10000;
    const c = 10e-9;
    const fc = 1 / (2 * Math.PI * r * c);
    const points = predictResponse(design([{ id: 'lp', type: 'lowpass', r, c }]), 96000, 8, [100, fc, 5000]);
    for (const point of points) {
      // Textbook first-order RC low-pass; the bilinear transform is pre-warped at fc, where it is exact.
      const expected = -10 * Math.log10(1 + (point.hz / fc) ** 2);
      // Elsewhere frequency warping leaves a small error (0.06 dB at 5 kHz with 96 kHz sampling).
      expectClose(point.db!, expected, { atol: point.hz === fc ? 1e-9 : 0.1 });
    }
  });

  it('measures the same small-signal response through the full model as it predicts (within 0.1 dB)', () => {
    const d = design(driveChain);
    const chain = buildChain(d, { sampleRate: RATE, oversample: 4 });
    const frequencies = responseFrequencies(RATE, 16384, 12);
    const predicted = predictResponse(d, RATE, 4, frequencies);
    const measured = measureResponse(chain, { sampleRate: RATE, windowLength: 16384, amplitudeVolts: 0.001, settleSeconds: settleSeconds(d, RATE) }, frequencies);
    predicted.forEach((p, i) => {
      expectClose(measured[i].db!, p.db!, { atol: 0.1 });
      expectClose(measured[i].deg, p.deg, { atol: 1 });
    });
  });
});

describe('static transfer curve', () => {
  it('follows the memoryless clipper closed form (Lambert W) for a plain diode clipper', () => {
    const d = design([{ id: 'clip', type: 'clipper', series: 1000, cap: 47e-9, diode: D1N4148, downDiode: D1N4148, up: 1, down: 1 }]);
    const curve = staticTransferCurve(d, 3, 61);
    for (const { vin, vout } of curve) {
      // Memoryless shunt clipper with one diode each way; the reverse diode's leakage is negligible.
      const expected = Math.sign(vin) * lambertClipperVolts(Math.abs(vin), 1000, D1N4148, 1, 25);
      expectClose(vout, expected, { atol: 1e-5 }); // 10 uV: the fast solver's table error bound
    }
  });

  it('is the mid-band gain 1 + Rf/Rg below the rails and bounded by them above', () => {
    const d = design([{ id: 'amp', type: 'gain', opamp: IDEAL_OPAMP, rf: 90000, rg: 10000, cg: 1e-6, cf: 100e-12, feedbackDiode: null, feedbackUp: 0, feedbackDown: 0 }]);
    const curve = staticTransferCurve(d, 2, 41);
    for (const { vin, vout } of curve) {
      expect(Math.abs(vout)).toBeLessThanOrEqual(4.5 + 1e-9); // ideal part: rails at the supply, +-4.5 V around bias
      if (Math.abs(vin) < 0.3) expectClose(vout, 10 * vin, { rtol: 1e-3, atol: 1e-9 }); // non-inverting gain 1 + Rf/Rg
    }
  });
});

describe('transfer curve sampling', () => {
  it('samples the knee of a high-gain stage densely: points all along its bend, not one step across it', () => {
    // Ideal non-inverting gain 1 + 999k/1k = 1000 into the rails (+-4.5 V round the bias): the output
    // leaves the linear law within +-4.5 mV of input, 1/444 of a 2 V sweep, which an even grid of 201
    // levels (20 mV apart) steps straight over.
    const d = design([{ id: 'amp', type: 'gain', opamp: IDEAL_OPAMP, rf: 999000, rg: 1000, cg: null, cf: null, feedbackDiode: null, feedbackUp: 0, feedbackDown: 0 }]);
    const curve = staticTransferCurve(d, 2, 201);
    const inBend = curve.filter(({ vout }) => Math.abs(vout) > 0.45 && Math.abs(vout) < 4.4);
    expect(inBend.length).toBeGreaterThanOrEqual(10);
    for (const { vin, vout } of curve) if (Math.abs(vin) < 4e-3) expectClose(vout, 1000 * vin, { rtol: 1e-3, atol: 1e-6 });
    const levels = curve.map((p) => p.vin);
    expect(levels[0]).toBe(-2);
    expect(levels[levels.length - 1]).toBe(2);
    for (let i = 1; i < levels.length; i++) expect(levels[i]).toBeGreaterThan(levels[i - 1]);
  });
});

describe('aliasing', () => {
  it('falls as the oversampling factor rises', () => {
    const d = design(driveChain);
    const options = { sampleRate: RATE, windowLength: 16384, fundamentalBin: coherentBin(4500, RATE, 16384), amplitudeVolts: 1, settleSeconds: 0.05 };
    const at1 = measureAliasing(d, 1, options).aliasDbc;
    const at8 = measureAliasing(d, 8, options).aliasDbc;
    expect(at1).toBeGreaterThan(-60);
    expect(at8).toBeLessThan(at1! - 20);
  });
});

describe('measureDesign', () => {
  it('reports no distortion and 0 dB through a unity buffer, and every key the issue names', () => {
    const d = design([{ id: 'buf', type: 'gain', opamp: IDEAL_OPAMP, rf: 0, rg: null, cg: null, cf: null, feedbackDiode: null, feedbackUp: 0, feedbackDown: 0 }]);
    const report = measureDesign(d, { ...DEFAULT_MEASURE_OPTIONS, oversample: 2 });
    for (const key of ['thdPercent', 'thdnPercent', 'harmonics', 'thdByLevel', 'onset', 'response', 'responseMeasured', 'transfer', 'aliasDbc', 'gainDb', 'maxOutputVolts']) {
      expect(report).toHaveProperty(key);
    }
    expect(report.thdPercent).toBeLessThan(1e-3);
    expectClose(report.gainDb!, 0, { atol: 0.01 });
    expect(report.onset['1']).toBeNull();
    expect(report.responseDisagreement).toEqual([]);
    // 2 V peak at the top of the sweep passes unchanged (the ideal part swings to +-4.5 V), up to the
    // resampling filters' passband ripple (0.01 dB = 0.12 %) and the fade-in.
    expectClose(report.maxOutputVolts, 2, { rtol: 5e-3 });
  });
});

describe('phase unwrapping', () => {
  it('a fourth-order RC low-pass turns through -360 degrees without folding back to +180', () => {
    // Four isolated RC sections at 1 kHz: each adds -atan(f / fc) (first-order low-pass phase, e.g.
    // Sedra & Smith ch. 1), so the total runs continuously from near 0 to about -4 x 87 degrees by 20 kHz.
    const sections: Stage<number>[] = [1, 2, 3, 4].map((k) => ({ id: `lp${k}`, type: 'lowpass', r: 1000, c: 1 / (2 * Math.PI * 1000 * 1000) }));
    const frequencies = [20, 100, 500, 1000, 2000, 5000, 10000, 20000];
    const wrapped = predictResponse(design(sections), RATE, 1, frequencies);
    const continuous = unwrapPhase(wrapped);
    expect(wrapped.some((p) => p.deg > 0)).toBe(true); // folded: the reason to unwrap
    continuous.forEach((p, i) => {
      const analog = -4 * (Math.atan(p.hz / 1000) * 180) / Math.PI;
      // The sections are bilinear-discretised at 48 kHz, pre-warped at 1 kHz: close to the analog phase in the audio band.
      expectClose(p.deg, analog, { atol: 25 });
      if (i > 0) expect(p.deg).toBeLessThan(continuous[i - 1].deg);
    });
    // A measurement a hair across +-180 from its prediction stays on the prediction's branch.
    const measured = continuous.map((p) => ({ ...p, deg: ((p.deg + 0.5 + 540) % 360) - 180 }));
    unwrapPhase(measured, continuous).forEach((p, i) => expectClose(p.deg, continuous[i].deg + 0.5, { atol: 1e-9 }));
  });
});
