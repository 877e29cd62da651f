import { existsSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCompare, type CompareResult } from '../../src/compare/runCompare.js';
import { expandVaryMatrix } from '../../src/compare/variants.js';
import { readWavFile } from '../../src/audio/wavRead.js';
import { integratedLoudness } from '../../src/dsp/loudness.js';
import { expectClose } from '../helpers/expectClose.js';
import { makeTempDir, NIGHT_DRIVE, writeDemoTake } from './compareFixtures.js';

const TARGET_LUFS = -18;
let dir: string;
let out: string;
let result: CompareResult;

beforeAll(async () => {
  dir = makeTempDir('compare');
  out = path.join(dir, 'out');
  const first = await writeDemoTake(dir, 'pluck.wav');
  const second = await writeDemoTake(dir, 'pluck copy.wav', 1.2);
  result = await runCompare({
    designPath: NIGHT_DRIVE,
    inputPaths: [first, second],
    outputDir: out,
    variants: expandVaryMatrix(['clip.diode=1n4148,no-such-diode,1n34a']),
    commonOverrides: ['drive=0.7'],
    match: { targetLufs: TARGET_LUFS, ceilingDbfs: -1 },
    oversample: 2,
    scale: { fullScaleVolts: 1 },
    bits: '24',
    dither: true,
    threads: 2,
  });
});

describe('runCompare', () => {
  it('renders every good variant of every take and keeps going past a bad one', () => {
    const { summary } = result;
    expect(summary.takes.map((t) => t.name)).toEqual(['pluck', 'pluck_copy']);
    for (const take of summary.takes) {
      expect(take.entries.map((e) => e.label)).toEqual(['dry', 'clip.diode=1n4148', 'clip.diode=no-such-diode', 'clip.diode=1n34a']);
      const [dry, silicon, bad, germanium] = take.entries;
      expect(dry.kind).toBe('dry');
      expect(bad.file).toBeNull();
      expect(bad.error).toMatch(/no-such-diode/);
      for (const good of [dry, silicon, germanium]) expect(existsSync(path.join(out, good.file ?? 'missing'))).toBe(true);
    }
    expect(summary.variants[1].error).toMatch(/unknown diode "no-such-diode"/);
    expect(summary.failures.some((line) => line.startsWith('variant 2 "clip.diode=no-such-diode"'))).toBe(true);
    expect(readdirSync(out).filter((name) => name.endsWith('.tmp'))).toEqual([]);
  });

  it("matches every written file within 0.5 LU of its take's level: the target, or the quietest player's when the ceiling held one", async () => {
    let matched = 0;
    for (const take of result.summary.takes) {
      const held = take.entries.some((entry) => entry.ceilingLimited);
      if (held) expect(take.matchedLufs!).toBeLessThan(TARGET_LUFS - 0.5);
      else expect(take.matchedLufs).toBe(TARGET_LUFS);
      for (const entry of take.entries) {
        if (entry.file === null) continue;
        const wav = await readWavFile(path.join(out, entry.file));
        // Measured independently of the program's report, on the written WAV (BS.1770-4 meter).
        const lufs = integratedLoudness(wav.channels, wav.sampleRate);
        let peak = 0;
        for (const channel of wav.channels) for (const x of channel) peak = Math.max(peak, Math.abs(x));
        expect(20 * Math.log10(peak)).toBeLessThanOrEqual(-1 + 0.001);
        if (entry.ceilingLimited) {
          expect(lufs).toBeLessThan(TARGET_LUFS - 0.5);
          expectClose(20 * Math.log10(peak), -1, { atol: 0.01 });
          expect(result.summary.ceilingLimited.some((line) => line.startsWith(`${entry.file}:`))).toBe(true);
        } else {
          expectClose(lufs, take.matchedLufs!, { atol: 0.5 });
          matched++;
        }
        expectClose(entry.loudnessLufs ?? NaN, lufs, { atol: 1e-6 });
      }
    }
    expect(matched).toBeGreaterThanOrEqual(4);
    // The dry pluck has a crest factor above 20 dB: -18 LUFS would need a peak above -1 dBFS.
    expect(result.summary.takes[0].entries[0].ceilingLimited).toBe(true);
  });

  it('writes summary.json with the documented keys and no non-finite numbers', () => {
    const summary = JSON.parse(readFileSync(result.summaryPath, 'utf8'));
    const entry = summary.takes[0].entries[1];
    for (const key of ['label', 'overrides', 'file', 'loudnessBeforeLufs', 'gainDb', 'ceilingLimited', 'peakDbfs', 'crestDb', 'thdPercent', 'centroidHz']) {
      expect(entry).toHaveProperty(key);
    }
    expect(entry.overrides).toEqual(['clip.diode=1n4148']);
    expect(summary.commonOverrides).toEqual(['drive=0.7']);
    // A clipping stage driven at 0.5 V makes distortion; THD is a percentage, the centroid in band.
    expect(entry.thdPercent).toBeGreaterThan(0.5);
    expect(entry.thdPercent).toBeLessThan(100);
    expect(entry.centroidHz).toBeGreaterThan(20);
    expect(entry.centroidHz).toBeLessThan(20000);
    expect(summary.takes[0].entries[0].thdPercent).toBeNull();
    expect(existsSync(result.pagePath)).toBe(true);
  });

  it("adds the THD at each take's own input peak: null for the dry take, ordered against the 0.5 V figure by level", () => {
    const take = result.summary.takes[0];
    expect(take.entries[0].thdAtTakePeakPercent).toBeNull();
    const variant = take.entries.find((entry) => entry.variant === 1)!;
    const sidecar = JSON.parse(readFileSync(path.join(out, variant.file!.replace(/\.wav$/, '.json')), 'utf8'));
    const inputPeakVolts: number = sidecar.input.peakVolts;
    expect(variant.thdAtTakePeakPercent!).toBeGreaterThan(0);
    // A diode clipper distorts more the harder it is driven (common practice): the take's peak
    // against the fixed 0.5 V reference orders the two THD figures.
    if (inputPeakVolts > 0.5) expect(variant.thdAtTakePeakPercent!).toBeGreaterThan(variant.thdPercent!);
    else expect(variant.thdAtTakePeakPercent!).toBeLessThan(variant.thdPercent!);
  });

  it('presets the blind test to two variants, not the dry take against variant 1', () => {
    const page = readFileSync(result.pagePath, 'utf8');
    // Variant 2 failed (unknown diode): the rendered variants are 1 and 3.
    expect(page).toMatch(/data-role="pick-1"><option value="0">[^<]*<\/option><option value="1" selected>/);
    expect(page).toMatch(/data-role="pick-2">(<option value="\d+">[^<]*<\/option>)*<option value="3" selected>/);
  });
});
