import { describe, expect, it } from 'vitest';
import { expandVaryMatrix, MAX_VARIANTS, parseVariantsText } from '../../src/compare/variants.js';

describe('expandVaryMatrix', () => {
  it('makes the full cartesian product, first --vary slowest', () => {
    // Cartesian product A x B has |A| |B| elements, in lexicographic (nested-loop) order.
    const variants = expandVaryMatrix(['clip.diode=1n4148,1n34a,led-red', 'drive=0.2,0.9']);
    expect(variants.map((v) => v.overrides)).toEqual([
      ['clip.diode=1n4148', 'drive=0.2'],
      ['clip.diode=1n4148', 'drive=0.9'],
      ['clip.diode=1n34a', 'drive=0.2'],
      ['clip.diode=1n34a', 'drive=0.9'],
      ['clip.diode=led-red', 'drive=0.2'],
      ['clip.diode=led-red', 'drive=0.9'],
    ]);
    expect(variants[3].label).toBe('clip.diode=1n34a drive=0.9');
  });

  it('keeps the value order of a single --vary and has 2 x 2 x 3 = 12 variants for three', () => {
    expect(expandVaryMatrix(['amp.rf.fixed=4k7,10k']).map((v) => v.label)).toEqual(['amp.rf.fixed=4k7', 'amp.rf.fixed=10k']);
    expect(expandVaryMatrix(['clip.up=1,2', 'clip.down=1,2', 'drive=0.2,0.5,0.9'])).toHaveLength(12);
  });

  it('rejects malformed, repeated and oversized lists with one clear line', () => {
    expect(() => expandVaryMatrix(['drive'])).toThrow(/--vary drive: expected key=v1,v2/);
    expect(() => expandVaryMatrix(['drive=0.2,,0.5'])).toThrow(/empty value/);
    expect(() => expandVaryMatrix(['drive=0.2,0.2'])).toThrow(/listed twice/);
    expect(() => expandVaryMatrix(['drive=0.1', 'drive=0.2'])).toThrow(/given twice/);
    const many = Array.from({ length: 9 }, (_, i) => String(i / 10)).join(',');
    expect(() => expandVaryMatrix([`drive=${many}`, `tone=${many}`])).toThrow(new RegExp(`81 variants is too many \\(at most ${MAX_VARIANTS}\\)`));
  });
});

describe('parseVariantsText', () => {
  it('reads labels and overrides, numbers as text', () => {
    const text = JSON.stringify({
      variants: [
        { label: 'silicon', set: { 'clip.diode': '1n4148' } },
        { label: 'germanium, hotter', set: { 'clip.diode': '1n34a', drive: 0.8 } },
        { label: 'as designed' },
      ],
    });
    expect(parseVariantsText(text, 'v.json')).toEqual([
      { label: 'silicon', overrides: ['clip.diode=1n4148'], origins: ['v.json: variants[0].set.clip.diode'] },
      { label: 'germanium, hotter', overrides: ['clip.diode=1n34a', 'drive=0.8'], origins: ['v.json: variants[1].set.clip.diode', 'v.json: variants[1].set.drive'] },
      { label: 'as designed', overrides: [], origins: [] },
    ]);
  });

  it('names the file and JSON path of a bad entry', () => {
    expect(() => parseVariantsText('{"variants": []}', 'v.json')).toThrow(/v\.json: variants: expected a non-empty array/);
    expect(() => parseVariantsText('{"variants": [{"label": "a", "set": {"drive": null}}]}', 'v.json')).toThrow(/v\.json: variants\[0\]\.set\.drive: expected a value/);
    expect(() => parseVariantsText('{"variants": [{"label": "a"}, {"label": "a"}]}', 'v.json')).toThrow(/variants\[1\]\.label: label "a" is already used/);
    expect(() => parseVariantsText('{"variants": [{"name": "a"}]}', 'v.json')).toThrow(/unknown field "name"/);
    expect(() => parseVariantsText('{"variants": [', 'v.json')).toThrow(/v\.json/);
  });
});
