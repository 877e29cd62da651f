// Modified nodal analysis stamps (src/netlist/assemble.ts -> src/solver/mna.ts) against the
// textbook stamps of Ho, Ruehli & Brennan, "The modified nodal approach to network analysis",
// IEEE Trans. Circuits Syst. 22(6), 1975 (also e.g. Vlach & Singhal, Computer Methods for Circuit
// Analysis and Design, ch. 4): a conductance g between a and b adds g at (a,a), (b,b) and -g at
// (a,b), (b,a), only the diagonal entry when one end is ground; a capacitor is stamped the same way
// with s C; a voltage source V from node k to ground adds a branch-current unknown j with +1 at
// (k, j) and (j, k) and V on the right-hand side of row j.
import { describe, expect, test } from 'vitest';
import { assembleCircuit } from '../../src/netlist/assemble.js';
import { buildMna, type MnaSystem } from '../../src/solver/mna.js';
import { analyseCircuitStage } from '../../src/circuit/circuitStage.js';
import { smallSignalResponse } from '../../src/solver/smallSignal.js';
import type { CircuitStage } from '../../src/design/types.js';
import { expectClose } from '../helpers/expectClose.js';
import { IDEAL_OPAMP } from '../circuit/parts.js';
import { SUPPLY_VOLTS, circuitContext } from './testCircuits.js';

/**
 * in -R1- a; C1 a-gnd; pot P1 (10k linear, knob "drive" at 0.3) across a-w-gnd; R2 w-vref;
 * pot P2 (100k audio, knob "tone" at 0.5) across vcc-w2-gnd; C2 w-w2.
 */
const stage: CircuitStage = {
  id: 'stamps', type: 'circuit', input: 'in', output: 'w',
  elements: [
    { id: 'r1', type: 'resistor', nodes: ['in', 'a'], ohms: 1e3 },
    { id: 'c1', type: 'capacitor', nodes: ['a', 'gnd'], farads: 100e-9 },
    { id: 'p1', type: 'pot', nodes: ['a', 'w', 'gnd'], ohms: 10e3, knob: 'drive', taper: 'linear', reverse: false },
    { id: 'r2', type: 'resistor', nodes: ['w', 'vref'], ohms: 47e3 },
    { id: 'p2', type: 'pot', nodes: ['vcc', 'w2', 'gnd'], ohms: 100e3, knob: 'tone', taper: 'audio', reverse: false },
    { id: 'c2', type: 'capacitor', nodes: ['w', 'w2'], farads: 22e-9 },
  ],
};
const knobs = { drive: 0.3, tone: 0.5 };
const nodeNames = ['in', 'a', 'w', 'vcc', 'w2', 'vref'];
const branchNames = ['branch:in', 'branch:vcc', 'branch:vref'];

// Pot legs: lug 1 to wiper = taper(position) x R. Linear: 0.3 x 10k = 3k, the rest 7k. Audio: 10 %
// of the track at mid rotation (common practice; the law in src/design/taper.ts passes 10 % at 0.5),
// so 10k and 90k.
const conductances: [string, string, number][] = [
  ['in', 'a', 1 / 1e3],
  ['a', 'w', 1 / 3e3],
  ['w', 'gnd', 1 / 7e3],
  ['w', 'vref', 1 / 47e3],
  ['vcc', 'w2', 1 / 10e3],
  ['w2', 'gnd', 1 / 90e3],
];
const capacitors: [string, string, number][] = [
  ['a', 'gnd', 100e-9],
  ['w', 'w2', 22e-9],
];

/** Stamp g between named nodes into an n x n matrix indexed by `index`. */
function stampNamed(matrix: number[][], index: (name: string) => number, a: string, b: string, g: number): void {
  const i = a === 'gnd' ? -1 : index(a);
  const j = b === 'gnd' ? -1 : index(b);
  if (i >= 0) matrix[i][i] += g;
  if (j >= 0) matrix[j][j] += g;
  if (i >= 0 && j >= 0) {
    matrix[i][j] -= g;
    matrix[j][i] -= g;
  }
}

function textbookSystem(system: MnaSystem): { g: number[][]; c: number[][]; bIn: number[]; bConst: number[] } {
  const n = system.size;
  const index = (name: string): number => {
    const k = system.unknownNames.indexOf(name);
    if (k < 0) throw new Error(`no unknown ${name}`);
    return k;
  };
  const g = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const c = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (const [a, b, siemens] of conductances) stampNamed(g, index, a, b, siemens);
  for (const [a, b, farads] of capacitors) stampNamed(c, index, a, b, farads);
  const bIn = new Array<number>(n).fill(0);
  const bConst = new Array<number>(n).fill(0);
  for (const [node, volts] of [['in', null], ['vcc', SUPPLY_VOLTS], ['vref', SUPPLY_VOLTS / 2]] as const) {
    const k = index(node);
    const j = index(`branch:${node}`);
    g[k][j] += 1;
    g[j][k] += 1;
    if (volts === null) bIn[j] = 1;
    else bConst[j] = volts;
  }
  return { g, c, bIn, bConst };
}

/** Solve the complex system (re + j im) x = b (real b) by Gaussian elimination with partial pivoting. */
function solveComplexSystem(re: number[][], im: number[][], b: number[]): { re: number[]; im: number[] } {
  const n = b.length;
  const a = re.map((row, i) => row.map((value, k) => ({ re: value, im: im[i][k] })));
  const x = b.map((value) => ({ re: value, im: 0 }));
  const mul = (p: { re: number; im: number }, q: { re: number; im: number }) => ({ re: p.re * q.re - p.im * q.im, im: p.re * q.im + p.im * q.re });
  const div = (p: { re: number; im: number }, q: { re: number; im: number }) => {
    const d = q.re * q.re + q.im * q.im;
    return { re: (p.re * q.re + p.im * q.im) / d, im: (p.im * q.re - p.re * q.im) / d };
  };
  for (let col = 0; col < n; col++) {
    let best = col;
    for (let row = col + 1; row < n; row++) if (Math.hypot(a[row][col].re, a[row][col].im) > Math.hypot(a[best][col].re, a[best][col].im)) best = row;
    [a[col], a[best]] = [a[best], a[col]];
    [x[col], x[best]] = [x[best], x[col]];
    for (let row = col + 1; row < n; row++) {
      const f = div(a[row][col], a[col][col]);
      for (let k = col; k < n; k++) {
        const t = mul(f, a[col][k]);
        a[row][k] = { re: a[row][k].re - t.re, im: a[row][k].im - t.im };
      }
      const t = mul(f, x[col]);
      x[row] = { re: x[row].re - t.re, im: x[row].im - t.im };
    }
  }
  for (let row = n - 1; row >= 0; row--) {
    let sum = x[row];
    for (let k = row + 1; k < n; k++) {
      const t = mul(a[row][k], x[k]);
      sum = { re: sum.re - t.re, im: sum.im - t.im };
    }
    x[row] = div(sum, a[row][row]);
  }
  return { re: x.map((v) => v.re), im: x.map((v) => v.im) };
}

describe('MNA stamps against the textbook', () => {
  const system = buildMna(assembleCircuit(stage, circuitContext(), knobs));
  const textbook = textbookSystem(system);

  test('unknowns: one per node, then one branch current per voltage source', () => {
    expect([...system.unknownNames].sort()).toEqual([...nodeNames, ...branchNames].sort());
    expect(system.nodeCount).toBe(nodeNames.length);
    expect(system.size).toBe(nodeNames.length + branchNames.length);
  });

  test('resistors, pot legs at their knob positions and voltage sources: G matches entry by entry', () => {
    const n = system.size;
    for (let row = 0; row < n; row++) {
      for (let col = 0; col < n; col++) {
        expectClose(system.conductance[row * n + col], textbook.g[row][col], { rtol: 1e-12, atol: 1e-18 });
      }
    }
  });

  test('source vectors: the input branch carries u, the supply branches 9 V and 4.5 V', () => {
    for (let k = 0; k < system.size; k++) {
      expect(system.bIn[k]).toBe(textbook.bIn[k]);
      expectClose(system.bConst[k], textbook.bConst[k], { rtol: 1e-15 });
    }
  });

  test('capacitors keep their two nodes and value', () => {
    const named = (k: number): string => (k < 0 ? 'gnd' : system.unknownNames[k]);
    const found = Array.from(system.capFarads, (farads, k) => [named(system.capA[k]), named(system.capB[k]), farads]);
    expect(found).toEqual(capacitors);
  });

  test('(G + j w C) solved as a textbook system gives the response smallSignalResponse reports', () => {
    const { operatingPoint } = analyseCircuitStage(stage, circuitContext(), knobs);
    const frequencies = [20, 1000, 20000];
    const response = smallSignalResponse(system, operatingPoint, frequencies);
    const out = system.unknownNames.indexOf('w');
    frequencies.forEach((hz, k) => {
      const omega = 2 * Math.PI * hz;
      const x = solveComplexSystem(textbook.g, textbook.c.map((row) => row.map((farads) => omega * farads)), textbook.bIn);
      expectClose(response[k].re, x.re[out], { rtol: 1e-10, atol: 1e-14 });
      expectClose(response[k].im, x.im[out], { rtol: 1e-10, atol: 1e-14 });
    });
  });
});

describe('pot stamps at the ends and reversed', () => {
  const potStage = (position: number, reverse: boolean): MnaSystem =>
    buildMna(assembleCircuit({
      id: 'pot', type: 'circuit', input: 'in', output: 'o',
      elements: [{ id: 'p', type: 'pot', nodes: ['in', 'o', 'gnd'], ohms: 10e3, knob: 'k', taper: 'linear', reverse }],
    }, circuitContext(), { k: position }));
  const between = (system: MnaSystem, a: string, b: string | null): number => {
    const i = system.unknownNames.indexOf(a);
    if (b === null) {
      // To ground: the diagonal minus the other conductances on the row's nodes.
      let sum = 0;
      for (let k = 0; k < system.nodeCount; k++) sum += system.conductance[i * system.size + k];
      return sum;
    }
    return -system.conductance[i * system.size + system.unknownNames.indexOf(b)];
  };

  test('a reversed linear pot at 0.3 splits as 7k : 3k', () => {
    const system = potStage(0.3, true);
    expectClose(between(system, 'in', 'o'), 1 / 7e3, { rtol: 1e-12 });
    expectClose(between(system, 'o', null), 1 / 3e3, { rtol: 1e-12 });
  });

  test('at a stop the short leg is a few ohms at most, the other the whole track (common practice)', () => {
    const system = potStage(0, false);
    expect(between(system, 'in', 'o')).toBeGreaterThanOrEqual(1 / 5);
    expectClose(between(system, 'o', null), 1 / 10e3, { rtol: 1e-3 });
  });
});

describe('op-amp expansion: controlled-source stamps', () => {
  // Ideal op-amp: a VCCS gm (v+ - v-) into the internal node c, gm / A to ground there, and a unity
  // VCVS from c to the output. Textbook VCCS stamp (current g (va - vb) entering node k): -g at (k, a),
  // +g at (k, b). VCVS v(out) = v(c): a branch unknown j with +1 at (out, j), and row j reading
  // v(out) - v(c) = 0.
  const system = buildMna(assembleCircuit({
    id: 'oa', type: 'circuit', input: 'in', output: 'out',
    elements: [
      { id: 'u1', type: 'opamp', nodes: ['in', 'm', 'out'], opamp: IDEAL_OPAMP },
      { id: 'rf', type: 'resistor', nodes: ['out', 'm'], ohms: 10e3 },
    ],
  }, circuitContext(), {}));
  const n = system.size;
  const at = (row: string, col: string): number => system.conductance[system.unknownNames.indexOf(row) * n + system.unknownNames.indexOf(col)];

  test('the VCCS enters c with equal and opposite weights on v+ and v-', () => {
    const gm = -at('u1#compensation', 'in');
    expect(gm).toBeGreaterThan(0);
    expect(at('u1#compensation', 'm')).toBe(gm);
    // Open-loop gain gm / (gm / A) = A: "infinite" for the ideal part, so its gain error is below 1e-6.
    expect(gm / at('u1#compensation', 'u1#compensation')).toBeGreaterThan(1e6);
  });

  test('the follower branch reads v(out) - v(c) = 0 and its current enters the output node', () => {
    expect(at('branch:out', 'out')).toBe(1);
    expect(at('branch:out', 'u1#compensation')).toBe(-1);
    expect(at('out', 'branch:out')).toBe(1);
    expect(system.bIn[system.unknownNames.indexOf('branch:out')]).toBe(0);
    expect(system.bConst[system.unknownNames.indexOf('branch:out')]).toBe(0);
  });
});
