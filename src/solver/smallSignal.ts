/**
 * Small-signal response of the analog circuit: every nonlinear device linearised at the operating
 * point (its Jacobian there), the MNA system (G - Ni J Nv + j w Cm) w = bIn solved at s = j w for a
 * unit input. This is the circuit's own response, not that of its discretisation.
 */
import { UserError } from '../errors.js';
import { GROUND } from '../netlist/assemble.js';
import { factorLu, solveComplex, solveLu } from './denseLu.js';
import { stampConductance, stampDeviceJacobian, jacobianLayout, type MnaSystem } from './mna.js';
import type { OperatingPoint } from './operatingPoint.js';

export interface ComplexGain {
  re: number;
  im: number;
}

/** The linearised system G - Ni J Nv (devices at the operating point) and the capacitance matrix Cm: Y(j w) = real + j w capacitance. */
export function linearisedMatrices(system: MnaSystem, operatingPoint: OperatingPoint): { real: Float64Array; capacitance: Float64Array } {
  const n = system.size;
  const real = Float64Array.from(system.conductance);
  stampDeviceJacobian(system, operatingPoint.jacobian, jacobianLayout(system).starts, real);
  const capacitance = new Float64Array(n * n);
  for (let k = 0; k < system.capFarads.length; k++) stampConductance(capacitance, n, system.capA[k], system.capB[k], system.capFarads[k]);
  return { real, capacitance };
}

/** The linearised system's unknowns for a unit input at each frequency (hertz). */
function solveSmallSignal(system: MnaSystem, operatingPoint: OperatingPoint, frequenciesHz: readonly number[]): { re: Float64Array; im: Float64Array }[] {
  const n = system.size;
  const { real, capacitance } = linearisedMatrices(system, operatingPoint);
  return frequenciesHz.map((hz) => {
    const omega = 2 * Math.PI * hz;
    const re = Float64Array.from(system.bIn);
    const im = new Float64Array(n);
    if (!solveComplex(Float64Array.from(real), capacitance.map((c) => c * omega), n, re, im)) {
      throw new UserError(`stage "${system.stageId}": the circuit's small-signal system is singular at ${hz} Hz`);
    }
    return { re, im };
  });
}

/** Output over input of the linearised circuit at each frequency (hertz). */
export function smallSignalResponse(system: MnaSystem, operatingPoint: OperatingPoint, frequenciesHz: readonly number[]): ComplexGain[] {
  const out = system.outputIndex;
  return solveSmallSignal(system, operatingPoint, frequenciesHz).map(({ re, im }) => (out === GROUND ? { re: 0, im: 0 } : { re: re[out], im: im[out] }));
}

/** |Z| the circuit shows its input source at each frequency, ohms (the source's branch current for 1 V). */
export function smallSignalInputOhms(system: MnaSystem, operatingPoint: OperatingPoint, frequenciesHz: readonly number[]): number[] {
  // The input source is the first branch (assemble.ts adds it before any other source).
  const branch = system.nodeCount;
  return solveSmallSignal(system, operatingPoint, frequenciesHz).map(({ re, im }) => 1 / Math.hypot(re[branch], im[branch]));
}

/**
 * Sum of the open-circuit time constants, sum_k C_k R_k0, where R_k0 is the resistance the linearised
 * circuit shows capacitor k with every other capacitor open and the input shorted. It equals the
 * first-order coefficient a1 of the circuit's denominator 1 + a1 s + ... (zero-value time-constant
 * analysis, e.g. Sedra & Smith, Microelectronic Circuits, section on open-circuit time constants),
 * an upper bound on the slowest time constant: how long a tone run must settle.
 */
export function openCircuitTimeConstantSum(system: MnaSystem, operatingPoint: OperatingPoint): number {
  const n = system.size;
  const matrix = Float64Array.from(system.conductance);
  stampDeviceJacobian(system, operatingPoint.jacobian, jacobianLayout(system).starts, matrix);
  const pivots = new Int32Array(n);
  if (!factorLu(matrix, n, pivots)) return 0;
  let sum = 0;
  for (let k = 0; k < system.capFarads.length; k++) {
    const a = system.capA[k];
    const b = system.capB[k];
    const probe = new Float64Array(n);
    if (a !== GROUND) probe[a] += 1;
    if (b !== GROUND) probe[b] -= 1;
    solveLu(matrix, n, pivots, probe);
    const ohms = (a === GROUND ? 0 : probe[a]) - (b === GROUND ? 0 : probe[b]);
    sum += system.capFarads[k] * Math.abs(ohms);
  }
  return sum;
}
