// The named stage types as netlist blocks (src/netlist/stageBlocks.ts): every type has a block (one
// table, checked against the design vocabulary), and each block, solved by the circuit core's
// small-signal analysis, has the named stage's own analog transfer function (the hand-derived H(s)
// of each stage file: RC sections 1 / (1 + sRC), the input high-pass s Rp C / (1 + s (Rs + Rp) C),
// the non-inverting gain 1 + Zf / Zg, the clipper's 1 / (1 + R g0 + s R C), the volume divider).
import { describe, expect, test } from 'vitest';
import { circuitStageResponse } from '../../src/circuit/circuitStage.js';
import { stageAnalogResponse } from '../../src/circuit/stageModels.js';
import { STAGE_TYPES } from '../../src/design/fields.js';
import { namedStageCircuit, STAGE_BLOCKS, type NamedStage } from '../../src/netlist/stageBlocks.js';
import { D1N4148, IDEAL_OPAMP } from '../circuit/parts.js';
import { circuitContext } from '../solver/testCircuits.js';

const knobs = { level: 0.3 };
const STAGES: NamedStage[] = [
  { id: 'in', type: 'input', series: 1000, coupling: 22e-9, pulldown: 1e6 },
  { id: 'amp', type: 'gain', opamp: IDEAL_OPAMP, rf: 100e3, rg: 4700, cg: 47e-9, cf: 100e-12, feedbackDiode: null, feedbackUp: 0, feedbackDown: 0 },
  { id: 'soft', type: 'gain', opamp: IDEAL_OPAMP, rf: 220e3, rg: 10e3, cg: 1e-6, cf: null, feedbackDiode: D1N4148, feedbackUp: 1, feedbackDown: 1 },
  { id: 'clip', type: 'clipper', series: 2200, cap: 10e-9, diode: D1N4148, downDiode: D1N4148, up: 1, down: 2 },
  { id: 'tone', type: 'tone', r: 6000, cap: 22e-9 },
  { id: 'lp', type: 'lowpass', r: 10e3, c: 6.8e-9 },
  { id: 'hp', type: 'highpass', r: 100e3, c: 100e-9 },
  { id: 'out', type: 'volume', potOhms: 100e3, knob: 'level', taper: 'audio', reverse: false },
];
const FREQUENCIES = [20, 120, 1000, 7000, 20000];

describe('stage blocks', () => {
  test('one block per named stage type, in one table', () => {
    expect(Object.keys(STAGE_BLOCKS).sort()).toEqual(STAGE_TYPES.filter((type) => type !== 'circuit').sort());
  });

  test.each(STAGES.map((stage) => [stage.id, stage] as const))('%s: the block has the stage\'s own analog response', (_id, stage) => {
    const ctx = circuitContext();
    const block = circuitStageResponse(namedStageCircuit(stage, knobs), ctx, knobs, FREQUENCIES);
    const named = stageAnalogResponse(stage, ctx, knobs, FREQUENCIES);
    FREQUENCIES.forEach((hz, f) => {
      const magnitude = Math.hypot(named[f].re, named[f].im);
      const error = Math.hypot(block[f].re - named[f].re, block[f].im - named[f].im);
      expect(error, `${stage.id} at ${hz} Hz: block ${JSON.stringify(block[f])}, stage ${JSON.stringify(named[f])}`).toBeLessThan(1e-4 * magnitude + 1e-9);
    });
  });
});
