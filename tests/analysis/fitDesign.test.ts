// Fitting a design to a recording (src/analysis/fitDesign.ts). The recordings are synthesised by an
// independent model, not the renderer: the clipper's ODE, C dv/dt = (vin - v) / R - (i(v) - i(-v)),
// solved by Hairer & Wanner's ODEX (npm `odex`) with the Shockley diode in closed form (Lambert W),
// then delayed by a fractional latency, scaled by an interface gain and given noise. The fit must
// recover R, the latency and the gain; an RC section's R and C (only R C matters, a known
// non-identifiability) must be reported as such; a recording of another take is refused.
import { describe, expect, test } from 'vitest';
import { lambertW0Log } from 'lambert-w-function';
import { advance } from '../../src/analysis/alignTakes.js';
import { fitDesign } from '../../src/analysis/fitDesign.js';
import { buildChain } from '../../src/circuit/chain.js';
import { renderChannel } from '../../src/circuit/renderChannel.js';
import { loadPartsLibrary } from '../../src/design/parts.js';
import { parseDesignText } from '../../src/design/parseDesign.js';
import { resolveDesign } from '../../src/design/resolve.js';
import { gaussianNoise } from '../dsp/testSignals.js';
import { expectClose } from '../helpers/expectClose.js';
import { integrateOnGrid, thermalVolts } from '../solver/odeReference.js';

const RATE = 48000;
const SAMPLES = Math.round(0.4 * RATE);
const parts = loadPartsLibrary();
// 1N4148 as the parts library gives it (Is, n, Rs); Vt = kT/q at 25 C (odeReference.ts).
const [IS, N, RS] = [2.52e-9, 1.752, 0.568];
const NVT = N * thermalVolts(25);
const PARTIALS = [
  { hz: 196, volts: 1.2 },
  { hz: 294, volts: 0.6 },
  { hz: 392, volts: 0.4 },
  { hz: 1175, volts: 0.15 },
];

const vin = (t: number): number => Math.exp(-2 * t) * PARTIALS.reduce((sum, p, k) => sum + p.volts * Math.sin(2 * Math.PI * p.hz * t + k), 0);

/** Diode current at v, Shockley with series resistance via Lambert W (exact). */
function diode(v: number): number {
  return (NVT / RS) * lambertW0Log(Math.log((IS * RS) / NVT) + (v + IS * RS) / NVT) - IS;
}

/** Oversampling of the synthetic recording before its anti-aliasing decimation (as an interface records). */
const RECORD_FACTOR = 8;
const FIR_HALF = 192;

/**
 * Decimation by RECORD_FACTOR with a windowed-sinc low-pass (Blackman window, cutoff 20 kHz; e.g. Smith,
 * The Scientist and Engineer's Guide to DSP, ch. 16), its delay removed: what an interface's
 * anti-aliasing filter does to the clipper's harmonics above the band.
 */
function decimate(high: Float64Array): Float64Array {
  const fc = 20000 / (RATE * RECORD_FACTOR);
  const taps = Array.from({ length: 2 * FIR_HALF + 1 }, (_, k) => {
    const m = k - FIR_HALF;
    const sinc = m === 0 ? 2 * fc : Math.sin(2 * Math.PI * fc * m) / (Math.PI * m);
    const w = 0.42 - 0.5 * Math.cos((2 * Math.PI * k) / (2 * FIR_HALF)) + 0.08 * Math.cos((4 * Math.PI * k) / (2 * FIR_HALF));
    return sinc * w;
  });
  const gain = taps.reduce((sum, t) => sum + t, 0);
  const out = new Float64Array(SAMPLES);
  for (let n = 0; n < SAMPLES; n++) {
    let sum = 0;
    for (let k = 0; k < taps.length; k++) {
      const i = n * RECORD_FACTOR + k - FIR_HALF;
      if (i >= 0 && i < high.length) sum += taps[k] * high[i];
    }
    out[n] = sum / gain;
  }
  return out;
}

/** The analog clipper's output, solved by ODEX at RECORD_FACTOR x the rate and decimated. */
function clipperRecording(seriesOhms: number, capFarads: number): Float64Array {
  const highRate = RATE * RECORD_FACTOR;
  const derivative = (t: number, y: number[]): number[] => [((vin(t) - y[0]) / seriesOhms - (diode(y[0]) - diode(-y[0]))) / capFarads];
  return decimate(integrateOnGrid(derivative, [0], highRate, SAMPLES * RECORD_FACTOR, (_t, y) => y[0], 1 / highRate, 1e-10));
}

const dry = Float64Array.from({ length: SAMPLES }, (_, n) => vin(n / RATE));
const clipperDesign = JSON.stringify({ name: 'clip', supply: 9, stages: [{ id: 'clip', type: 'clipper', series: '2k2', cap: '10n', diode: '1n4148' }] });

describe('fit', () => {
  test('recovers the series resistor, a fractional latency and the interface gain from an ODE-made recording with noise', () => {
    const clean = clipperRecording(3300, 10e-9);
    const noise = gaussianNoise(SAMPLES, 1e-4, 3); // about -70 dB re the recording
    const wet = advance(clean, -12.3).map((x, n) => 0.7 * x + noise[n]);
    const report = fitDesign({ designText: clipperDesign, designFile: 'clip.json', parts, overrides: [], free: ['clip.series'], dry, wet, sampleRate: RATE, wetName: 'wet.wav', oversample: 8 });
    const fitted = report.fitted[0];
    expectClose(fitted.value, 3300, { rtol: 0.01 });
    expect(fitted.identifiable).toBe(true);
    expectClose(report.latencySamples, 12.3, { atol: 0.05 });
    expectClose(report.gainDb, 20 * Math.log10(0.7), { atol: 0.05 });
    expect(report.esrAfterPercent).toBeLessThan(report.esrBeforePercent / 10);
    expect(report.overrides).toEqual([`clip.series=${fitted.value}`]);
  });

  test("an RC section's R and C are reported as not identifiable (only R C shapes its response)", () => {
    const design = JSON.stringify({ name: 'rc', supply: 9, stages: [{ id: 'lp', type: 'lowpass', r: '10k', c: '10n' }] });
    // The analog RC low-pass of R C = 150 us, by ODEX: C dv/dt = (vin - v) / R.
    const wet = integrateOnGrid((t, y) => [(vin(t) - y[0]) / 150e-6], [0], RATE, SAMPLES, (_t, y) => y[0], 1 / RATE, 1e-10);
    const report = fitDesign({ designText: design, designFile: 'rc.json', parts, overrides: [], free: ['lp.r', 'lp.c'], dry, wet, sampleRate: RATE, wetName: 'wet.wav', oversample: 1, latencySamples: 0, gainDb: 0 });
    expect(report.fitted.map((f) => f.identifiable)).toEqual([false, false]);
    expect(report.fitted.map((f) => f.uncertainty)).toEqual([null, null]);
  });

  test('fits a named part\'s diode parameter, starting from the library values (the recording made by the renderer: this tests the key, the accuracy is tested above)', () => {
    const inline = JSON.stringify({ name: 'clip', supply: 9, stages: [{ id: 'clip', type: 'clipper', series: '2k2', cap: '10n', diode: { saturationCurrent: IS, ideality: 2.0, seriesResistance: RS } }] });
    const design = resolveDesign(parseDesignText(inline, 'inline.json', parts));
    const wet = renderChannel(buildChain(design, { sampleRate: RATE, oversample: 2 }), dry);
    const report = fitDesign({ designText: clipperDesign, designFile: 'clip.json', parts, overrides: [], free: ['clip.diode.ideality'], dry, wet, sampleRate: RATE, wetName: 'wet.wav', oversample: 2, latencySamples: 0, gainDb: 0 });
    expect(report.fitted[0].initial).toBe(N); // the 1N4148's ideality in the parts library
    expectClose(report.fitted[0].value, 2.0, { rtol: 1e-3 });
    expect(report.overrides).toEqual([`clip.diode=${JSON.stringify({ saturationCurrent: IS, ideality: report.fitted[0].value, seriesResistance: RS })}`]);
  });

  test('a recording of another take is refused with one line', () => {
    expect(() =>
      fitDesign({ designText: clipperDesign, designFile: 'clip.json', parts, overrides: [], free: ['clip.series'], dry, wet: gaussianNoise(SAMPLES, 0.3, 8), sampleRate: RATE, wetName: 'other.wav', oversample: 2 }),
    ).toThrow(/^other\.wav: does not correlate with the model's render/);
  });
});
