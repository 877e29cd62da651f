/**
 * Small-signal response of the analog circuit: every nonlinear device linearised at the operating
 * point (its Jacobian there), the MNA system (G - Ni J Nv + j w Cm) w = bIn solved at s = j w for a
 * unit input. This is the circuit's own response, not that of its discretisation.
 */
import { UserError } from '../errors.js';
import { GROUND } from '../netlist/assemble.js';
import { solveComplex } from './denseLu.js';
import { stampConductance, stampDeviceJacobian, jacobianLayout, type MnaSystem } from './mna.js';
import type { OperatingPoint } from './operatingPoint.js';

export interface ComplexGain {
  re: number;
  im: number;
}

/** Output over input of the linearised circuit at each frequency (hertz). */
export function smallSignalResponse(system: MnaSystem, operatingPoint: OperatingPoint, frequenciesHz: readonly number[]): ComplexGain[] {
  const n = system.size;
  const real = Float64Array.from(system.conductance);
  stampDeviceJacobian(system, operatingPoint.jacobian, jacobianLayout(system).starts, real);
  const capacitance = new Float64Array(n * n);
  for (let k = 0; k < system.capFarads.length; k++) stampConductance(capacitance, n, system.capA[k], system.capB[k], system.capFarads[k]);
  return frequenciesHz.map((hz) => {
    if (system.outputIndex === GROUND) return { re: 0, im: 0 };
    const omega = 2 * Math.PI * hz;
    const imag = capacitance.map((c) => c * omega);
    const bRe = Float64Array.from(system.bIn);
    const bIm = new Float64Array(n);
    if (!solveComplex(Float64Array.from(real), imag, n, bRe, bIm)) {
      throw new UserError(`stage "${system.stageId}": the circuit's small-signal system is singular at ${hz} Hz`);
    }
    return { re: bRe[system.outputIndex], im: bIm[system.outputIndex] };
  });
}
