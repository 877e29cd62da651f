// Tolerance spread (src/analysis/spread.ts): the draws (Gaussian, sigma = tolerance / 3, clipped at
// the tolerance: common practice), the variance shares against first-order uncertainty propagation
// (JCGM 100:2008, the GUM, section 5.1: for y = f(x1, x2) with independent inputs, u^2(y) =
// sum (df/dxi)^2 u^2(xi)), the design file's tolerance entries, and seeded repeatability.
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { buildFigures, runSpread } from '../../src/analysis/spread.js';
import { resolveDesign } from '../../src/design/resolve.js';
import { loadPartsLibrary } from '../../src/design/parts.js';
import { parseDesignText } from '../../src/design/parseDesign.js';
import { expectClose } from '../helpers/expectClose.js';

const parts = loadPartsLibrary();

/** One RC low-pass at 1.6 kHz: far above the corner its gain is 1 / (2 pi f R C). */
function lowpassDesign(extra: Record<string, unknown> = {}, stageExtra: Record<string, unknown> = {}): string {
  return JSON.stringify({ name: 'rc', supply: 9, ...extra, stages: [{ id: 'lp', type: 'lowpass', r: '10k', c: '10n', ...stageExtra }] });
}

describe('spread draws', () => {
  const report = runSpread(parseDesignText(lowpassDesign(), 'rc.json', parts), { runs: 120, seed: 3, oversample: 1 });

  test('each part stays within its tolerance, with sigma = tolerance / 3', () => {
    for (const [part, tolerance] of [['lp.r', 0.05], ['lp.c', 0.1]] as const) {
      const deviations = report.builds.map((b) => b.deviations[part]);
      expect(Math.max(...deviations.map(Math.abs))).toBeLessThanOrEqual(tolerance);
      const mean = deviations.reduce((s, d) => s + d, 0) / deviations.length;
      const std = Math.sqrt(deviations.reduce((s, d) => s + (d - mean) ** 2, 0) / (deviations.length - 1));
      expectClose(std, tolerance / 3, { rtol: 0.2 }); // 120 draws: the estimate's own spread is about 6.5 %
    }
  });

  test('variance shares follow first-order propagation: above the corner R and C share as their variances, 1 : 4', () => {
    // 20 log10 |H| = -20 log10(2 pi f R C): equal sensitivities to ln R and ln C, so the shares are
    // u^2(R) : u^2(C) = (5 %)^2 : (10 %)^2.
    const shares = new Map(report.sensitivity.filter((s) => s.figure === 'responseDb@16000Hz').map((s) => [s.part, s.share]));
    expectClose(shares.get('lp.c')!, 0.8, { atol: 0.1 });
    expectClose(shares.get('lp.r')!, 0.2, { atol: 0.1 });
    // The nominal figure is the hand value at 1 kHz, below the corner where the stage's bilinear
    // discretisation (pre-warped at the corner) still follows the analog RC: -10 log10(1 + (f / fc)^2).
    const fc = 1 / (2 * Math.PI * 1e4 * 1e-8);
    expectClose(report.nominal['responseDb@1000Hz']!, -10 * Math.log10(1 + (1000 / fc) ** 2), { atol: 0.05 });
  });

  test('the same seed gives the same report; another seed another', () => {
    const design = parseDesignText(lowpassDesign(), 'rc.json', parts);
    const again = runSpread(design, { runs: 5, seed: 3, oversample: 1 });
    expect(again.builds).toEqual(report.builds.slice(0, 5));
    expect(runSpread(design, { runs: 5, seed: 4, oversample: 1 }).builds).not.toEqual(again.builds);
  });
});

describe('spread against first-order propagation', () => {
  test('zero tolerances give zero spread: every build is the nominal design', () => {
    const exact = parseDesignText(lowpassDesign({ tolerances: { resistor: 0, capacitor: 0 } }), 'rc.json', parts);
    const report = runSpread(exact, { runs: 5, seed: 1, oversample: 1 });
    for (const [name, stats] of Object.entries(report.figures)) {
      if (stats.std === null) continue;
      const scale = Math.max(1, Math.abs(report.nominal[name] ?? 0));
      expect(stats.std, name).toBeLessThan(1e-12 * scale); // identical builds; only summation rounding remains
      expectClose(stats.p05!, report.nominal[name]!, { atol: 1e-12 * scale });
    }
    expect(report.sensitivity).toEqual([]);
  });

  test('the gain spread of a non-inverting stage: u(G) / G = (Rf / (Rf + Rg)) sqrt(u_r(Rf)^2 + u_r(Rg)^2)', () => {
    // G = 1 + Rf / Rg (ideal op-amp, no capacitors): dG = (Rf / Rg) (dRf / Rf - dRg / Rg), so to first
    // order (GUM 5.1.2) u(G) / G = (Rf / (Rf + Rg)) sqrt(u_r(Rf)^2 + u_r(Rg)^2), with u_r = 5 % / 3 for each
    // resistor (a Gaussian clipped at 3 sigma keeps 98.7 % of its sigma).
    const text = JSON.stringify({ name: 'g', supply: 9, stages: [{ id: 'amp', type: 'gain', opamp: 'ideal', rf: '90k', rg: '10k' }] });
    const report = runSpread(parseDesignText(text, 'g.json', parts), { runs: 150, seed: 11, oversample: 1 });
    const relative = (90 / 100) * Math.sqrt(2) * (0.05 / 3) * 0.987;
    expectClose(report.figures.gainDb.std!, (20 / Math.LN10) * relative, { rtol: 0.15 }); // 150 builds: the std estimate's own spread is about 6 %
    expectClose(report.nominal.gainDb!, 20, { atol: 1e-3 }); // 20 log10(1 + 90k / 10k)
  });
});

describe('semiconductors on "datasheet"', () => {
  test("an op-amp's GBW is drawn between the library's datasheet minimum and its typical value", () => {
    // TL072 in the parts library: GBW 4 MHz typ, 2.5 MHz min (datasheet, as its source note says).
    const text = JSON.stringify({ name: 'g', supply: 9, stages: [{ id: 'amp', type: 'gain', opamp: 'tl072', rf: '100k', rg: '1k' }] });
    const report = runSpread(parseDesignText(text, 'g.json', parts), { runs: 12, seed: 2, oversample: 1 });
    const deviations = report.builds.map((b) => b.deviations['amp.opamp']);
    for (const d of deviations) {
      expect(d).toBeLessThanOrEqual(0);
      expect(d).toBeGreaterThanOrEqual(2.5 / 4 - 1);
    }
    expect(deviations.some((d) => d < 0)).toBe(true);
    expect(report.tolerances.parts.find((p) => p.part === 'amp.opamp')?.tolerance).toBe('datasheet');
  });
});

describe('diodes on "datasheet"', () => {
  test("a 1N4148's Is is drawn within the library's range (the Is that keep VF within its datasheet limits), n held", () => {
    const text = JSON.stringify({ name: 'c', supply: 9, stages: [{ id: 'clip', type: 'clipper', series: '2k2', diode: '1n4148' }] });
    const report = runSpread(parseDesignText(text, 'c.json', parts), { runs: 12, seed: 4, oversample: 1 });
    const range = parts.diodes.get('1n4148')!.ranges!.saturationCurrent!;
    const drawn = report.builds.map((b) => 2.52e-9 * (1 + b.deviations['clip.diode']));
    for (const is of drawn) {
      expect(is).toBeGreaterThanOrEqual(range.min * (1 - 1e-12));
      expect(is).toBeLessThanOrEqual(range.max * (1 + 1e-12));
    }
    expect(new Set(drawn).size).toBeGreaterThan(6);
    for (const build of report.builds) {
      const inline = build.overrides.find((o) => o.startsWith('clip.diode='));
      expect(JSON.parse(inline!.slice('clip.diode='.length)).ideality).toBe(1.752);
    }
  });
});

describe('builds as --set overrides', () => {
  test("a build's overrides, applied to the design file, give exactly that build's figures", () => {
    const text = JSON.stringify({
      name: 'mixed', supply: 9, knobs: { tone: 0.3 },
      stages: [
        { id: 'in', type: 'input', coupling: '22n', pulldown: '1M' },
        { id: 'amp', type: 'gain', opamp: 'ideal', rf: '47k', rg: '4k7', cg: '100n' },
        { id: 'clip', type: 'clipper', series: '2k2', cap: '10n', diode: '1n4148', downDiode: '1n34a' },
        { id: 'tone', type: 'tone', fixed: '1k', pot: '20k', knob: 'tone', cap: '22n' },
      ],
      tolerances: { diode: '20%' },
    });
    const report = runSpread(parseDesignText(text, 'mixed.json', parts), { runs: 2, seed: 5, oversample: 1 });
    for (const build of report.builds) {
      expect(build.overrides.some((o) => o.startsWith('clip.downDiode={'))).toBe(true);
      expect(build.overrides.some((o) => o.startsWith('tone.pot='))).toBe(true);
      const again = buildFigures(resolveDesign(parseDesignText(text, 'mixed.json', parts, build.overrides)), 1);
      expect(again).toEqual(build.figures);
    }
  });
});

describe('transistors on "datasheet"', () => {
  test("a transistor's hFE is drawn within the library's range, and the build's inline part reproduces it", async () => {
    const file = 'fixtures/designs/ember-twin.json';
    const text = readFileSync(file, 'utf8');
    const report = runSpread(parseDesignText(text, file, parts), { runs: 2, seed: 6, oversample: 1 });
    const range = parts.bjts.get('2n5088')!.ranges.betaForward!;
    for (const build of report.builds) {
      const q1 = JSON.parse(build.overrides.find((o) => o.startsWith('fuzz.q1.part='))!.slice('fuzz.q1.part='.length));
      expect(q1.betaForward).toBeGreaterThanOrEqual(range.min);
      expect(q1.betaForward).toBeLessThanOrEqual(range.max);
      expect(buildFigures(resolveDesign(parseDesignText(text, file, parts, build.overrides)), 1)).toEqual(build.figures);
    }
  });
});

describe('tolerances in the design file', () => {
  test('by kind, per stage field, and beside a circuit element; the closest wins', () => {
    const design = parseDesignText(lowpassDesign({ tolerances: { resistor: '1%', capacitor: 0.02 } }, { tolerance: { c: '0.5 %' } }), 'rc.json', parts);
    const report = runSpread(design, { runs: 30, seed: 1, oversample: 1 });
    expect(Math.max(...report.builds.map((b) => Math.abs(b.deviations['lp.r'])))).toBeLessThanOrEqual(0.01);
    expect(Math.max(...report.builds.map((b) => Math.abs(b.deviations['lp.c'])))).toBeLessThanOrEqual(0.005);
    expect(report.tolerances.parts).toEqual([
      { part: 'lp.r', kind: 'resistor', tolerance: 0.01 },
      { part: 'lp.c', kind: 'capacitor', tolerance: 0.005 },
    ]);
    const circuit = JSON.stringify({
      supply: 9,
      stages: [{ id: 's', type: 'circuit', input: 'in', output: 'out', elements: [
        { id: 'r1', type: 'resistor', value: '10k', nodes: ['in', 'out'], tolerance: '0.1%' },
        { id: 'c1', type: 'capacitor', value: '10n', nodes: ['out', 'gnd'] },
      ] }],
    });
    expect(parseDesignText(circuit, 'c.json', parts).tolerances?.byPart.get('s.r1')).toBe(0.001);
  });

  test('bad entries name the path and what is expected', () => {
    expect(() => parseDesignText(lowpassDesign({ tolerances: { resistr: '1%' } }), 'rc.json', parts)).toThrow('rc.json: tolerances.resistr: "resistr" is not a part kind (did you mean "resistor"?)');
    expect(() => parseDesignText(lowpassDesign({ tolerances: { resistor: '5' } }), 'rc.json', parts)).toThrow(/tolerances\.resistor: "5" is not a tolerance \(expected a percentage such as "5%"/);
    expect(() => parseDesignText(lowpassDesign({}, { tolerance: { cap: '1%' } }), 'rc.json', parts)).toThrow(/stages\[0\]\.tolerance\.cap: "cap" is not a part of stage "lp"/);
  });
});
