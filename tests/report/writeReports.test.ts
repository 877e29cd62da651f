import { mkdtemp, readFile, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { svgPathBeside, toJsonText, writeHtmlReport, writeJsonReport } from '../../src/report/writeReports.js';

let folder: string;
beforeEach(async () => {
  folder = await mkdtemp(join(tmpdir(), 'clipbench-report-'));
});
afterEach(async () => {
  await rm(folder, { recursive: true, force: true });
});

describe('report writing', () => {
  it('writes pretty JSON that parses back to the same data', async () => {
    const data = { lufs: -23.01, harmonics: [{ order: 2, hz: 2000, dbc: -40 }], fundamentalHz: null };
    const path = join(folder, 'out.json');
    await writeJsonReport(path, data);
    const text = await readFile(path, 'utf8');
    expect(JSON.parse(text)).toEqual(data);
    expect(text.endsWith('\n')).toBe(true);
  });

  it('refuses NaN and infinities instead of letting JSON turn them into null', () => {
    expect(() => toJsonText({ a: { b: Number.NaN } })).toThrow(/"b"/);
    expect(() => toJsonText([Number.NEGATIVE_INFINITY])).toThrow();
  });

  it('saves each plot as an SVG beside the HTML', async () => {
    const htmlPath = join(folder, 'take report.html');
    expect(svgPathBeside(htmlPath, 'spectrum')).toBe(join(folder, 'take report-spectrum.svg'));
    const written = await writeHtmlReport(htmlPath, '<!DOCTYPE html>', [
      { name: 'spectrum', svg: '<svg></svg>' },
      { name: 'harmonics', svg: '<svg/>' },
    ]);
    expect(written).toHaveLength(2);
    expect((await readdir(folder)).sort()).toEqual(['take report-harmonics.svg', 'take report-spectrum.svg', 'take report.html']);
    expect(await readFile(written[1], 'utf8')).toBe('<svg/>');
  });
});
