// Tests for src/circuit/circuitStage.ts: the analog small-signal response of small networks against
// their hand-derived transfer functions, renders at 8 x 48 kHz against that response, and the
// invariants every stage keeps (rest, determinism, finite output, converged solves).
import { describe, expect, test } from 'vitest';
import { circuitStageResponse, createCircuitStage, designCircuitStage } from '../../src/circuit/circuitStage.js';
import type { CircuitStage } from '../../src/design/types.js';
import { expectClose } from '../helpers/expectClose.js';
import { fitSine, makeSine } from '../helpers/sineFit.js';
import { TL072 } from './parts.js';
import {
  RENDER_RATE, TL072_NON_INVERTING, circuitContext, commonEmitterStage, commonSourceStage, followerStage, idealNonInvertingStage,
  lowpassedNoise, opampDiodeStage, tl072NonInvertingStage,
} from '../solver/testCircuits.js';

interface Complex {
  re: number;
  im: number;
}
const c = (re: number, im = 0): Complex => ({ re, im });
const add = (a: Complex, b: Complex): Complex => c(a.re + b.re, a.im + b.im);
const mul = (a: Complex, b: Complex): Complex => c(a.re * b.re - a.im * b.im, a.re * b.im + a.im * b.re);
const div = (a: Complex, b: Complex): Complex => {
  const d = b.re * b.re + b.im * b.im;
  return c((a.re * b.re + a.im * b.im) / d, (a.im * b.re - a.re * b.im) / d);
};
const jw = (hz: number): Complex => c(0, 2 * Math.PI * hz);
const magnitudeDb = (h: Complex): number => 20 * Math.log10(Math.hypot(h.re, h.im));

interface Network {
  name: string;
  stage: CircuitStage;
  /** The hand-derived H(s) at s = j 2 pi hz. */
  h: (hz: number) => Complex;
  /** Input amplitude for the stepped sines, volts. */
  amplitude: number;
}

const R = 10e3;
const C = 10e-9;
const lowpass: Network = {
  name: 'RC low-pass',
  stage: {
    id: 'lp', type: 'circuit', input: 'in', output: 'out',
    elements: [
      { id: 'r1', type: 'resistor', nodes: ['in', 'out'], ohms: R },
      { id: 'c1', type: 'capacitor', nodes: ['out', 'gnd'], farads: C },
    ],
  },
  // H(s) = 1 / (1 + s R C) (voltage divider of R and 1 / sC; any circuits text).
  h: (hz) => div(c(1), add(c(1), mul(jw(hz), c(R * C)))),
  amplitude: 1,
};

const highpass: Network = {
  name: 'RC high-pass',
  stage: {
    id: 'hp', type: 'circuit', input: 'in', output: 'out',
    elements: [
      { id: 'c1', type: 'capacitor', nodes: ['in', 'out'], farads: C },
      { id: 'r1', type: 'resistor', nodes: ['out', 'gnd'], ohms: R },
    ],
  },
  // H(s) = s R C / (1 + s R C).
  h: (hz) => div(mul(jw(hz), c(R * C)), add(c(1), mul(jw(hz), c(R * C)))),
  amplitude: 1,
};

const [R1, R2, RL] = [10e3, 22e3, 47e3];
const loadedDivider: Network = {
  name: 'loaded divider',
  stage: {
    id: 'div', type: 'circuit', input: 'in', output: 'out',
    elements: [
      { id: 'r1', type: 'resistor', nodes: ['in', 'out'], ohms: R1 },
      { id: 'r2', type: 'resistor', nodes: ['out', 'gnd'], ohms: R2 },
      { id: 'rl', type: 'resistor', nodes: ['out', 'gnd'], ohms: RL },
    ],
  },
  // H = (R2 || RL) / (R1 + R2 || RL), flat.
  h: () => {
    const lower = (R2 * RL) / (R2 + RL);
    return c(lower / (R1 + lower));
  },
  amplitude: 1,
};

const [LR1, LC1, LR2, LC2] = [10e3, 10e-9, 22e3, 4.7e-9];
const ladder: Network = {
  name: 'two-section RC ladder',
  stage: {
    id: 'ladder', type: 'circuit', input: 'in', output: 'out',
    elements: [
      { id: 'r1', type: 'resistor', nodes: ['in', 'a'], ohms: LR1 },
      { id: 'c1', type: 'capacitor', nodes: ['a', 'gnd'], farads: LC1 },
      { id: 'r2', type: 'resistor', nodes: ['a', 'out'], ohms: LR2 },
      { id: 'c2', type: 'capacitor', nodes: ['out', 'gnd'], farads: LC2 },
    ],
  },
  // Hand derivation (nodal analysis). Node out: (va - vo) / R2 = s C2 vo, so va = vo (1 + s R2 C2).
  // Node a: (vin - va) / R1 = s C1 va + s C2 vo, so vin = va (1 + s R1 C1) + s R1 C2 vo. Then
  //   H(s) = vo / vin = 1 / (1 + s (R1 C1 + R2 C2 + R1 C2) + s^2 R1 C1 R2 C2).
  h: (hz) => {
    const s = jw(hz);
    const denominator = add(add(c(1), mul(s, c(LR1 * LC1 + LR2 * LC2 + LR1 * LC2))), mul(mul(s, s), c(LR1 * LC1 * LR2 * LC2)));
    return div(c(1), denominator);
  },
  amplitude: 1,
};

const { cinFarads: NCIN, rbOhms: NRB, rfOhms: NRF, rgOhms: NRG } = TL072_NON_INVERTING;
const nonInverting: Network = {
  name: 'TL072 non-inverting amplifier (gain 11)',
  stage: tl072NonInvertingStage(),
  // Input coupling s RB Cin / (1 + s RB Cin) (the op-amp input draws no current), then the
  // single-pole op-amp A(s) = A0 / (1 + s A0 / (2 pi GBW)) in the loop, closed-loop A / (1 + A beta),
  // beta = RG / (RF + RG) (Sedra & Smith, op-amp frequency response; TL072 GBW 4 MHz and A0 200 V/mV
  // from its datasheet, see tests/circuit/parts.ts). vref is an ideal source: signal ground.
  h: (hz) => {
    const s = jw(hz);
    const coupling = div(mul(s, c(NRB * NCIN)), add(c(1), mul(s, c(NRB * NCIN))));
    const a0 = TL072.openLoopGain;
    const a = div(c(a0), add(c(1), mul(s, c(a0 / (2 * Math.PI * TL072.gbwHz)))));
    const beta = NRG / (NRF + NRG);
    return mul(coupling, div(a, add(c(1), mul(a, c(beta)))));
  },
  amplitude: 0.1,
};

const networks = [lowpass, highpass, loadedDivider, ladder, nonInverting];
const ctx = circuitContext();

describe('analog small-signal response against hand-derived H(s)', () => {
  const frequencies = [10, 100, 1000, 1591.5494309189535, 10e3, 100e3, 1e6];
  for (const network of networks) {
    test(`${network.name}: circuitStageResponse equals H(j w)`, () => {
      const response = circuitStageResponse(network.stage, ctx, {}, frequencies);
      frequencies.forEach((hz, k) => {
        const expected = network.h(hz);
        const scale = Math.hypot(expected.re, expected.im);
        expectClose(response[k].re, expected.re, { atol: 1e-9 * scale });
        expectClose(response[k].im, expected.im, { atol: 1e-9 * scale });
      });
    });
  }

  test('RC low-pass and high-pass: -3.01 dB and +-45 degrees at fc = 1 / (2 pi R C)', () => {
    // 20 log10(1 / sqrt 2) = -3.0103 dB at the corner (any circuits text).
    const fc = 1 / (2 * Math.PI * R * C);
    const [low] = circuitStageResponse(lowpass.stage, ctx, {}, [fc]);
    const [high] = circuitStageResponse(highpass.stage, ctx, {}, [fc]);
    expectClose(magnitudeDb(low), -3.0103, { atol: 1e-4 });
    expectClose(magnitudeDb(high), -3.0103, { atol: 1e-4 });
    expectClose(Math.atan2(low.im, low.re), -Math.PI / 4, { atol: 1e-9 });
    expectClose(Math.atan2(high.im, high.re), Math.PI / 4, { atol: 1e-9 });
  });

  test('TL072 non-inverting amplifier: closed-loop bandwidth GBW / (1 + RF / RG)', () => {
    // Single-pole op-amp in a loop of gain beta: the closed-loop pole sits at (GBW / A0)(1 + A0 beta)
    // = GBW beta + GBW / A0, which is GBW / (1 + RF / RG) for large A0 (Sedra & Smith, op-amp
    // frequency response); there the gain is the DC closed-loop gain A0 / (1 + A0 beta) less 3.01 dB.
    // The input coupling's corner (0.16 Hz) is far away at both frequencies checked.
    const beta = NRG / (NRF + NRG);
    const a0 = TL072.openLoopGain;
    const poleHz = TL072.gbwHz * beta + TL072.gbwHz / a0;
    const [low, atPole] = circuitStageResponse(nonInverting.stage, ctx, {}, [100, poleHz]);
    const closedLoopDb = 20 * Math.log10(a0 / (1 + a0 * beta));
    expectClose(magnitudeDb(low), closedLoopDb, { atol: 1e-3 });
    expectClose(magnitudeDb(atPole), closedLoopDb - 3.0103, { atol: 1e-3 });
  });
});

describe('renders at 8 x 48 kHz against the analog response (stepped sines)', () => {
  // Trapezoidal (bilinear) warping at 10 kHz and 384 kHz moves a corner by (w T)^2 / 12 = 0.2 %:
  // far below 0.1 dB. Each tone: 10 ms to settle, then a 20 ms window holding whole cycles.
  const frequencies = [100, 1000, 3000, 10e3];
  const settle = Math.round(0.01 * RENDER_RATE);
  const window = Math.round(0.02 * RENDER_RATE);
  for (const network of networks) {
    test(`${network.name}: within 0.1 dB from 100 Hz to 10 kHz`, () => {
      const design = designCircuitStage(network.stage, ctx, {});
      const analog = circuitStageResponse(network.stage, ctx, {}, frequencies);
      frequencies.forEach((hz, k) => {
        const processor = createCircuitStage(design);
        const block = makeSine(settle + window, hz, RENDER_RATE, network.amplitude);
        processor.process(block);
        const gainDb = 20 * Math.log10(fitSine(block, hz, RENDER_RATE, settle, settle + window).amplitude / network.amplitude);
        expectClose(gainDb, magnitudeDb(analog[k]), { atol: 0.1 });
        expect(processor.fallbackSamples).toBe(0);
      });
    });
  }
});

describe('invariants', () => {
  const stages = [
    ...networks.map((network) => network.stage),
    opampDiodeStage(), commonEmitterStage(), commonSourceStage(), followerStage(), idealNonInvertingStage(),
  ];
  // Normal material: a plucked A2 (110 Hz, harmonics 1..10 at 1 / h, decaying with a 0.3 s time
  // constant) peaking at 0.5 V, a hot pickup's level (common practice: hundreds of millivolts), plus
  // 5 mV RMS of seeded noise low-passed at 10 kHz (two one-pole sections), 0.1 s.
  const material = (): Float64Array => {
    const length = Math.round(0.1 * RENDER_RATE);
    const out = new Float64Array(length);
    for (let n = 0; n < length; n++) {
      const t = n / RENDER_RATE;
      let sum = 0;
      for (let h = 1; h <= 10; h++) sum += Math.sin(2 * Math.PI * 110 * h * t) / h;
      out[n] = sum * Math.exp(-t / 0.3);
    }
    const peak = Math.max(...out.map(Math.abs));
    const noise = lowpassedNoise(length, 10e3, 0.005, 20240611);
    return out.map((x, n) => (0.5 * x) / peak + noise[n]);
  };

  for (const stage of stages) {
    describe(`stage "${stage.id}"`, () => {
      const design = designCircuitStage(stage, ctx, {});

      test('silence stays at rest: every output sample within 1 nV of zero for 0.5 s', () => {
        const processor = createCircuitStage(design);
        const block = new Float64Array(Math.round(0.5 * RENDER_RATE));
        processor.process(block);
        let largest = 0;
        for (const y of block) largest = Math.max(largest, Math.abs(y));
        expect(largest).toBeLessThan(1e-9);
      });

      test('the same input gives bit-identical output, from a new processor and after reset()', () => {
        const input = material();
        const first = Float64Array.from(input);
        const second = Float64Array.from(input);
        const third = Float64Array.from(input);
        const processor = createCircuitStage(design);
        processor.process(first);
        createCircuitStage(design).process(second);
        processor.reset();
        // In two blocks of unequal size: the state carries across process() calls.
        processor.process(third.subarray(0, 1000));
        processor.process(third.subarray(1000));
        expect(second).toEqual(first);
        expect(third).toEqual(first);
      });

      test('normal material: every Newton solve converges (no fallback samples)', () => {
        const processor = createCircuitStage(design);
        processor.process(material());
        expect(processor.fallbackSamples).toBe(0);
      });

      test('a huge finite input (+-1e6 V) gives finite output', () => {
        const processor = createCircuitStage(design);
        const block = makeSine(4000, 1000, RENDER_RATE, 1e6);
        block[100] = 1e6;
        block[101] = -1e6;
        processor.process(block);
        expect(block.every(Number.isFinite)).toBe(true);
      });
    });
  }
});
