/**
 * Modified nodal analysis (Ho, Ruehli, Brennan, IEEE Trans. Circuits Syst. 22(6), 1975) of an
 * assembled circuit: unknowns are the node voltages followed by the currents of the voltage-defined
 * branches (sources, op-amp output followers). The system is
 *
 *   (G + s Cm) w = bIn u + bConst + Ni i(Nv w)
 *
 * with G the conductances, sources and controlled sources; Cm the capacitors; u the stage input;
 * i the nonlinear devices' port currents, injected by Ni and sensed by Nv. See docs/models.md, "Nodal analysis".
 */
import { GROUND, type AssembledCircuit, type OpampNoise } from '../netlist/assemble.js';
import { PORT_COUNT, type DeviceKind } from '../netlist/deviceKind.js';

export interface MnaSystem {
  stageId: string;
  /** Unknowns: node voltages then branch currents. */
  size: number;
  /** Names of the unknowns (node names, then `branch:<node>`), for messages. */
  unknownNames: string[];
  nodeCount: number;
  /** n x n row-major. */
  conductance: Float64Array;
  /** Capacitor incidence: capacitor k between `capA[k]` and `capB[k]` (GROUND = -1), value `capFarads[k]`. */
  capA: Int32Array;
  capB: Int32Array;
  capFarads: Float64Array;
  capIds: string[];
  bIn: Float64Array;
  bConst: Float64Array;
  /** Ports: voltage sensed between voltA and voltB, current from `from` to `to` through the device. */
  portCount: number;
  portVoltA: Int32Array;
  portVoltB: Int32Array;
  portFrom: Int32Array;
  portTo: Int32Array;
  /** Devices: kind, first port, constants at paramStart[d]... */
  deviceKinds: DeviceKind[];
  deviceIds: string[];
  devicePortStart: Int32Array;
  deviceParamStart: Int32Array;
  params: Float64Array;
  outputIndex: number;
  inputIndex: number;
  /** Thermal noise: conductance `siemens` between a and b, of part `element` (solver/noise.ts). */
  noisyConductances: { a: number; b: number; siemens: number; element: string }[];
  opampNoise: OpampNoise[];
}

function add(matrix: Float64Array, n: number, row: number, col: number, value: number): void {
  if (row !== GROUND && col !== GROUND) matrix[row * n + col] += value;
}

function addAt(vector: Float64Array, index: number, value: number): void {
  if (index !== GROUND) vector[index] += value;
}

/** Stamp a conductance between a and b. */
export function stampConductance(matrix: Float64Array, n: number, a: number, b: number, siemens: number): void {
  add(matrix, n, a, a, siemens);
  add(matrix, n, b, b, siemens);
  add(matrix, n, a, b, -siemens);
  add(matrix, n, b, a, -siemens);
}

/** Stamp a transconductance: `siemens` (v(ctrlA) - v(ctrlB)) flowing from `from` to `to` through it. */
export function stampTransconductance(matrix: Float64Array, n: number, from: number, to: number, ctrlA: number, ctrlB: number, siemens: number): void {
  add(matrix, n, from, ctrlA, siemens);
  add(matrix, n, from, ctrlB, -siemens);
  add(matrix, n, to, ctrlA, -siemens);
  add(matrix, n, to, ctrlB, siemens);
}

export function buildMna(circuit: AssembledCircuit): MnaSystem {
  const nodeCount = circuit.nodeNames.length;
  const branchCount = circuit.sources.length + circuit.followers.length;
  const n = nodeCount + branchCount;
  const conductance = new Float64Array(n * n);
  const bIn = new Float64Array(n);
  const bConst = new Float64Array(n);
  const unknownNames = [...circuit.nodeNames];

  for (const { a, b, siemens } of circuit.conductances) stampConductance(conductance, n, a, b, siemens);
  for (const t of circuit.transconductances) stampTransconductance(conductance, n, t.from, t.to, t.ctrlA, t.ctrlB, t.siemens);
  let branch = nodeCount;
  for (const source of circuit.sources) {
    // Branch current j leaves the node into the source; the branch row reads v(node) = V.
    add(conductance, n, source.node, branch, 1);
    add(conductance, n, branch, source.node, 1);
    if (source.kind === 'input') bIn[branch] = 1;
    else bConst[branch] = source.volts;
    unknownNames.push(`branch:${circuit.nodeNames[source.node]}`);
    branch++;
  }
  for (const follower of circuit.followers) {
    add(conductance, n, follower.out, branch, 1);
    add(conductance, n, branch, follower.out, 1);
    add(conductance, n, branch, follower.control, -1);
    unknownNames.push(`branch:${circuit.nodeNames[follower.out]}`);
    branch++;
  }

  const ports = circuit.devices.flatMap((device) => device.ports);
  const devicePortStart = new Int32Array(circuit.devices.length);
  const deviceParamStart = new Int32Array(circuit.devices.length);
  let portIndex = 0;
  let paramIndex = 0;
  circuit.devices.forEach((device, d) => {
    if (device.ports.length !== PORT_COUNT[device.kind]) throw new Error(`internal: device ${device.elementId} has ${device.ports.length} ports`);
    devicePortStart[d] = portIndex;
    deviceParamStart[d] = paramIndex;
    portIndex += device.ports.length;
    paramIndex += device.params.length;
  });

  return {
    stageId: circuit.stageId,
    size: n,
    unknownNames,
    nodeCount,
    conductance,
    capA: Int32Array.from(circuit.capacitors, (c) => c.a),
    capB: Int32Array.from(circuit.capacitors, (c) => c.b),
    capFarads: Float64Array.from(circuit.capacitors, (c) => c.farads),
    capIds: circuit.capacitors.map((c) => c.elementId),
    bIn,
    bConst,
    portCount: ports.length,
    portVoltA: Int32Array.from(ports, (p) => p.voltA),
    portVoltB: Int32Array.from(ports, (p) => p.voltB),
    portFrom: Int32Array.from(ports, (p) => p.from),
    portTo: Int32Array.from(ports, (p) => p.to),
    deviceKinds: circuit.devices.map((d) => d.kind),
    deviceIds: circuit.devices.map((d) => d.elementId),
    devicePortStart,
    deviceParamStart,
    params: Float64Array.from(circuit.devices.flatMap((d) => d.params)),
    outputIndex: circuit.outputNode,
    inputIndex: circuit.inputNode,
    noisyConductances: circuit.conductances.flatMap(({ a, b, siemens, noisyElement }) => (noisyElement === undefined ? [] : [{ a, b, siemens, element: noisyElement }])),
    opampNoise: circuit.opampNoise,
  };
}

/** Port voltages Nv w. */
export function portVoltages(system: MnaSystem, w: Float64Array, out: Float64Array): void {
  for (let k = 0; k < system.portCount; k++) {
    const a = system.portVoltA[k];
    const b = system.portVoltB[k];
    out[k] = (a === GROUND ? 0 : w[a]) - (b === GROUND ? 0 : w[b]);
  }
}

/** rhs += Ni i: each port current leaves `from` and enters `to`. */
export function injectPortCurrents(system: MnaSystem, current: Float64Array, rhs: Float64Array, scale = 1): void {
  for (let k = 0; k < system.portCount; k++) {
    addAt(rhs, system.portFrom[k], -scale * current[k]);
    addAt(rhs, system.portTo[k], scale * current[k]);
  }
}

/** matrix -= Ni J Nv for a device-block-diagonal Jacobian (`jacobian` as written by `evaluateAll`). */
export function stampDeviceJacobian(system: MnaSystem, jacobian: Float64Array, jacobianStart: Int32Array, matrix: Float64Array, scale = 1): void {
  const n = system.size;
  system.deviceKinds.forEach((kind, d) => {
    const k = PORT_COUNT[kind];
    const first = system.devicePortStart[d];
    for (let r = 0; r < k; r++) {
      for (let c = 0; c < k; c++) {
        const g = scale * jacobian[jacobianStart[d] + r * k + c];
        if (g === 0) continue;
        const row = first + r;
        const col = first + c;
        // Current of port `row` = g v(port col): a transconductance from portFrom[row] to portTo[row].
        stampTransconductance(matrix, n, system.portFrom[row], system.portTo[row], system.portVoltA[col], system.portVoltB[col], g);
      }
    }
  });
}

/** Offsets of each device's Jacobian block in a packed array, and its total length. */
export function jacobianLayout(system: MnaSystem): { starts: Int32Array; length: number } {
  const starts = new Int32Array(system.deviceKinds.length);
  let length = 0;
  system.deviceKinds.forEach((kind, d) => {
    starts[d] = length;
    length += PORT_COUNT[kind] * PORT_COUNT[kind];
  });
  return { starts, length };
}
