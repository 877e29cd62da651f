/**
 * The nodal DK-method (Yeh, Abel, Smith, "Automated physical modeling of nonlinear audio circuits
 * for real-time audio effects, Part I", IEEE TASLP 18(4), 2010; multi-port devices: Holters &
 * Zoelzer, EUSIPCO 2015). Capacitors are discretised by the trapezoidal rule: a conductance 2C/T
 * beside a history current, which is the state. Eliminating the linear part once leaves, per sample,
 *
 *   p    = D x[n-1] + E u[n] + e0                 (port voltages before the devices respond)
 *   v    = p + F i,   i = f(v)                    (solved per block of coupled ports)
 *   x[n] = A x[n-1] + B u[n] + C i + b0
 *   y[n] = G x[n-1] + H u[n] + K i + h0
 *
 * Ports are grouped into blocks (strongly connected components of "the voltage of one depends on the
 * current of another" through F, devices kept whole) and ordered so each block only depends on the
 * blocks before it: the circuit splits where an ideal source (an op-amp output) drives it. See
 * docs/models.md, "Discretisation".
 */
import { UserError } from '../errors.js';
import { GROUND } from '../netlist/assemble.js';
import { factorLu, solveLu } from './denseLu.js';
import { PORT_COUNT } from '../netlist/deviceKind.js';
import { stampConductance, type MnaSystem } from './mna.js';
import type { OperatingPoint } from './operatingPoint.js';

/** F entries below this fraction of its largest entry are rounding, not coupling. */
const COUPLING_THRESHOLD = 1e-10;

export interface DkModel {
  stageId: string;
  states: number;
  ports: number;
  /** Row-major: A (states x states), B, b0 (states), C (states x ports), D (ports x states), E, e0 (ports), F (ports x ports), G (states), K (ports). */
  a: Float64Array;
  b: Float64Array;
  b0: Float64Array;
  c: Float64Array;
  d: Float64Array;
  e: Float64Array;
  e0: Float64Array;
  f: Float64Array;
  g: Float64Array;
  h: number;
  h0: number;
  k: Float64Array;
  /** Devices in solve order (indices into the MnaSystem's devices); ports are renumbered to follow them. */
  deviceOrder: Int32Array;
  /** Port index (in the MnaSystem) of each solve-order port. */
  portOrder: Int32Array;
  /** Blocks as ranges of solve-order ports: block j is [blockStart[j], blockStart[j + 1]). */
  blockStart: Int32Array;
  /** The state, port currents and output at rest (the operating point). */
  restState: Float64Array;
  restPortAmps: Float64Array;
  restOutput: number;
}

function selectDifference(vector: Float64Array, a: number, b: number): number {
  return (a === GROUND ? 0 : vector[a]) - (b === GROUND ? 0 : vector[b]);
}

/** Tarjan's strongly connected components of devices, in dependency order (sources first). */
function orderDeviceBlocks(system: MnaSystem, f: Float64Array): number[][] {
  const devices = system.deviceKinds.length;
  const p = system.portCount;
  let largest = 0;
  for (let k = 0; k < f.length; k++) largest = Math.max(largest, Math.abs(f[k]));
  const threshold = largest * COUPLING_THRESHOLD;
  const portsOf = (d: number): number[] => Array.from({ length: PORT_COUNT[system.deviceKinds[d]] }, (_, k) => system.devicePortStart[d] + k);
  // depends[d]: devices whose currents move device d's port voltages.
  const depends = Array.from({ length: devices }, (_, d) => {
    const sources: number[] = [];
    for (let other = 0; other < devices; other++) {
      if (other === d) continue;
      if (portsOf(d).some((row) => portsOf(other).some((col) => Math.abs(f[row * p + col]) > threshold))) sources.push(other);
    }
    return sources;
  });
  const index = new Int32Array(devices).fill(-1);
  const low = new Int32Array(devices);
  const onStack = new Uint8Array(devices);
  const stack: number[] = [];
  const blocks: number[][] = [];
  let counter = 0;
  const visit = (d: number): void => {
    index[d] = low[d] = counter++;
    stack.push(d);
    onStack[d] = 1;
    for (const other of depends[d]) {
      if (index[other] < 0) {
        visit(other);
        low[d] = Math.min(low[d], low[other]);
      } else if (onStack[other]) low[d] = Math.min(low[d], index[other]);
    }
    if (low[d] === index[d]) {
      const block: number[] = [];
      let member: number;
      do {
        member = stack.pop() as number;
        onStack[member] = 0;
        block.push(member);
      } while (member !== d);
      blocks.push(block.sort((x, y) => x - y));
    }
  };
  for (let d = 0; d < devices; d++) if (index[d] < 0) visit(d);
  // Visiting dependencies first emits each block after every block it depends on.
  return blocks;
}

/** Build the DK model of `system` at `sampleRate`, starting at rest at `operatingPoint`. */
export function buildDkModel(system: MnaSystem, operatingPoint: OperatingPoint, sampleRate: number): DkModel {
  const n = system.size;
  const states = system.capFarads.length;
  const p0 = system.portCount;
  const capConductance = Float64Array.from(system.capFarads, (c) => (2 * c) * sampleRate);
  const matrix = Float64Array.from(system.conductance);
  for (let k = 0; k < states; k++) stampConductance(matrix, n, system.capA[k], system.capB[k], capConductance[k]);
  const pivots = new Int32Array(n);
  if (!factorLu(matrix, n, pivots)) {
    throw new UserError(`stage "${system.stageId}": the circuit's equations are singular (a node with no path to ground, or a loop of sources)`);
  }
  // Columns of S [Bx | bIn | bConst | Ni]: the unknowns' response to each state, the input, the supplies and each port current.
  const solveColumn = (fill: (column: Float64Array) => void): Float64Array => {
    const column = new Float64Array(n);
    fill(column);
    solveLu(matrix, n, pivots, column);
    return column;
  };
  const put = (column: Float64Array, index: number, value: number): void => {
    if (index !== GROUND) column[index] += value;
  };
  const stateColumns = Array.from({ length: states }, (_, k) =>
    solveColumn((col) => {
      put(col, system.capA[k], 1);
      put(col, system.capB[k], -1);
    }),
  );
  const inputColumn = solveColumn((col) => col.set(system.bIn));
  const constColumn = solveColumn((col) => col.set(system.bConst));
  const portColumns = Array.from({ length: p0 }, (_, k) =>
    solveColumn((col) => {
      put(col, system.portFrom[k], -1);
      put(col, system.portTo[k], 1);
    }),
  );
  // Selections: capacitor voltages Nx w, port voltages Nv w, output No w.
  const capVolts = (w: Float64Array, k: number): number => selectDifference(w, system.capA[k], system.capB[k]);
  const portVolts = (w: Float64Array, k: number): number => selectDifference(w, system.portVoltA[k], system.portVoltB[k]);
  const outVolts = (w: Float64Array): number => selectDifference(w, system.outputIndex, GROUND);

  const fFull = new Float64Array(p0 * p0);
  for (let row = 0; row < p0; row++) for (let col = 0; col < p0; col++) fFull[row * p0 + col] = portVolts(portColumns[col], row);
  const blocks = orderDeviceBlocks(system, fFull);
  const deviceOrder = Int32Array.from(blocks.flat());
  const portOrder = Int32Array.from([...deviceOrder].flatMap((d) => Array.from({ length: PORT_COUNT[system.deviceKinds[d]] }, (_, k) => system.devicePortStart[d] + k)));
  const blockStart = new Int32Array(blocks.length + 1);
  blocks.forEach((block, j) => {
    blockStart[j + 1] = blockStart[j] + block.reduce((sum, d) => sum + PORT_COUNT[system.deviceKinds[d]], 0);
  });
  const portColumn = (k: number): Float64Array => portColumns[portOrder[k]];
  const portRow = (w: Float64Array, k: number): number => portVolts(w, portOrder[k]);

  const model: DkModel = {
    stageId: system.stageId,
    states,
    ports: p0,
    a: new Float64Array(states * states),
    b: new Float64Array(states),
    b0: new Float64Array(states),
    c: new Float64Array(states * p0),
    d: new Float64Array(p0 * states),
    e: new Float64Array(p0),
    e0: new Float64Array(p0),
    f: new Float64Array(p0 * p0),
    g: new Float64Array(states),
    h: outVolts(inputColumn),
    h0: outVolts(constColumn),
    k: new Float64Array(p0),
    deviceOrder,
    portOrder,
    blockStart,
    restState: new Float64Array(states),
    restPortAmps: new Float64Array(p0),
    restOutput: 0,
  };
  // x[n] = 2 Gc Nx w - x[n-1]  (trapezoidal history update).
  for (let row = 0; row < states; row++) {
    const twoG = 2 * capConductance[row];
    for (let col = 0; col < states; col++) model.a[row * states + col] = twoG * capVolts(stateColumns[col], row) - (row === col ? 1 : 0);
    model.b[row] = twoG * capVolts(inputColumn, row);
    model.b0[row] = twoG * capVolts(constColumn, row);
    for (let col = 0; col < p0; col++) model.c[row * p0 + col] = twoG * capVolts(portColumn(col), row);
    model.g[row] = outVolts(stateColumns[row]);
  }
  for (let row = 0; row < p0; row++) {
    for (let col = 0; col < states; col++) model.d[row * states + col] = portRow(stateColumns[col], row);
    model.e[row] = portRow(inputColumn, row);
    model.e0[row] = portRow(constColumn, row);
    for (let col = 0; col < p0; col++) model.f[row * p0 + col] = portRow(portColumn(col), row);
    model.k[row] = outVolts(portColumn(row));
  }
  // At rest every capacitor holds its DC voltage with no current, so its history is x = (2C/T) v.
  for (let k = 0; k < states; k++) model.restState[k] = capConductance[k] * capVolts(operatingPoint.unknowns, k);
  for (let k = 0; k < p0; k++) model.restPortAmps[k] = operatingPoint.portAmps[portOrder[k]];
  let rest = model.h0;
  for (let k = 0; k < states; k++) rest += model.g[k] * model.restState[k];
  for (let k = 0; k < p0; k++) rest += model.k[k] * model.restPortAmps[k];
  model.restOutput = rest;
  return model;
}
