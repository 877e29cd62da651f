import { describe, expect, it } from 'vitest';
import { createVolumeStage, designVolumeStage, volumeStageSmallSignal } from '../../src/circuit/volume.js';
import type { CircuitContext, VolumeStage } from '../../src/design/types.js';
import { UserError } from '../../src/errors.js';
import { expectClose } from '../helpers/expectClose.js';
import { makeSine } from '../helpers/sineFit.js';

const ctx: CircuitContext = { sampleRate: 48000, supplyVolts: 9, temperatureC: 25 };
const base: VolumeStage = { id: 'out', type: 'volume', potOhms: 100e3, knob: 'level', taper: 'linear', reverse: false };

/** Gain the processor applies to a block (ratio of output to input, sample by sample). */
function appliedGain(spec: VolumeStage, position: number): number {
  const stage = createVolumeStage(designVolumeStage(spec, position, ctx));
  const input = makeSine(256, 1000, ctx.sampleRate);
  const block = input.slice();
  stage.process(block);
  const ratios = new Set<number>();
  for (let n = 0; n < block.length; n++) if (input[n] !== 0) ratios.add(Number((block[n] / input[n]).toPrecision(12)));
  expect(ratios.size).toBe(1); // a pure gain: the same ratio everywhere
  return [...ratios][0];
}

describe('volume stage', () => {
  it('linear taper: the divider ratio equals the position (pot as a voltage divider)', () => {
    for (const position of [0, 0.25, 0.5, 1]) expectClose(appliedGain(base, position), position, { rtol: 1e-12 });
  });

  it('audio taper: full at the end, 10-15 % at mid rotation (common practice)', () => {
    const audio: VolumeStage = { ...base, taper: 'audio' };
    expectClose(appliedGain(audio, 1), 1, { rtol: 1e-12 });
    const mid = appliedGain(audio, 0.5);
    expect(mid).toBeGreaterThanOrEqual(0.1 - 1e-12);
    expect(mid).toBeLessThanOrEqual(0.15);
    // Monotonic and below the linear law in between (a log pot lags a linear one).
    expect(appliedGain(audio, 0.25)).toBeLessThan(mid);
    expect(appliedGain(audio, 0.75)).toBeLessThan(0.75);
  });

  it('reverse wiring turns position p into 1 - p', () => {
    expectClose(appliedGain({ ...base, reverse: true }, 0.3), 0.7, { rtol: 1e-12 });
    expectClose(appliedGain({ ...base, taper: 'audio', reverse: true }, 0.5), appliedGain({ ...base, taper: 'audio' }, 0.5), { rtol: 1e-12 });
  });

  it('small-signal H(s) is the same constant gain', () => {
    const tf = volumeStageSmallSignal({ ...base, taper: 'audio' }, 0.5);
    expect(tf.a).toEqual([1]);
    expectClose(tf.b[0], appliedGain({ ...base, taper: 'audio' }, 0.5), { rtol: 1e-12 });
  });

  it('rejects a knob position outside 0..1, naming the stage and knob', () => {
    expect(() => designVolumeStage(base, 1.5, ctx)).toThrow(UserError);
    expect(() => designVolumeStage(base, Number.NaN, ctx)).toThrow(/stage "out": knob "level"/);
  });
});
