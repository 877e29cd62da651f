// Tests for src/circuit/clipper.ts (shunt diode clipper) and the shared diode node it runs on.
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { clipperSmallSignal, createClipper, designClipper } from '../../src/circuit/clipper.js';
import { thermalVoltage } from '../../src/netlist/thermalVoltage.js';
import { TABLE_TOLERANCE_VOLTS } from '../../src/circuit/diodeNode.js';
import { bilinearTransform, digitalResponse } from '../../src/dsp/bilinear.js';
import type { CircuitContext, ClipperStage, DiodeParams } from '../../src/design/types.js';
import { expectClose } from '../helpers/expectClose.js';
import { D1N34A, D1N4148, RED_LED } from './parts.js';
import { harmonicsDbc, sine, toneAmplitude } from './signals.js';
import { lambertClipperVolts } from './lambert.js';

const CTX: CircuitContext = { sampleRate: 384000, supplyVolts: 9, temperatureC: 25 };

function clipperSpec(overrides: Partial<ClipperStage<number>> = {}): ClipperStage<number> {
  return { id: 'clip', type: 'clipper', series: 2200, cap: 10e-9, diode: D1N4148, downDiode: D1N4148, up: 1, down: 1, ...overrides };
}

function run(spec: ClipperStage<number>, input: Float64Array, ctx: CircuitContext = CTX, solver: 'table' | 'newton' = 'table'): Float64Array {
  const out = input.slice();
  createClipper(designClipper(spec, ctx, { solver })).process(out);
  return out;
}

describe('memoryless clipper', () => {
  const cases: [string, DiodeParams, number][] = [
    ['1N4148', D1N4148, 1],
    ['two 1N4148 in series', D1N4148, 2],
    ['1N34A', D1N34A, 1],
    ['red LED', RED_LED, 1],
  ];
  test.each(cases)('matches the Lambert-W closed form (%s, one polarity)', (_name, diode, count) => {
    const spec = clipperSpec({ cap: null, series: 1000, diode, downDiode: diode, up: count, down: 0 });
    const input = new Float64Array(401);
    for (let i = 0; i < input.length; i++) input[i] = -6 + (12 * i) / (input.length - 1);
    // The model leaves out the ohmic drop of the reverse-biased string; that changes the node by at
    // most R Is (Is Rs / (n Vt)) (1.1 uV for the 1N34A, 1e-13 V for the 1N4148).
    const nVt = diode.ideality * thermalVoltage(CTX.temperatureC);
    const reverseDropVolts = 1000 * diode.saturationCurrent * ((diode.saturationCurrent * diode.seriesResistance) / nVt);
    // Newton converges to 1e-10 V; the table's linear interpolation is allowed its design tolerance,
    // TABLE_TOLERANCE_VOLTS (1 uV, -120 dB re 1 V).
    const tolerance = { newton: 1e-10, table: TABLE_TOLERANCE_VOLTS };
    for (const solver of ['table', 'newton'] as const) {
      const out = run(spec, input, CTX, solver);
      for (let i = 0; i < input.length; i++) {
        const expected = lambertClipperVolts(input[i], 1000, diode, count, CTX.temperatureC);
        expectClose(out[i], expected, { atol: tolerance[solver] + reverseDropVolts });
      }
    }
  });
});

describe('clipper symmetry', () => {
  // Coherent sampling: 375 Hz at 384 kHz is 1024 samples per period.
  const hz = 375;
  const period = 1024;

  test('a symmetric pair gives no even harmonics (below -100 dBc)', () => {
    // An odd nonlinearity driven by a sine has only odd harmonics (half-wave symmetry).
    const input = sine(2, hz, CTX.sampleRate, 12 * period);
    for (const solver of ['table', 'newton'] as const) {
      const out = run(clipperSpec(), input, CTX, solver).subarray(4 * period);
      const levels = harmonicsDbc(out, hz, CTX.sampleRate, 10);
      expect(levels[1]).toBeGreaterThan(-40); // 3rd harmonic clearly present: the pair clips
      for (const h of [2, 4, 6, 8, 10]) expect(levels[h - 2], `H${h}`).toBeLessThan(-100);
    }
  });

  test('an asymmetric network (1 up, 2 down) gives even harmonics', () => {
    const input = sine(2, hz, CTX.sampleRate, 12 * period);
    const out = run(clipperSpec({ up: 1, down: 2 }), input).subarray(4 * period);
    const levels = harmonicsDbc(out, hz, CTX.sampleRate, 4);
    expect(levels[0]).toBeGreaterThan(-40); // H2
  });
});

describe('small-signal model', () => {
  test('a tiny sine follows the bilinear transform of clipperSmallSignal', () => {
    // Trapezoidal rule on a linear ODE = bilinear transform (e.g. Oppenheim & Schafer sec. 7.1.2).
    const spec = clipperSpec({ cap: 100e-9 });
    const hz = 3000; // 128 samples per period at 384 kHz
    const input = sine(1e-4, hz, CTX.sampleRate, 128 * 200);
    const out = run(spec, input).subarray(128 * 100);
    const predicted = digitalResponse(bilinearTransform(clipperSmallSignal(spec, CTX), CTX.sampleRate), hz);
    expectClose(toneAmplitude(out, hz, CTX.sampleRate) / 1e-4, Math.hypot(predicted[0], predicted[1]), { rtol: 1e-5 });
  });
});

describe('robustness', () => {
  test('no NaN or Inf for any finite input (property test, fixed seed)', () => {
    const design = designClipper(clipperSpec(), CTX);
    const memoryless = designClipper(clipperSpec({ cap: null, up: 2, down: 0, downDiode: D1N34A }), CTX);
    fc.assert(
      fc.property(fc.array(fc.double({ noNaN: true, noDefaultInfinity: true }), { minLength: 1, maxLength: 64 }), (values) => {
        for (const d of [design, memoryless]) {
          const block = Float64Array.from(values);
          createClipper(d).process(block);
          for (const v of block) if (!Number.isFinite(v)) return false;
        }
        return true;
      }),
      { seed: 20240611, numRuns: 300 },
    );
  });

  test('the output never exceeds the input magnitude envelope for a passive network', () => {
    // A resistor-diode-capacitor network is passive: the node cannot exceed the largest input.
    const input = sine(5, 1000, CTX.sampleRate, 4000);
    const out = run(clipperSpec(), input);
    for (const v of out) expect(Math.abs(v)).toBeLessThanOrEqual(5);
  });
});

describe('conduction meter', () => {
  test('counts nothing for a tiny signal and most samples for a hard-driven pair', () => {
    const clipper = createClipper(designClipper(clipperSpec(), CTX));
    clipper.process(sine(0.01, 1000, CTX.sampleRate, 3840));
    expect(clipper.conductingSamples).toBe(0);
    expect(clipper.countedSamples).toBe(3840);
    clipper.reset();
    clipper.process(sine(8, 1000, CTX.sampleRate, 3840));
    expect(clipper.conductingSamples / clipper.countedSamples).toBeGreaterThan(0.7);
    expect(clipper.countedSamples).toBe(3840);
  });
});

describe('conduction meter, leaky germanium pair', () => {
  test('a 1N34A pair at rest already shunts signal, but counts as conducting only once it clips', () => {
    // Its zero-bias conductance Is / (n Vt) = 2.6 uA / 41 mV = 63 uS is above a tenth of 1 / 2.2k
    // (45 uS): measured from zero instead of from that rest conductance, every sample would count.
    const germanium = clipperSpec({ diode: D1N34A, downDiode: D1N34A });
    const clipper = createClipper(designClipper(germanium, CTX));
    clipper.process(sine(0.01, 1000, CTX.sampleRate, 3840));
    expect(clipper.conductingSamples).toBe(0);
    clipper.reset();
    clipper.process(sine(3, 1000, CTX.sampleRate, 3840));
    expect(clipper.conductingSamples / clipper.countedSamples).toBeGreaterThan(0.7);
  });
});

describe('any valid design', () => {
  test('finite output, bounded by the input, table agreeing with Newton (property test, fixed seed)', () => {
    // Passivity: a resistor-diode-capacitor node cannot exceed the largest input magnitude.
    const diodeArb = fc.record({
      name: fc.constant('inline'),
      saturationCurrent: fc.double({ min: 1e-18, max: 1e-5, noNaN: true }),
      ideality: fc.double({ min: 0.8, max: 8, noNaN: true }),
      seriesResistance: fc.double({ min: 0, max: 50, noNaN: true }),
      ratedCurrent: fc.constant(0.1),
      source: fc.constant('test'),
    });
    const specArb = fc.record({
      series: fc.double({ min: 10, max: 1e6, noNaN: true }),
      cap: fc.option(fc.double({ min: 1e-12, max: 1e-6, noNaN: true }), { nil: null }),
      diode: diodeArb,
      downDiode: diodeArb,
      up: fc.integer({ min: 0, max: 4 }),
      down: fc.integer({ min: 0, max: 4 }),
      rate: fc.constantFrom(48000, 384000),
      amplitude: fc.double({ min: 1e-3, max: 20, noNaN: true }),
    });
    fc.assert(
      fc.property(specArb, ({ rate, amplitude, ...fields }) => {
        const ctx = { ...CTX, sampleRate: rate };
        const input = sine(amplitude, 997, rate, 2000);
        const viaTable = run(clipperSpec(fields), input, ctx, 'table');
        const viaNewton = run(clipperSpec(fields), input, ctx, 'newton');
        // The trapezoidal rule averages neighbouring input samples, so it may lag the input by a
        // fraction of one sample step: allow one step of the sine beyond its amplitude.
        const bound = amplitude * (1 + (2 * Math.PI * 997) / rate);
        for (let i = 0; i < input.length; i++) {
          if (!Number.isFinite(viaTable[i]) || Math.abs(viaTable[i]) > bound) return false;
          if (Math.abs(viaTable[i] - viaNewton[i]) > 1e-4 * Math.max(1, amplitude)) return false;
        }
        return true;
      }),
      { seed: 20240613, numRuns: 20 },
    );
  });
});
