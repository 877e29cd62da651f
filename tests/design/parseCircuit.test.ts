// The circuit stage's design-file form: the example parses to the typed netlist, and every
// class of bad netlist is one line naming the element and the node (structural checks, no outside
// source needed beyond the MNA requirement that every node has a DC path to the reference node).
import { describe, expect, test } from 'vitest';
import { parseDesignText } from '../../src/design/parseDesign.js';
import { loadPartsLibrary } from '../../src/design/parts.js';
import type { CircuitStage } from '../../src/design/types.js';

const parts = loadPartsLibrary();

/** A design of one circuit stage; without `knobs`, every knob at mid rotation. */
function design(elements: unknown[], extra: Record<string, unknown> = {}, knobs?: Record<string, number>): string {
  return JSON.stringify({ supply: 9, ...(knobs ? { knobs } : {}), stages: [{ id: 'stack', type: 'circuit', input: 'in', output: 'out', elements, ...extra }] });
}

const parse = (text: string, overrides: string[] = []): CircuitStage => parseDesignText(text, 'd.json', parts, overrides).stages[0] as CircuitStage;
const errorOf = (text: string, overrides: string[] = []): string => {
  try {
    parse(text, overrides);
  } catch (error) {
    return (error as Error).message;
  }
  throw new Error('expected an error');
};

const EXAMPLE = [
  { id: 'r1', type: 'resistor', value: '33k', nodes: ['in', 'x'] },
  { id: 'c1', type: 'capacitor', value: '1n', nodes: ['in', 't'] },
  { id: 'treble', type: 'pot', value: '100k', knob: 'treble', taper: 'linear', nodes: ['t', 'out', 'b'] },
  { id: 'rb', type: 'resistor', value: '1M', nodes: ['b', 'gnd'] },
  { id: 'rx', type: 'resistor', value: '10k', nodes: ['x', 'vref'] },
  { id: 'd1', type: 'diode', part: '1n4148', nodes: ['x', 'k'] },
  { id: 'rk', type: 'resistor', value: '4k7', nodes: ['k', 'gnd'] },
  { id: 'u1', type: 'opamp', part: 'tl072', nodes: ['x', 'o', 'o'] },
  { id: 'q1', type: 'npn', part: { polarity: 'npn', saturationCurrent: 2e-14, betaForward: 180, betaReverse: 3 }, nodes: ['vcc', 'o', 'e'] },
  { id: 're', type: 'resistor', value: '1k', nodes: ['e', 'gnd'] },
  { id: 'j1', type: 'njfet', part: 'j201', nodes: ['vcc', 'o', 'out'] },
  { id: 'rs', type: 'resistor', value: '2k2', nodes: ['out', 'gnd'] },
];

describe('circuit stages in design files', () => {
  test('the documented example parses: values with prefixes and RKM codes, parts by name and inline, pot knobs', () => {
    const stage = parse(design(EXAMPLE, {}, { treble: 0.3 }));
    expect(stage.elements.map((e) => e.type)).toEqual(['resistor', 'capacitor', 'pot', 'resistor', 'resistor', 'diode', 'resistor', 'opamp', 'npn', 'resistor', 'njfet', 'resistor']);
    const r1 = stage.elements[0];
    expect(r1.type === 'resistor' && r1.ohms).toBe(33000);
    const pot = stage.elements[2];
    expect(pot.type === 'pot' && [pot.ohms, pot.knob, pot.taper, pot.reverse]).toEqual([100e3, 'treble', 'linear', false]);
    const q1 = stage.elements[8];
    expect(q1.type === 'npn' && [q1.bjt.betaForward, q1.bjt.ideality]).toEqual([180, 1]);
    const j1 = stage.elements[10];
    expect(j1.type === 'njfet' && j1.jfet.polarity).toBe('n');
  });

  test('--set reaches element values and parts: stageId.elementId.field', () => {
    const stage = parse(design(EXAMPLE), ['stack.r1.value=4k7', 'stack.d1.part=1n34a', 'stack.d1.count=2']);
    const r1 = stage.elements[0];
    expect(r1.type === 'resistor' && r1.ohms).toBe(4700);
    const d1 = stage.elements[5];
    expect(d1.type === 'diode' && [d1.diode.name, d1.count]).toEqual(['1n34a', 2]);
    expect(errorOf(design(EXAMPLE), ['stack.r9.value=1k'])).toMatch(/--set stack\.r9\.value: no element "r9" in stage "stack".*did you mean "r1"/);
  });

  const bad: [string, unknown[], RegExp][] = [
    ['unknown element type', [{ id: 'r1', type: 'resistr', value: '1k', nodes: ['in', 'out'] }], /stages\[0\]\.elements\[0\]\.type: unknown element type "resistr".*did you mean "resistor"/],
    ['unknown part', [{ id: 'd1', type: 'diode', part: '1n4149', nodes: ['in', 'out'] }, { id: 'r', type: 'resistor', value: '1k', nodes: ['out', 'gnd'] }], /elements\[0\]\.part: unknown diode "1n4149"/],
    ['pin count', [{ id: 'r1', type: 'resistor', value: '1k', nodes: ['in', 'out', 'gnd'] }], /element "r1" has 3 nodes but a resistor takes 2/],
    ['polarity mismatch', [{ id: 'q1', type: 'npn', part: '2n3906', nodes: ['out', 'in', 'gnd'] }], /element "q1" is an npn element but part "2n3906" is pnp/],
    ['floating node', [{ id: 'r1', type: 'resistor', value: '1k', nodes: ['in', 'out'] }, { id: 'c1', type: 'capacitor', value: '1n', nodes: ['out', 'x'] }, { id: 'r2', type: 'resistor', value: '1k', nodes: ['x', 'y'] }], /element "c1": node "x" has no DC path to ground/],
    ['op-amp output on a fixed node', [{ id: 'r1', type: 'resistor', value: '1k', nodes: ['in', 'out'] }, { id: 'u1', type: 'opamp', part: 'tl072', nodes: ['out', 'vref', 'vref'] }], /op-amp "u1" output node "vref" is "vref", a fixed voltage: a loop of voltage sources/],
    ['two op-amp outputs on one node', [{ id: 'u1', type: 'opamp', part: 'tl072', nodes: ['in', 'out', 'out'] }, { id: 'u2', type: 'opamp', part: 'tl072', nodes: ['in', 'out', 'out'] }], /op-amp "u2" output node "out" is also driven by op-amp "u1"/],
    ['op-amp with no feedback', [{ id: 'u1', type: 'opamp', part: 'tl072', nodes: ['in', 'm', 'out'] }, { id: 'r1', type: 'resistor', value: '1k', nodes: ['m', 'vref'] }], /op-amp "u1" has no feedback path from its output "out" to its inverting input "m"/],
    ['output not connected', [{ id: 'r1', type: 'resistor', value: '1k', nodes: ['in', 'gnd'] }], /output node "out" is not connected to any element/],
    ['duplicate element id', [{ id: 'r1', type: 'resistor', value: '1k', nodes: ['in', 'out'] }, { id: 'r1', type: 'resistor', value: '1k', nodes: ['out', 'gnd'] }], /duplicate element id "r1"/],
  ];
  test.each(bad)('%s: one line naming the element and node', (_name, elements, problem) => {
    const message = errorOf(design(elements));
    expect(message.split('\n')).toHaveLength(1);
    expect(message).toMatch(/^d\.json: stages\[0\]/);
    expect(message).toMatch(problem);
  });

  test('a knob that no pot uses is refused, a pot knob is known', () => {
    const elements = [{ id: 'r1', type: 'resistor', value: '1k', nodes: ['in', 'out'] }, { id: 'p1', type: 'pot', value: '10k', knob: 'level', nodes: ['out', 'gnd', 'gnd'] }];
    expect(errorOf(design(elements, {}, { levle: 0.2 }))).toMatch(/knobs\.levle: knob "levle" is not used by any pot, and stages\[0\]\.elements\[1\]\.knob names knob "level"/);
    expect(parseDesignText(design(elements, {}, { level: 0.2 }), 'd.json', parts).knobs.level).toBe(0.2);
  });

  test('the input cannot be a reserved node', () => {
    expect(errorOf(design(EXAMPLE, { input: 'gnd' }))).toMatch(/stages\[0\]\.input: the input cannot be the reserved node "gnd"/);
  });
});
