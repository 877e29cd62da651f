// The DK processor (src/solver/dkProcessor.ts) driven hard: band-limited noise at a hot pickup's
// level into stages with a lot of gain, and absurd inputs. Whatever its Newton solves do, a node
// cannot leave the range the circuit's physics allows: an op-amp output stays between its swing
// limits (the macromodel's rail clamp, assemble.ts; the part's datasheet headroom), a transistor's
// collector between ground and the supply it hangs from.
import { describe, expect, test } from 'vitest';
import { createCircuitStage, designCircuitStage } from '../../src/circuit/circuitStage.js';
import type { CircuitStage, OpampParams } from '../../src/design/types.js';
import { IDEAL_OPAMP, TL072 } from '../circuit/parts.js';
import { makeSine } from '../helpers/sineFit.js';
import {
  FOLLOWER, RENDER_RATE, SUPPLY_VOLTS, circuitContext, commonEmitterStage, commonSourceStage, followerStage, idealNonInvertingStage,
  lowpassedNoise, opampDiodeStage, tl072NonInvertingStage,
} from './testCircuits.js';

/** The output node's voltages (render + rest) for `input`, and the processor's fallback count. */
function renderNodeVolts(stage: CircuitStage, input: Float64Array): { low: number; high: number; fallbackSamples: number } {
  const design = designCircuitStage(stage, circuitContext(), {});
  const processor = createCircuitStage(design);
  const block = Float64Array.from(input);
  processor.process(block);
  const rest = design.operatingPoint.unknowns[design.system.outputIndex];
  let low = Infinity;
  let high = -Infinity;
  for (const y of block) {
    low = Math.min(low, y + rest);
    high = Math.max(high, y + rest);
  }
  return { low, high, fallbackSamples: processor.fallbackSamples };
}

/** Swing limits of an op-amp output on the 9 V supply, widened by `marginVolts` for the clamp's knee. */
function swing(opamp: OpampParams, marginVolts: number): [number, number] {
  return [opamp.headroomLowVolts - marginVolts, SUPPLY_VOLTS - opamp.headroomHighVolts + marginVolts];
}

// 0.1 s of seeded noise low-passed at 20 kHz (the band a 48 kHz take carries), 0.3 V RMS: peaks
// near 1 V, a hot pickup played hard (common practice: pickups give hundreds of millivolts).
const hardNoise = (): Float64Array => lowpassedNoise(Math.round(0.1 * RENDER_RATE), 20e3, 0.3, 1);

describe('hard drive keeps every node in its physical range', () => {
  test('LM358 follower, ten times that noise: between its swing limits, every Newton solve converged', () => {
    // A unity-gain stage needs 3 V RMS to reach its rails.
    const [low, high] = swing(FOLLOWER.opamp, 0.1);
    const result = renderNodeVolts(followerStage(), hardNoise().map((x) => 10 * x));
    expect(result.low).toBeGreaterThan(low);
    expect(result.high).toBeLessThan(high);
    expect(result.fallbackSamples).toBe(0);
  });

  test('2N5457 common-source stage: drain between ground and the supply, every Newton solve converged', () => {
    const result = renderNodeVolts(commonSourceStage(), hardNoise());
    expect(result.low).toBeGreaterThan(-0.5);
    expect(result.high).toBeLessThan(SUPPLY_VOLTS + 0.5);
    expect(result.fallbackSamples).toBe(0);
  });

  // BUG (see the report): at the first sample where the TL072's compensation node is predicted past
  // a rail, the Newton matrix I - F J holds an entry near 1e22 beside entries of order 1 and
  // factorLu calls it singular (its pivot test is relative to the largest entry); the sample falls
  // back to the predictor with a clamp current near 1e16 A, which the state update takes in, and the
  // output runs away to about 1e298 V within a few samples.
  test('TL072 gain-11 stage: between its swing limits (0.1 V margin for the clamp knee)', () => {
    const [low, high] = swing(TL072, 0.1);
    const result = renderNodeVolts(tl072NonInvertingStage(), hardNoise());
    expect(result.low).toBeGreaterThan(low);
    expect(result.high).toBeLessThan(high);
  });

  // BUG (same cause as above; the feedback diodes hold the output near +-2 V once it is solved).
  test('TL072 stage with feedback diodes: between its swing limits', () => {
    const [low, high] = swing(TL072, 0.1);
    const result = renderNodeVolts(opampDiodeStage(), hardNoise());
    expect(result.low).toBeGreaterThan(low);
    expect(result.high).toBeLessThan(high);
  });

  // BUG (see the report): with the 2N3904 driven into saturation, both junctions conduct; the full
  // Newton step overshoots the collector junction's exponential through F (about 1 kohm), the
  // max-norm backtracking accepts only 1/64 steps, and 50 iterations end far from the solution. The
  // unconverged currents enter the state update (the 100 uF bypass cap's history) and the collector
  // swings by thousands of volts.
  test('2N3904 common-emitter stage: collector between ground and the supply', () => {
    const result = renderNodeVolts(commonEmitterStage(), hardNoise());
    expect(result.low).toBeGreaterThan(-0.5);
    expect(result.high).toBeLessThan(SUPPLY_VOLTS + 0.5);
  });
});

describe('absurd input', () => {
  test('LM358 follower, a 1e6 V sine: finite, and between its swing limits', () => {
    const [low, high] = swing(FOLLOWER.opamp, 0.5);
    const result = renderNodeVolts(followerStage(), makeSine(4000, 1000, RENDER_RATE, 1e6));
    expect(result.low).toBeGreaterThan(low);
    expect(result.high).toBeLessThan(high);
  });

  // BUG (see the report): every sample falls back (the absolute 1e-9 V tolerance is below the
  // rounding of port voltages near 1e7 V, and from deep in the clamp's exponential Newton descends
  // one 10 mV knee per iteration), and the output follows the linear gain: +-1.1e7 V.
  test('ideal op-amp stage, a 1e6 V sine: between the supply rails (0.5 V margin)', () => {
    const [low, high] = swing(IDEAL_OPAMP, 0.5);
    const result = renderNodeVolts(idealNonInvertingStage(), makeSine(4000, 1000, RENDER_RATE, 1e6));
    expect(result.low).toBeGreaterThan(low);
    expect(result.high).toBeLessThan(high);
  });
});
