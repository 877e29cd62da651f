// Tests for src/circuit/gainClipperPair.ts: the fused loop must be bit-identical to the gain stage's
// processor followed by the clipper's (gain.ts, clipper.ts), with the same meters, for any split of
// the signal into blocks; and the chain must keep reporting per stage.
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { buildChain } from '../../src/circuit/chain.js';
import { createClipper, designClipper, type ClipperDesign } from '../../src/circuit/clipper.js';
import { canPairWithClipper, createGainClipperPair } from '../../src/circuit/gainClipperPair.js';
import { MAX_INPUT_VOLTS } from '../../src/circuit/inputLimit.js';
import { createGainStage, designGainStage, type GainStageDesign } from '../../src/circuit/gain.js';
import type { CircuitContext, ClipperStage, Design, GainStage, OpampParams } from '../../src/design/types.js';
import { D1N34A, D1N4148, IDEAL_OPAMP, RED_LED, TL072 } from './parts.js';

const SEED = 5;

// A slow part (LM741-like, common practice: slew about 0.5 V/us, GBW about 1 MHz) so slewing shows.
const SLOW_OPAMP: OpampParams = { ...TL072, name: 'slow', gbwHz: 1e6, slewRateVoltsPerSecond: 0.5e6 };

const sameBits = (a: Float64Array, b: Float64Array): boolean =>
  a.length === b.length && Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

interface Case {
  gain: GainStageDesign;
  clipper: ClipperDesign;
  input: Float64Array;
}

const opamp = fc.constantFrom(TL072, SLOW_OPAMP, IDEAL_OPAMP);
const diode = fc.constantFrom(D1N4148, D1N34A, RED_LED);
const optionalCap = (min: number, max: number) => fc.option(fc.double({ min, max, noNaN: true }), { nil: null });

const gainStage = fc.record({
  opamp,
  rf: fc.constantFrom(0, 10e3, 100e3, 510e3),
  rg: fc.option(fc.constantFrom(1e3, 4.7e3, 22e3), { nil: null }),
  cg: optionalCap(1e-9, 1e-6),
  cf: optionalCap(10e-12, 1e-9),
}).map((p): GainStage<number> => ({ id: 'amp', type: 'gain', ...p, feedbackDiode: null, feedbackUp: 0, feedbackDown: 0 }));

const clipperStage = fc.record({
  series: fc.constantFrom(470, 2.2e3, 10e3),
  cap: optionalCap(1e-9, 100e-9),
  diode,
  downDiode: diode,
  up: fc.integer({ min: 0, max: 2 }),
  down: fc.integer({ min: 1, max: 2 }),
}).map((p): ClipperStage<number> => ({ id: 'clip', type: 'clipper', ...p }));

/**
 * Sine bursts with noise, some far beyond the rails (soft rails, rail counts, slewing). The clipper
 * is designed for a smaller supply than the op-amp in half the cases, so the op-amp's swing runs
 * past the clipper's table and the Newton fallback runs; 'newton' clippers run it on every sample.
 */
const pairCase = fc
  .record({
    gain: gainStage,
    clipper: clipperStage,
    sampleRate: fc.constantFrom(96000, 384000),
    supplyVolts: fc.constantFrom(9, 18),
    clipperSupplyVolts: fc.constantFrom(1, 9),
    solver: fc.constantFrom('table' as const, 'newton' as const),
    amplitudeVolts: fc.double({ min: 1e-3, max: 50, noNaN: true }),
    hz: fc.double({ min: 50, max: 5000, noNaN: true }),
    noise: fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 16, maxLength: 16 }),
    length: fc.integer({ min: 1, max: 1500 }),
  })
  .map((p): Case => {
    const ctx: CircuitContext = { sampleRate: p.sampleRate, supplyVolts: p.supplyVolts, temperatureC: 25 };
    const input = new Float64Array(p.length);
    for (let i = 0; i < input.length; i++) {
      const envelope = i < input.length / 2 ? 1 : 0.05;
      input[i] = envelope * p.amplitudeVolts * Math.sin((2 * Math.PI * p.hz * i) / p.sampleRate) + 0.01 * p.noise[i % 16];
    }
    return {
      gain: designGainStage(p.gain, ctx),
      clipper: designClipper(p.clipper, { ...ctx, supplyVolts: p.clipperSupplyVolts }, { solver: p.solver }),
      input,
    };
  });

/** The reference: the gain stage then the clipper, each its own processor, in the given blocks. */
function runSeparately(
  { gain, clipper, input }: Case,
  blockSizes: number[] = [input.length],
): { output: Float64Array; rails: number; conducting: number; counted: number } {
  const gainStageProcessor = createGainStage(gain);
  const clipperProcessor = createClipper(clipper);
  const output = runInBlocks(
    (block) => {
      gainStageProcessor.process(block);
      clipperProcessor.process(block);
    },
    input,
    blockSizes,
  );
  return {
    output,
    rails: gainStageProcessor.railSamples,
    conducting: clipperProcessor.conductingSamples,
    counted: clipperProcessor.countedSamples,
  };
}

function runInBlocks(process: (block: Float64Array) => void, input: Float64Array, blockSizes: number[]): Float64Array {
  const output = input.slice();
  let start = 0;
  for (let k = 0; start < output.length; k++) {
    const size = blockSizes[k % blockSizes.length];
    process(output.subarray(start, start + size));
    start += size;
  }
  return output;
}

describe('fused gain stage and clipper', () => {
  test('bit-identical to the two processors one after the other, with the same rail and conduction counts', () => {
    let railCases = 0;
    fc.assert(
      fc.property(pairCase, (c) => {
        const expected = runSeparately(c);
        const pair = createGainClipperPair(c.gain, c.clipper);
        const output = c.input.slice();
        pair.process(output);
        expect(sameBits(output, expected.output), 'output bits').toBe(true);
        expect(pair.railSamples).toBe(expected.rails);
        expect(pair.gainStage.railSamples).toBe(expected.rails);
        expect(pair.conductingSamples).toBe(expected.conducting);
        expect(pair.clipperStage.countedSamples).toBe(expected.counted);
        if (expected.rails > 0) railCases++;
      }),
      { seed: SEED, numRuns: 80 },
    );
    expect(railCases, 'cases that reached a rail').toBeGreaterThan(10);
  });

  test('Newton fallback: an op-amp swing beyond the clipper table gives the same bits as the separate clipper', () => {
    // The clipper's table covers 4 x (supply/2) / R of drive (diodeNode.ts); designed for a 1 V
    // supply it ends at 2 V / R, while the op-amp on 18 V swings to 7.5 V.
    const ctx: CircuitContext = { sampleRate: 384000, supplyVolts: 18, temperatureC: 25 };
    const gain = designGainStage({ id: 'amp', type: 'gain', opamp: TL072, rf: 100e3, rg: 4.7e3, cg: 47e-9, cf: 100e-12, feedbackDiode: null, feedbackUp: 0, feedbackDown: 0 }, ctx);
    // Memoryless, so that the table's range is the drive's alone.
    const clipper = designClipper({ id: 'clip', type: 'clipper', series: 2.2e3, cap: null, diode: D1N4148, downDiode: D1N4148, up: 1, down: 1 }, { ...ctx, supplyVolts: 1 });
    const input = new Float64Array(4000);
    for (let i = 0; i < input.length; i++) input[i] = 2 * Math.sin((2 * Math.PI * 1000 * i) / ctx.sampleRate);
    const expected = runSeparately({ gain, clipper, input });
    const opampOutput = input.slice();
    createGainStage(gain).process(opampOutput);
    const peakDriveAmps = Math.max(...opampOutput.map(Math.abs)) / 2.2e3;
    expect(peakDriveAmps, 'drive beyond the table (Newton runs)').toBeGreaterThan(-(clipper.node.table?.pMin ?? 0));
    const pair = createGainClipperPair(gain, clipper);
    const output = input.slice();
    pair.process(output);
    expect(expected.rails, 'the op-amp reaches its rails').toBeGreaterThan(0);
    expect(sameBits(output, expected.output)).toBe(true);
    expect(pair.conductingSamples).toBe(expected.conducting);
  });

  // The diode node's state between blocks is rounded differently from its state within one (as in
  // diodeNode.ts), so the reference is the separate processors run in the same blocks.
  test('any split into blocks gives the bits and counts of the separate processors in the same blocks; reset returns to the start', () => {
    fc.assert(
      fc.property(pairCase, fc.array(fc.integer({ min: 1, max: 300 }), { minLength: 1, maxLength: 6 }), (c, blockSizes) => {
        const expected = runSeparately(c, blockSizes);
        const pair = createGainClipperPair(c.gain, c.clipper);
        pair.process(c.input.slice()); // some history, then reset
        pair.reset();
        const output = runInBlocks((block) => pair.process(block), c.input, blockSizes);
        expect(sameBits(output, expected.output)).toBe(true);
        expect(pair.railSamples).toBe(expected.rails);
        expect(pair.conductingSamples).toBe(expected.conducting);
        expect(pair.countedSamples).toBe(c.input.length);
      }),
      { seed: SEED, numRuns: 50 },
    );
  });

  test("the pair's stage views, run one after the other, continue the pair's state", () => {
    fc.assert(
      fc.property(pairCase, fc.integer({ min: 0, max: 1500 }), (c, splitAt) => {
        const split = Math.min(splitAt, c.input.length);
        const expected = runSeparately(c, [split || c.input.length, c.input.length]);
        const pair = createGainClipperPair(c.gain, c.clipper);
        const output = c.input.slice();
        pair.process(output.subarray(0, split));
        const rest = output.subarray(split);
        pair.gainStage.process(rest);
        pair.clipperStage.process(rest);
        expect(sameBits(output, expected.output)).toBe(true);
        expect(pair.conductingSamples).toBe(expected.conducting);
        expect(pair.railSamples).toBe(expected.rails);
      }),
      { seed: SEED, numRuns: 40 },
    );
  });

  test('a gain stage with feedback diodes is refused', () => {
    const ctx: CircuitContext = { sampleRate: 96000, supplyVolts: 9, temperatureC: 25 };
    const gain = designGainStage({ id: 'amp', type: 'gain', opamp: TL072, rf: 100e3, rg: 4.7e3, cg: null, cf: null, feedbackDiode: D1N4148, feedbackUp: 1, feedbackDown: 1 }, ctx);
    const clipper = designClipper({ id: 'clip', type: 'clipper', series: 2.2e3, cap: null, diode: D1N4148, downDiode: D1N4148, up: 1, down: 1 }, ctx);
    expect(() => createGainClipperPair(gain, clipper)).toThrow(/feedback diodes/);
  });

  test('a gain stage whose swing exceeds the input limit is not paired (the pair skips that limit)', () => {
    // A supply no design file may give (the parser caps it), as a direct design call can.
    const wild: CircuitContext = { sampleRate: 96000, supplyVolts: 4 * MAX_INPUT_VOLTS, temperatureC: 25 };
    const spec: GainStage<number> = { id: 'amp', type: 'gain', opamp: TL072, rf: 100e3, rg: 4.7e3, cg: null, cf: null, feedbackDiode: null, feedbackUp: 0, feedbackDown: 0 };
    expect(canPairWithClipper(designGainStage(spec, { ...wild, supplyVolts: 9 }))).toBe(true);
    expect(canPairWithClipper(designGainStage(spec, wild))).toBe(false);
  });
});

describe('chain with a gain stage directly before a clipper', () => {
  const design: Design<number> = {
    name: 'pair',
    supplyVolts: 9,
    temperatureC: 25,
    knobs: {},
    stages: [
      { id: 'amp', type: 'gain', opamp: TL072, rf: 100e3, rg: 4.7e3, cg: 47e-9, cf: 100e-12, feedbackDiode: null, feedbackUp: 0, feedbackDown: 0 },
      { id: 'clip', type: 'clipper', series: 2.2e3, cap: 10e-9, diode: D1N4148, downDiode: D1N4148, up: 1, down: 1 },
    ],
  };

  test('reports each stage by id, conduction on the clipper only, and matches the separate processors at 1x', () => {
    const chain = buildChain(design, { sampleRate: 48000, oversample: 1 });
    expect(chain.stages.map((s) => [s.id, s.type])).toEqual([['amp', 'gain'], ['clip', 'clipper']]);
    expect(chain.stages[0].processor.conduction).toBeUndefined();
    const input = new Float64Array(chain.blockSize);
    for (let i = 0; i < input.length; i++) input[i] = 0.2 * Math.sin((2 * Math.PI * 220 * i) / 48000);
    const output = input.slice();
    chain.process(output);
    const ctx: CircuitContext = { sampleRate: 48000, supplyVolts: 9, temperatureC: 25 };
    const [gainSpec, clipperSpec] = design.stages as [GainStage<number>, ClipperStage<number>];
    const expected = runSeparately({ gain: designGainStage(gainSpec, ctx), clipper: designClipper(clipperSpec, ctx), input });
    expect(sameBits(output, expected.output)).toBe(true);
    expect(chain.stages[1].processor.conduction?.conductingSamples).toBe(expected.conducting);
    expect(chain.stages[1].processor.conduction?.countedSamples).toBe(input.length);
    expect(expected.conducting, 'the diodes conduct in this test').toBeGreaterThan(0);
  });
});
