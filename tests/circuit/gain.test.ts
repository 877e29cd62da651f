// Tests for src/circuit/gain.ts (non-inverting op-amp stage) and src/circuit/opamp.ts (its limits).
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { createGainStage, designGainStage, gainStageSmallSignal } from '../../src/circuit/gain.js';
import { analogResponse, bilinearTransform, digitalResponse, magnitudeDb } from '../../src/dsp/bilinear.js';
import type { CircuitContext, GainStage } from '../../src/design/types.js';
import { UserError } from '../../src/errors.js';
import { expectClose } from '../helpers/expectClose.js';
import { lambertClipperVolts } from './lambert.js';
import { D1N4148, IDEAL_OPAMP, TL072 } from './parts.js';
import { sine, toneAmplitude } from './signals.js';

const CTX: CircuitContext = { sampleRate: 384000, supplyVolts: 9, temperatureC: 25 };

function gainSpec(overrides: Partial<GainStage<number>> = {}): GainStage<number> {
  return {
    id: 'amp',
    type: 'gain',
    opamp: IDEAL_OPAMP,
    rf: 100e3,
    rg: 4.7e3,
    cg: null,
    cf: null,
    feedbackDiode: null,
    feedbackUp: 0,
    feedbackDown: 0,
    ...overrides,
  };
}

function run(spec: GainStage<number>, input: Float64Array, ctx: CircuitContext = CTX): Float64Array {
  const out = input.slice();
  createGainStage(designGainStage(spec, ctx)).process(out);
  return out;
}

describe('linear gain', () => {
  test('ideal op-amp: gain 1 + Rf/Rg within 0.01 dB at 1 kHz', () => {
    // Non-inverting amplifier gain 1 + Rf/Rg (any op-amp textbook, e.g. Horowitz & Hill, AoE 3rd ed., 4.2.2).
    const input = sine(0.01, 1000, CTX.sampleRate, 384 * 40); // 384 samples per period
    const out = run(gainSpec(), input).subarray(384 * 20);
    const gainDb = 20 * Math.log10(toneAmplitude(out, 1000, CTX.sampleRate) / 0.01);
    expectClose(gainDb, 20 * Math.log10(1 + 100e3 / 4.7e3), { atol: 0.01 });
  });

  test('finite GBW: -3.01 dB at GBW / (1 + Rf/Rg)', () => {
    // Closed-loop bandwidth of a non-inverting stage with A(s) = wt/s is GBW / (1 + Rf/Rg) (single-pole loop, textbook op-amp analysis).
    const spec = gainSpec({ opamp: TL072, rf: 100e3, rg: 1e3 });
    const tf = gainStageSmallSignal(spec, CTX);
    const cornerHz = TL072.gbwHz / 101;
    const dropDb = magnitudeDb(analogResponse(tf, cornerHz)) - magnitudeDb(analogResponse(tf, 100));
    expectClose(dropDb, -3.0103, { atol: 0.01 });
  });

  test('the processor follows the bilinear transform of gainStageSmallSignal', () => {
    const spec = gainSpec({ opamp: TL072, rf: 470e3, rg: 4.7e3, cg: 100e-9, cf: 100e-12 });
    const hz = 6000; // 64 samples per period
    const input = sine(1e-3, hz, CTX.sampleRate, 64 * 400);
    const out = run(spec, input).subarray(64 * 200);
    const predicted = digitalResponse(bilinearTransform(gainStageSmallSignal(spec, CTX), CTX.sampleRate), hz);
    expectClose(toneAmplitude(out, hz, CTX.sampleRate) / 1e-3, Math.hypot(predicted[0], predicted[1]), { rtol: 1e-6 });
  });
});

describe('unity buffer', () => {
  test('rf = 0 with the ideal op-amp returns its input exactly', () => {
    const input = sine(1, 1234, CTX.sampleRate, 2000);
    expect(run(gainSpec({ rf: 0, rg: null }), input)).toEqual(input);
    expect(run(gainSpec({ rf: 0, rg: 10e3 }), input)).toEqual(input);
  });

  test('TL072 buffer: null against the input below -40 dB at 20 kHz', () => {
    // A(s) = wt/s follower: 1 - H = s/(s + wt), |1 - H| ~ f/GBW = -46 dB at 20 kHz (single-pole loop, textbook op-amp analysis).
    const input = sine(1, 20000, CTX.sampleRate, 96 * 100); // 19.2 samples per period: 5 periods in 96
    const out = run(gainSpec({ rf: 0, rg: null, opamp: TL072 }), input);
    const residual = out.map((v, i) => v - input[i]).subarray(96 * 50);
    expect(20 * Math.log10(toneAmplitude(residual, 20000, CTX.sampleRate))).toBeLessThan(-40);
  });
});

describe('op-amp limits', () => {
  test('the rails bound the output: within supply/2 - headroom of the bias point', () => {
    // TL072 swing: 1.5 V short of each rail (TL072 datasheet, +-13.5 V at +-15 V into 10k); single 9 V supply biased at 4.5 V.
    const stage = createGainStage(designGainStage(gainSpec({ opamp: TL072 }), CTX));
    const block = sine(1, 1000, CTX.sampleRate, 3840);
    stage.process(block);
    let peak = 0;
    for (const v of block) {
      expect(v).toBeLessThan(3);
      expect(v).toBeGreaterThan(-3);
      peak = Math.max(peak, Math.abs(v));
    }
    expect(peak).toBeGreaterThan(2.9);
    expect(stage.railSamples).toBeGreaterThan(0);
  });

  test('slew rate: no output step larger than SR / fs', () => {
    // Slew rate bounds |dv/dt| of the output (datasheet definition). A deliberately slow part
    // (0.1 V/us): a TL072's 16 V/us is 41.7 V per sample at 384 kHz and never limits here.
    const slowPart = { ...TL072, gbwHz: Infinity, slewRateVoltsPerSecond: 0.1e6 };
    const input = new Float64Array(400);
    for (let i = 0; i < input.length; i++) input[i] = i % 200 < 100 ? 2 : -2;
    const out = run(gainSpec({ opamp: slowPart, rf: 0, rg: null }), input, { ...CTX, supplyVolts: 18 });
    const maxStep = 0.1e6 / CTX.sampleRate;
    let largest = 0;
    for (let i = 1; i < out.length; i++) largest = Math.max(largest, Math.abs(out[i] - out[i - 1]));
    expectClose(largest, maxStep, { rtol: 1e-9 });
  });

  test('a supply too low for the part is a UserError naming the stage', () => {
    expect(() => designGainStage(gainSpec({ opamp: TL072 }), { ...CTX, supplyVolts: 2.5 })).toThrow(UserError);
    expect(() => designGainStage(gainSpec({ opamp: TL072 }), { ...CTX, supplyVolts: 2.5 })).toThrow(/stage "amp"/);
  });
});

describe('feedback diodes', () => {
  test('without caps the loop matches the Lambert-W closed form: vout = vin + v_f', () => {
    // The feedback node is driven by vin/Rg through Rf || diode: the Norton form of a clipper with
    // source vin Rf/Rg and series resistor Rf (ideal op-amp holds v- = vin).
    const spec = gainSpec({ rf: 100e3, rg: 10e3, feedbackDiode: D1N4148, feedbackUp: 1, feedbackDown: 0 });
    const input = new Float64Array(201);
    for (let i = 0; i < input.length; i++) input[i] = -0.4 + (0.8 * i) / (input.length - 1);
    const out = run(spec, input, { ...CTX, supplyVolts: 30 });
    for (let i = 0; i < input.length; i++) {
      const feedbackVolts = lambertClipperVolts((input[i] * 100e3) / 10e3, 100e3, D1N4148, 1, CTX.temperatureC);
      expectClose(out[i], input[i] + feedbackVolts, { atol: 1e-6 });
    }
  });

  test('clipping in the loop keeps the output above the input (gain stays above unity)', () => {
    // Textbook soft clipping: with diodes across Rf the output stays above unity gain.
    const spec = gainSpec({ rf: 500e3, rg: 4.7e3, cg: 47e-9, cf: 100e-12, feedbackDiode: D1N4148, feedbackUp: 1, feedbackDown: 1 });
    const stage = createGainStage(designGainStage(spec, CTX));
    const input = sine(0.5, 1000, CTX.sampleRate, 384 * 20);
    const out = input.slice();
    stage.process(out);
    const inAmp = toneAmplitude(input.subarray(384 * 10), 1000, CTX.sampleRate);
    const outAmp = toneAmplitude(out.subarray(384 * 10), 1000, CTX.sampleRate);
    expect(outAmp).toBeGreaterThan(inAmp);
    expect(outAmp).toBeLessThan(inAmp + 1); // the diodes hold v_f near one forward drop
    expect(stage.conductingSamples / stage.countedSamples).toBeGreaterThan(0.5);
  });

  test('no NaN or Inf for any finite input (property test, fixed seed)', () => {
    const designs = [
      designGainStage(gainSpec({ opamp: TL072, cg: 47e-9, cf: 100e-12, feedbackDiode: D1N4148, feedbackUp: 1, feedbackDown: 2 }), CTX),
      designGainStage(gainSpec({ opamp: TL072, cg: 47e-9, cf: 100e-12 }), CTX),
    ];
    fc.assert(
      fc.property(fc.array(fc.double({ noNaN: true, noDefaultInfinity: true }), { minLength: 1, maxLength: 64 }), (values) => {
        for (const design of designs) {
          const block = Float64Array.from(values);
          createGainStage(design).process(block);
          for (const v of block) if (!(Number.isFinite(v) && Math.abs(v) < 3)) return false;
        }
        return true;
      }),
      { seed: 20240612, numRuns: 300 },
    );
  });
});
