/**
 * Property-based tests (fast-check, fixed seeds) of the whole render path over random VALID designs
 * and random finite signals (issue 6 "Numerics"): design JSON text -> the real parser -> resolve ->
 * chain -> renderChannel. Invariants, not values of our own code:
 * - every output sample is finite and the output has the input's length;
 * - the same input gives bit-identical output (same chain again, and a freshly built chain);
 * - a gain stage's output stays inside its op-amp's output swing, supply/2 minus the datasheet
 *   headroom to each rail (the part's "output voltage swing" line in shared/parts.json).
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { buildChain } from '../../src/circuit/chain.js';
import { OVERSAMPLE_FACTORS } from '../../src/dsp/oversampler.js';
import { renderChannel } from '../../src/circuit/renderChannel.js';
import { createStageProcessor } from '../../src/circuit/stageModels.js';
import { parseDesignText } from '../../src/design/parseDesign.js';
import { resolveDesign } from '../../src/design/resolve.js';
import type { Design, GainStage } from '../../src/design/types.js';
import { UserError } from '../../src/errors.js';
import { PARTS, validDesign, type JsonObject } from './designArbitrary.js';
import { buildSignal, signalSegments } from './signalArbitrary.js';

const SEED = 42;
const sampleRate = fc.constantFrom(44100, 48000, 96000);
const oversample = fc.constantFrom(...OVERSAMPLE_FACTORS);

function parseResolved(json: JsonObject): Design<number> {
  return resolveDesign(parseDesignText(JSON.stringify(json), 'prop.json', PARTS));
}

const sameBits = (a: Float64Array, b: Float64Array): boolean =>
  a.length === b.length && Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

function firstNonFinite(x: Float64Array): number {
  for (let i = 0; i < x.length; i++) if (!Number.isFinite(x[i])) return i;
  return -1;
}

describe('random valid designs through the chain', () => {
  test('finite output of the input length, bit-identical on a second run and from a fresh chain', () => {
    fc.assert(
      fc.property(validDesign, signalSegments, sampleRate, oversample, (json, segments, rate, factor) => {
        const design = parseResolved(json);
        const input = buildSignal(segments);
        const chain = buildChain(design, { sampleRate: rate, oversample: factor });
        const first = renderChannel(chain, input);
        expect(first.length).toBe(input.length);
        expect(firstNonFinite(first), 'index of the first non-finite sample').toBe(-1);
        expect(sameBits(renderChannel(chain, input), first), 'same chain, second run').toBe(true);
        const fresh = buildChain(parseResolved(json), { sampleRate: rate, oversample: factor });
        expect(sameBits(renderChannel(fresh, input), first), 'fresh chain').toBe(true);
      }),
      { seed: SEED, numRuns: 120 },
    );
  });

  test('each gain stage alone stays within its op-amp output swing, +(supply/2 - headroomHigh) / -(supply/2 - headroomLow)', () => {
    fc.assert(
      fc.property(validDesign, signalSegments, sampleRate, oversample, fc.integer({ min: 1, max: 700 }), (json, segments, rate, factor, blockSize) => {
        const design = parseResolved(json);
        const input = buildSignal(segments);
        const ctx = { sampleRate: rate * factor, supplyVolts: design.supplyVolts, temperatureC: design.temperatureC };
        for (const stage of design.stages.filter((s): s is GainStage<number> => s.type === 'gain')) {
          const upperVolts = design.supplyVolts / 2 - stage.opamp.headroomHighVolts;
          const lowerVolts = design.supplyVolts / 2 - stage.opamp.headroomLowVolts;
          const processor = createStageProcessor(stage, ctx, design.knobs);
          const output = input.slice();
          for (let start = 0; start < output.length; start += blockSize) processor.process(output.subarray(start, start + blockSize));
          expect(firstNonFinite(output), `${stage.id}: first non-finite sample`).toBe(-1);
          let max = -Infinity;
          let min = Infinity;
          for (const v of output) {
            max = Math.max(max, v);
            min = Math.min(min, v);
          }
          expect(max, `${stage.id} (${stage.opamp.name} on ${design.supplyVolts} V) highest output`).toBeLessThanOrEqual(upperVolts);
          expect(min, `${stage.id} (${stage.opamp.name} on ${design.supplyVolts} V) lowest output`).toBeGreaterThanOrEqual(-lowerVolts);
        }
      }),
      { seed: SEED, numRuns: 150 },
    );
  });

  test('a supply that leaves an op-amp no swing is refused with a UserError when the stage is built', () => {
    // TL072: 1.5 V headroom to each rail (datasheet output swing, shared/parts.json): a 3 V supply leaves 0 V.
    const design = parseResolved({ supply: 3, stages: [{ id: 'amp', type: 'gain', opamp: 'tl072', rf: '10k', rg: '1k' }] });
    expect(() => buildChain(design, { sampleRate: 48000, oversample: 2 })).toThrow(UserError);
    expect(() => buildChain(design, { sampleRate: 48000, oversample: 2 })).toThrow(/leaves no output swing/);
  });
});
