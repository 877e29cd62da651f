// Tests for src/circuit/diodeNodeSolver.ts, diodeNodeTable.ts and diodeNode.ts (the implicit
// diode-node equation G v + i_d(v) = p shared by the clipper and the gain stage).
import { describe, expect, test } from 'vitest';
import { diodeString } from '../../src/circuit/diode.js';
import { DiodeNode, designDiodeNode, TABLE_TOLERANCE_VOLTS } from '../../src/circuit/diodeNode.js';
import { DiodeNodeSolver, TOLERANCE_VOLTS, type DiodeNetwork } from '../../src/circuit/diodeNodeSolver.js';
import { buildDiodeNodeTable, tableErrorVolts, tableVolts } from '../../src/circuit/diodeNodeTable.js';
import { expectClose } from '../helpers/expectClose.js';
import { D1N34A, D1N4148, RED_LED } from './parts.js';

const SI_PAIR: DiodeNetwork = { up: diodeString(D1N4148, 1, 25), down: diodeString(D1N4148, 1, 25) };
const MIXED: DiodeNetwork = { up: diodeString(RED_LED, 1, 25), down: diodeString(D1N34A, 2, 25) };

/** Residual of the node equation with the exact string model, using the string's own v(i). */
function residualAmps(network: DiodeNetwork, conductance: number, v: number, p: number): number {
  // Invert the forward string's v(i) = N ln(i/Is + 1) + R i by bisection (independent of the solver).
  const forward = v >= 0 ? network.up : network.down;
  const reverse = v >= 0 ? network.down : network.up;
  const magnitude = Math.abs(v);
  let current = 0;
  if (forward) {
    let lo = 0;
    let hi = magnitude / Math.max(forward.seriesOhms, 1e-12) + 1;
    for (let k = 0; k < 200; k++) {
      const mid = 0.5 * (lo + hi);
      const volts = forward.emissionVolts * Math.log1p(mid / forward.saturationAmps) + forward.seriesOhms * mid;
      if (volts > magnitude) hi = mid;
      else lo = mid;
    }
    current = 0.5 * (lo + hi);
  }
  if (reverse) current += reverse.saturationAmps * (1 - Math.exp(-magnitude / reverse.emissionVolts));
  return conductance * v + Math.sign(v) * current - p;
}

describe('Newton solver', () => {
  test('solutions satisfy the node equation (Shockley with series resistance)', () => {
    for (const network of [SI_PAIR, MIXED]) {
      const solver = new DiodeNodeSolver(network, 1e-3);
      for (const p of [-0.5, -1e-2, -1e-4, -1e-9, 0, 1e-9, 1e-4, 1e-2, 0.5]) {
        const v = solver.solve(p);
        // Residual scale: the node's conductance at v times the voltage tolerance.
        expect(Math.abs(residualAmps(network, 1e-3, v, p)), `p=${p}`).toBeLessThan(1e-9 + Math.abs(p) * 1e-9);
      }
    }
  });

  test('the bisection fallback is taken when Newton is cut short, and gives the same root', () => {
    const newton = new DiodeNodeSolver(SI_PAIR, 1e-3);
    const forced = new DiodeNodeSolver(SI_PAIR, 1e-3, 1); // one Newton step, then bisection
    for (const p of [3e-3, -7e-3, 0.2]) {
      expectClose(forced.solve(p), newton.solve(p), { atol: 10 * TOLERANCE_VOLTS });
    }
    expect(forced.fallbacks).toBe(3);
    expect(newton.fallbacks).toBe(0);
  });

  test('finite results for extreme drives', () => {
    const solver = new DiodeNodeSolver(MIXED, 1e-6);
    for (const p of [1e6, -1e6, 1e-300, -1e-300, 5e-324]) expect(Number.isFinite(solver.solve(p))).toBe(true);
  });
});

describe('table', () => {
  test('a symmetric network gives an odd table (to rounding)', () => {
    const table = buildDiodeNodeTable(SI_PAIR, 1e-2, 0.05, 1024, 5e-3);
    const half = table.intervals / 2;
    // An odd network has an odd map g(-p) = -g(p) (Shockley pair); the grid values are solved exactly
    // odd, and the lines through them in absolute coordinates only add rounding (1e-14 V, -280 dB).
    for (let m = 1; m < half; m++) {
      for (const f of [0, 0.25, 0.5]) expectClose(tableVolts(table, half + m + f), -tableVolts(table, half - m - f), { atol: 1e-14 });
    }
  });

  test('designs meet the table tolerance or fall back to Newton', () => {
    const cases: [DiodeNetwork, number, number | null, number][] = [
      [SI_PAIR, 1 / 2200, 10e-9, 384000],
      [SI_PAIR, 1 / 2200, null, 48000],
      [MIXED, 1 / 10e3, 1e-9, 96000],
      [SI_PAIR, 1 / 500e3, 100e-12, 384000],
    ];
    let tabulated = 0;
    for (const [network, siemens, cap, fs] of cases) {
      const design = designDiodeNode(network, siemens, cap, fs, 9 * siemens);
      if (design.table !== null) {
        tabulated++;
        const conductance = design.companionSiemens + design.resistiveSiemens;
        expect(tableErrorVolts(design.table, network, conductance)).toBeLessThanOrEqual(TABLE_TOLERANCE_VOLTS);
      }
    }
    expect(tabulated).toBe(cases.length); // all of these ordinary designs are fast
  });

  test('a design no table can serve runs on Newton and still solves the node', () => {
    // Feedback diodes across 500k with 100 pF at 48 kHz: the knee is far narrower than any grid step.
    const design = designDiodeNode(SI_PAIR, 1 / 500e3, 100e-12, 48000, 9 / 4700);
    expect(design.table).toBeNull();
    const block = new Float64Array([1e-5, 1e-4, -1e-3, 0]);
    new DiodeNode(design, 'table').process(block, 1);
    for (const v of block) expect(Number.isFinite(v)).toBe(true);
    expect(block[2]).toBeLessThan(-0.4); // one forward drop the negative way
  });

  test('table and Newton runs of a node agree within the table tolerance', () => {
    const design = designDiodeNode(MIXED, 1 / 4700, 22e-9, 192000, 9 / 4700);
    expect(design.table).not.toBeNull();
    const drive = new Float64Array(4000);
    for (let i = 0; i < drive.length; i++) drive[i] = (3 / 4700) * Math.sin(i * 0.01) + (1 / 4700) * Math.sin(i * 0.137);
    const viaTable = drive.slice();
    const viaNewton = drive.slice();
    new DiodeNode(design, 'table').process(viaTable, 1);
    new DiodeNode(design, 'newton').process(viaNewton, 1);
    for (let i = 0; i < drive.length; i++) expectClose(viaTable[i], viaNewton[i], { atol: 10 * TABLE_TOLERANCE_VOLTS });
  });

  test('block boundaries do not change the result', () => {
    const design = designDiodeNode(SI_PAIR, 1 / 2200, 10e-9, 384000, 9 / 2200);
    const drive = new Float64Array(1000);
    for (let i = 0; i < drive.length; i++) drive[i] = (4 / 2200) * Math.sin(i * 0.02);
    const whole = drive.slice();
    new DiodeNode(design, 'table').process(whole, 1);
    const pieces = drive.slice();
    const node = new DiodeNode(design, 'table');
    for (const [from, to] of [[0, 1], [1, 333], [333, 334], [334, 1000]]) node.process(pieces.subarray(from, to), 1);
    expect(pieces).toEqual(whole);
  });
});
