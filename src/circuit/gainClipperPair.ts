/**
 * A gain stage without feedback diodes directly followed by a clipper, run in one loop.
 *
 * Each of the two stages is a loop-carried recurrence whose speed is set by the latency of its chain
 * (op-amp: y_n from y_{n-1}, opamp.ts; clipper: table coordinate x_{n+1} from x_n, diodeNode.ts).
 * Run one after the other, each pass waits on its own chain; in one loop the two chains are
 * independent, so the processor overlaps them. The clipper's step for sample n needs the drive of
 * sample n + 1, so the op-amp runs one sample ahead: iteration i computes the op-amp output i + 1,
 * then the clipper's sample i.
 *
 * The arithmetic is that of `OpampStage.process` followed by `DiodeNode.process`, operation for
 * operation (the output is bit-identical, which the tests check), on the same objects' state, so the
 * two stages' own processors (`gainStage`, `clipperStage`) stay valid views of the pair: running
 * them one after the other equals running the pair, and their meters are the pair's. The loop body
 * is written out rather than calling step functions: the op-amp step carries five state values
 * through each sample, which a function can only hand back through memory, putting a store and a
 * load on the loop's chain.
 */
import type { ClipperDesign } from './clipper.js';
import type { ConductionMeter } from '../dsp/conduction.js';
import { DiodeNode } from './diodeNode.js';
import type { GainStageDesign } from './gain.js';
import { limitInputVolts, MAX_INPUT_VOLTS } from './inputLimit.js';
import { OpampStage, type RailMeter } from './opamp.js';
import type { Processor } from '../dsp/processor.js';

export interface GainClipperPair extends Processor, RailMeter, ConductionMeter {
  /** The gain stage alone (its rails are the pair's). */
  readonly gainStage: Processor & RailMeter;
  /** The clipper alone (its conduction is the pair's). */
  readonly clipperStage: Processor & ConductionMeter;
}

/**
 * True when the gain stage can be fused with a following clipper: no feedback diodes, and an output
 * swing inside the clipper's input limit (always, for a supply the design parser accepts).
 */
export function canPairWithClipper(gain: GainStageDesign): boolean {
  return gain.feedback === null && gain.output.upperVolts <= MAX_INPUT_VOLTS && gain.output.lowerVolts <= MAX_INPUT_VOLTS;
}

export function createGainClipperPair(gain: GainStageDesign, clipper: ClipperDesign): GainClipperPair {
  if (!canPairWithClipper(gain)) throw new RangeError(`stage "${gain.stageId}" has feedback diodes or a swing beyond the input limit: no gain-clipper pair`);
  const opamp = new OpampStage(gain.response, gain.output);
  const node = new DiodeNode(clipper.node, clipper.solver);
  const seriesSiemens = 1 / clipper.seriesOhms;
  // Read from a Float64Array, the kernel gets these as plain doubles (object fields came in boxed
  // and were unboxed on every pass).
  const nodeConstants = Float64Array.of(
    node.intervals,
    node.stateGain,
    seriesSiemens / node.step,
    (-2 * node.pMin) / node.step,
    node.upVolts,
    node.downVolts,
  );
  // One sample of the op-amp, run by `opamp.process` itself, starts each block.
  const first = new Float64Array(1);

  const gainStage: Processor & RailMeter = {
    latencySamples: 0,
    get railSamples(): number {
      return opamp.railSamples;
    },
    reset: () => opamp.reset(),
    process: (block) => opamp.process(block),
  };
  const clipperStage: Processor & ConductionMeter = {
    latencySamples: 0,
    get conductingSamples(): number {
      return node.conductingSamples;
    },
    get countedSamples(): number {
      return node.countedSamples;
    },
    reset: () => node.reset(),
    process: (block) => node.process(block, seriesSiemens),
  };

  function process(block: Float64Array): void {
    const n = block.length;
    if (n === 0) return;
    // Op-amp constants and state (as in OpampStage.process).
    const { upperVolts, lowerVolts, upperKneeVolts, lowerKneeVolts, maxStepVolts } = opamp.limits;
    const { upperJoint, lowerJoint, jointCentre, jointHalfWidth, upperKneeSquared, lowerKneeSquared } = opamp.limits;
    const b = opamp.b;
    const a = opamp.a;
    const b0 = b[0];
    const b1 = b[1];
    const b2 = b[2];
    const b3 = b[3];
    const a1 = a[1];
    const a2 = a[2];
    const a3 = a[3];
    // Diode-node constants (as in DiodeNode.process).
    const c = node.coefficients;
    const intervals = nodeConstants[0];
    const stateGain = nodeConstants[1];
    const invStep = nodeConstants[2];
    const twiceOrigin = nodeConstants[3];
    const upVolts = nodeConstants[4];
    const downVolts = nodeConstants[5];

    first[0] = block[0];
    opamp.process(first);
    const state = opamp.state;
    let u = state[0];
    let s1 = state[1];
    let s2 = state[2];
    let loop = state[3];
    let previous = state[4];
    let rail = 0;
    let conducting = 0;
    let drive = limitInputVolts(first[0]) * invStep;
    let x = drive + node.state;
    let i = 0;
    while (i < n) {
      let nextDrive = 0;
      // The hot loop holds no call (a call makes V8 reload every array's base and length on each
      // pass): it leaves for Newton and comes back.
      for (; i < n; i++) {
        // Op-amp, sample i + 1: loop, slew, soft rails.
        nextDrive = 0;
        if (i + 1 < n) {
          const input = limitInputVolts(block[i + 1]);
          loop = b0 * input + u - a1 * loop;
          u = b1 * input + s1;
          s1 = b2 * input + s2 - a2 * loop;
          s2 = b3 * input - a3 * loop;
          let y = loop;
          const step = y - previous;
          if (Math.abs(step) > maxStepVolts) y = step > 0 ? previous + maxStepVolts : previous - maxStepVolts;
          previous = y;
          if (Math.abs(y - jointCentre) > jointHalfWidth) {
            if (y > upperJoint) {
              if (y > upperVolts) rail++;
              y = upperVolts - upperKneeSquared / (upperKneeVolts + (y - upperJoint));
            } else if (y < -lowerJoint) {
              if (y < -lowerVolts) rail++;
              y = -lowerVolts + lowerKneeSquared / (lowerKneeVolts + (-lowerJoint - y));
            }
          }
          // y lies within the swing limits, inside +-MAX_INPUT_VOLTS (checked at creation), so the
          // clipper's input limit would leave it unchanged.
          nextDrive = y * invStep;
        }
        // Diode node, sample i, from the table.
        if (!(x >= 0 && x < intervals)) break;
        const bracket = nextDrive + drive + twiceOrigin;
        const o = (x | 0) << 2; // COEFFICIENTS_PER_INTERVAL = 4; x | 0 = floor(x) for x >= 0
        const v = c[o] + x * c[o + 1];
        x = bracket + c[o + 2] + x * c[o + 3];
        if (v > upVolts || v < downVolts) conducting++;
        block[i] = v;
        drive = nextDrive;
      }
      if (i === n) break;
      // Diode node, sample i, by Newton (its op-amp sample i + 1 is done).
      const bracket = nextDrive + drive + twiceOrigin;
      const v = node.solveOffTable(x);
      x = bracket + stateGain * v - x;
      if (v > upVolts || v < downVolts) conducting++;
      block[i] = v;
      drive = nextDrive;
      i++;
    }
    state[0] = u;
    state[1] = s1;
    state[2] = s2;
    state[3] = loop;
    state[4] = previous;
    opamp.railSamples += rail;
    node.state = x;
    node.conductingSamples += conducting;
    node.countedSamples += n;
  }

  return {
    latencySamples: 0,
    gainStage,
    clipperStage,
    get railSamples(): number {
      return opamp.railSamples;
    },
    get conductingSamples(): number {
      return node.conductingSamples;
    },
    get countedSamples(): number {
      return node.countedSamples;
    },
    reset(): void {
      opamp.reset();
      node.reset();
    },
    process,
  };
}
