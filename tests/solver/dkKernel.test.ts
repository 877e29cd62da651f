// The generated per-circuit kernel (src/solver/dkKernel.ts) against the DK recurrence written out
// plainly (Yeh, Abel & Smith, IEEE TASLP 18(4), 2010: p = D x + E u + e0, v = p + F i(v),
// x' = A x + B u + C i + b0, y = G x + H u + K i + h0) from the model's matrices, each block solved
// by the processor's robust solve (damped Newton with pivoting). Same answer within the solvers'
// tolerance; the kernel only changes the cost.
import { describe, expect, test } from 'vitest';
import { createCircuitStage, designCircuitStage } from '../../src/circuit/circuitStage.js';
import type { CircuitStage } from '../../src/design/types.js';
import type { DkModel } from '../../src/solver/dkModel.js';
import type { DkProcessor } from '../../src/solver/dkProcessor.js';
import { circuitContext, commonEmitterStage, commonSourceStage, lowpassedNoise, opampDiodeStage, tl072NonInvertingStage } from './testCircuits.js';

function plainRecurrence(model: DkModel, processor: DkProcessor, input: Float64Array): Float64Array {
  processor.reset();
  const { states, ports } = model;
  let x = Float64Array.from(model.restState);
  const output = new Float64Array(input.length);
  for (let n = 0; n < input.length; n++) {
    const u = input[n];
    for (let k = 0; k < ports; k++) {
      let sum = model.e0[k] + model.e[k] * u;
      for (let s = 0; s < states; s++) sum += model.d[k * states + s] * x[s];
      processor.p[k] = sum;
    }
    for (let j = 0; j + 1 < model.blockStart.length; j++) {
      const lo = model.blockStart[j];
      for (let r = lo; r < model.blockStart[j + 1]; r++) for (let c = 0; c < lo; c++) processor.p[r] += model.f[r * ports + c] * processor.i[c];
      processor.solveBlockRobustly(j);
    }
    const i = processor.i;
    let y = model.h0 + model.h * u - model.restOutput;
    for (let s = 0; s < states; s++) y += model.g[s] * x[s];
    for (let k = 0; k < ports; k++) y += model.k[k] * i[k];
    const next = new Float64Array(states);
    for (let r = 0; r < states; r++) {
      let sum = model.b0[r] + model.b[r] * u;
      for (let s = 0; s < states; s++) sum += model.a[r * states + s] * x[s];
      for (let k = 0; k < ports; k++) sum += model.c[r * ports + k] * i[k];
      next[r] = sum;
    }
    x = next;
    output[n] = y;
  }
  return output;
}

const cases: Array<[string, () => CircuitStage, number]> = [
  ['op-amp with diodes and a series resistor in its loop', opampDiodeStage, 0.5],
  ['TL072 non-inverting stage into its rails', tl072NonInvertingStage, 1],
  ['common-emitter stage', commonEmitterStage, 0.3],
  ['common-source stage', commonSourceStage, 0.5],
];

describe('generated kernel', () => {
  test.each(cases)('%s: equals the plain DK recurrence within 1e-8 V', (_name, stage, rmsVolts) => {
    const design = designCircuitStage(stage(), circuitContext(), {});
    const input = lowpassedNoise(6000, 20e3, rmsVolts, 7);
    const kernelOutput = Float64Array.from(input);
    const processor = createCircuitStage(design);
    processor.process(kernelOutput);
    const reference = plainRecurrence(design.model, createCircuitStage(design), input);
    let largest = 0;
    let worst = 0;
    for (let n = 0; n < input.length; n++) {
      largest = Math.max(largest, Math.abs(reference[n]));
      worst = Math.max(worst, Math.abs(kernelOutput[n] - reference[n]));
    }
    expect(largest).toBeGreaterThan(0.1); // the stage was driven
    expect(worst).toBeLessThan(1e-8);
  });
});
