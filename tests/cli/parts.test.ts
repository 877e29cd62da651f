import { describe, expect, it } from 'vitest';
import { runCli } from '../helpers/cli.js';

describe('clipbench parts', () => {
  it('lists every part the design files may name, each with a source note', () => {
    const result = runCli(['parts', '--json']);
    expect(result.status).toBe(0);
    const library = JSON.parse(result.stdout) as { diodes: { name: string; source: string }[]; opamps: { name: string; source: string; gbwHz: number | null }[] };
    const diodes = library.diodes.map((d) => d.name);
    for (const name of ['1n4148', '1n914', '1n34a', '1n60', '1n5817', 'bat41', 'led-red', 'led-green', 'led-blue']) expect(diodes).toContain(name);
    const opamps = library.opamps.map((o) => o.name);
    for (const name of ['ideal', 'tl072', 'ne5532', 'rc4558', 'lm741', 'lm358', 'tlv2372']) expect(opamps).toContain(name);
    for (const part of [...library.diodes, ...library.opamps]) expect(part.source.length).toBeGreaterThan(10);
    // The ideal part has unlimited gain-bandwidth; JSON has no Infinity, so it reads null.
    expect(library.opamps.find((o) => o.name === 'ideal')?.gbwHz).toBeNull();
  });

  it('lists transistors and JFETs whose typical values lie inside their datasheet ranges', () => {
    const library = JSON.parse(runCli(['parts', '--json', '--kind', 'bjt']).stdout) as { bjts: { name: string; betaForward: number; ranges: { betaForward?: { min: number; max: number } } }[] };
    expect(library.bjts.map((b) => b.name)).toEqual(expect.arrayContaining(['2n3904', '2n3906', '2n5088', 'ac128']));
    for (const b of library.bjts) {
      const range = b.ranges.betaForward!;
      expect(b.betaForward).toBeGreaterThanOrEqual(range.min);
      expect(b.betaForward).toBeLessThanOrEqual(range.max);
    }
  });

  it('filters by kind and rejects an unknown kind', () => {
    const diodesOnly = runCli(['parts', '--kind', 'diode']);
    expect(diodesOnly.stdout).toMatch(/1n4148/);
    expect(diodesOnly.stdout).not.toMatch(/tl072/);
    const jfets = runCli(['parts', '--kind', 'jfet']);
    expect(jfets.stdout).toMatch(/j201/);
    expect(jfets.stdout).not.toMatch(/2n3904|1n4148/);
    const bad = runCli(['parts', '--kind', 'valve']);
    expect(bad.status).not.toBe(0);
    expect(bad.stderr).toMatch(/--kind/);
  });
});
