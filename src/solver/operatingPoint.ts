/**
 * DC operating point: the MNA equations with capacitors open and the input at 0 V, solved by damped
 * Newton-Raphson; when that fails from a cold start, by source stepping (the supplies and op-amp rails
 * ramped from zero, each step warm-started from the last; e.g. Najm, Circuit Simulation, Wiley 2010,
 * ch. 3). It sets a render's initial state (it starts at rest) and gives `check` every node's bias.
 */
import { UserError } from '../errors.js';
import { factorLu, solveLu } from './denseLu.js';
import { evaluateDevice } from './devices.js';
import { injectPortCurrents, jacobianLayout, portVoltages, stampDeviceJacobian, type MnaSystem } from './mna.js';

export interface OperatingPoint {
  /** MNA unknowns at rest: node voltages, then branch currents. */
  unknowns: Float64Array;
  portVolts: Float64Array;
  portAmps: Float64Array;
  /** Device Jacobian at rest, packed per device (see `jacobianLayout`). */
  jacobian: Float64Array;
}

/** Newton iterations per solve before it counts as failed. */
const MAX_ITERATIONS = 200;
/** Converged when the last full Newton step moved no unknown by more than this (volts or amperes). */
const TOLERANCE = 1e-10;
/** Largest change of any port voltage per iteration, volts: keeps exponentials from overshooting. */
const MAX_PORT_STEP_VOLTS = 0.25;
/** Source stepping: first and smallest fraction of the supply added per step. */
const FIRST_SUPPLY_STEP = 0.1;
const MIN_SUPPLY_STEP = 1e-4;

/** Evaluates every device at the port voltages of `unknowns`. */
export class DeviceEvaluator {
  readonly portVolts: Float64Array;
  readonly portAmps: Float64Array;
  readonly jacobian: Float64Array;
  readonly jacobianStart: Int32Array;

  constructor(private readonly system: MnaSystem) {
    const layout = jacobianLayout(system);
    this.portVolts = new Float64Array(system.portCount);
    this.portAmps = new Float64Array(system.portCount);
    this.jacobian = new Float64Array(layout.length);
    this.jacobianStart = layout.starts;
  }

  evaluate(unknowns: Float64Array): void {
    const s = this.system;
    portVoltages(s, unknowns, this.portVolts);
    for (let d = 0; d < s.deviceKinds.length; d++) {
      evaluateDevice(s.deviceKinds[d], s.params, s.deviceParamStart[d], this.portVolts, this.portAmps, s.devicePortStart[d], this.jacobian, this.jacobianStart[d]);
    }
  }
}

/** Newton on G w = bConst + Ni i(Nv w) from `start` (overwritten with the result); true when converged. */
function newtonDc(system: MnaSystem, start: Float64Array): boolean {
  const n = system.size;
  const devices = new DeviceEvaluator(system);
  const matrix = new Float64Array(n * n);
  const step = new Float64Array(n);
  const stepPorts = new Float64Array(system.portCount);
  const pivots = new Int32Array(n);
  const w = start;
  for (let iteration = 0; iteration < MAX_ITERATIONS; iteration++) {
    devices.evaluate(w);
    // Residual r = bConst + Ni i - G w; Newton step solves (G - Ni J Nv) step = r.
    step.set(system.bConst);
    injectPortCurrents(system, devices.portAmps, step);
    for (let row = 0; row < n; row++) {
      let sum = 0;
      for (let col = 0; col < n; col++) sum += system.conductance[row * n + col] * w[col];
      step[row] -= sum;
    }
    matrix.set(system.conductance);
    stampDeviceJacobian(system, devices.jacobian, devices.jacobianStart, matrix);
    if (!factorLu(matrix, n, pivots)) return false;
    solveLu(matrix, n, pivots, step);
    portVoltages(system, step, stepPorts);
    let largestPortStep = 0;
    for (let k = 0; k < stepPorts.length; k++) largestPortStep = Math.max(largestPortStep, Math.abs(stepPorts[k]));
    const damping = largestPortStep > MAX_PORT_STEP_VOLTS ? MAX_PORT_STEP_VOLTS / largestPortStep : 1;
    let largestStep = 0;
    for (let k = 0; k < n; k++) {
      w[k] += damping * step[k];
      largestStep = Math.max(largestStep, Math.abs(step[k]));
    }
    if (!w.every(Number.isFinite)) return false;
    if (damping === 1 && largestStep < TOLERANCE * (1 + Math.max(...w.map(Math.abs)))) return true;
  }
  return false;
}

/**
 * The operating point of the system `build(1)`; `build(scale)` assembles it with the supplies and
 * rails scaled by `scale`, for source stepping. Throws a UserError when no operating point is found.
 */
export function solveOperatingPoint(build: (supplyScale: number) => MnaSystem): OperatingPoint {
  const system = build(1);
  let w = new Float64Array(system.size);
  if (!newtonDc(system, w)) {
    w = new Float64Array(system.size);
    let scale = 0;
    let increment = FIRST_SUPPLY_STEP;
    while (scale < 1) {
      const next = Math.min(1, scale + increment);
      const trial = Float64Array.from(w);
      if (newtonDc(build(next), trial)) {
        w = trial;
        scale = next;
        increment = Math.min(FIRST_SUPPLY_STEP, increment * 2);
      } else {
        increment /= 2;
        if (increment < MIN_SUPPLY_STEP) {
          throw new UserError(`stage "${system.stageId}": no DC operating point found (Newton with source stepping stalled at ${(scale * 100).toFixed(2)} % of the supply); check the bias network`);
        }
      }
    }
  }
  const devices = new DeviceEvaluator(system);
  devices.evaluate(w);
  return { unknowns: w, portVolts: devices.portVolts, portAmps: devices.portAmps, jacobian: devices.jacobian };
}
