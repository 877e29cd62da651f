/**
 * Output noise of a circuit stage, linearised at its operating point (docs/models.md, "Noise"):
 * every resistor's thermal noise (Johnson-Nyquist, current density 4 k T / R across it), each
 * op-amp's input voltage and current noise (datasheet densities, taken as white), the shot noise of
 * junction currents (Schottky, 2 q I: a diode string's current across it; a transistor's base and
 * collector currents, from base and collector to emitter), a JFET's channel noise (4 k T (2/3) gm,
 * drain to source), and the thermal noise of the source impedance that terminates the input
 * (4 k T Re(Ys) across it), each carried to the output by the small-signal transfer at s = j w.
 * Uncorrelated sources: their powers add.
 *
 * One adjoint solve per frequency gives every transfer at once: with Y the linearised MNA matrix at
 * j w and z solving Y^T z = e_out, a current injected into node a (returning from b) reaches the
 * output as z[a] - z[b] (Tellegen's theorem / the adjoint network, e.g. Vlach & Singhal, Computer
 * Methods for Circuit Analysis and Design, 2nd ed., ch. 9). An op-amp's input voltage noise e enters
 * the macromodel as the current gm e into its compensation node. Not modelled: flicker (1/f) noise,
 * the op-amps' noise corners, the correlation of a transistor's base and collector noise.
 */
import { UserError } from '../errors.js';
import { GROUND } from '../netlist/assemble.js';
import { solveComplex } from './denseLu.js';
import { jacobianLayout, type MnaSystem } from './mna.js';
import { DeviceKind } from '../netlist/deviceKind.js';
import type { OperatingPoint } from './operatingPoint.js';
import { linearisedMatrices } from './smallSignal.js';

/** Boltzmann constant and elementary charge, exact in the 2019 SI. */
const BOLTZMANN_JOULES_PER_KELVIN = 1.380649e-23;
const ELEMENTARY_CHARGE_COULOMBS = 1.602176634e-19;
const ZERO_CELSIUS_KELVIN = 273.15;

/** What drives the input while noise is measured: a series R + L (a pickup, a resistor), or an ideal short (null). */
export interface SourceImpedance {
  ohms: number;
  henries: number;
}

export interface StageNoise {
  /** Output noise power density at each frequency, V^2/Hz. */
  totalSquared: Float64Array;
  /** The same split by source (part name; "source" for the input termination), V^2/Hz. */
  bySource: Map<string, Float64Array>;
}

/** Label of the input termination among the sources. */
export const SOURCE_NOISE_LABEL = 'source';

export function stageOutputNoise(
  system: MnaSystem,
  operatingPoint: OperatingPoint,
  frequenciesHz: readonly number[],
  temperatureC: number,
  source: SourceImpedance | null,
): StageNoise {
  const n = system.size;
  const { real, capacitance } = linearisedMatrices(system, operatingPoint);
  const jacobianStarts = jacobianLayout(system).starts;
  const fourKT = 4 * BOLTZMANN_JOULES_PER_KELVIN * (temperatureC + ZERO_CELSIUS_KELVIN);
  const totalSquared = new Float64Array(frequenciesHz.length);
  const bySource = new Map<string, Float64Array>();
  const add = (label: string, f: number, power: number): void => {
    let powers = bySource.get(label);
    if (powers === undefined) bySource.set(label, (powers = new Float64Array(frequenciesHz.length)));
    powers[f] += power;
    totalSquared[f] += power;
  };
  const out = system.outputIndex;
  if (out === GROUND) return { totalSquared, bySource };
  const input = system.inputIndex;
  // The input source is the first branch (assemble.ts adds it before any other).
  const inputBranch = system.nodeCount;
  const transposedRe = new Float64Array(n * n);
  const transposedIm = new Float64Array(n * n);
  const zRe = new Float64Array(n);
  const zIm = new Float64Array(n);
  frequenciesHz.forEach((hz, f) => {
    const omega = 2 * Math.PI * hz;
    for (let row = 0; row < n; row++) {
      for (let col = 0; col < n; col++) {
        transposedRe[col * n + row] = real[row * n + col];
        transposedIm[col * n + row] = omega * capacitance[row * n + col];
      }
    }
    let sourceConductance = 0;
    if (source !== null) {
      // Disconnect the ideal input source (its branch current forced to 0; column `inputBranch` of
      // Y^T is its row of Y) and load the input node with Ys = 1 / (R + j w L) to ground.
      for (let k = 0; k < n; k++) {
        transposedRe[k * n + inputBranch] = 0;
        transposedIm[k * n + inputBranch] = 0;
      }
      transposedRe[inputBranch * n + inputBranch] = 1;
      const reactance = omega * source.henries;
      const magnitudeSquared = source.ohms * source.ohms + reactance * reactance;
      sourceConductance = source.ohms / magnitudeSquared;
      transposedRe[input * n + input] += sourceConductance;
      transposedIm[input * n + input] += -reactance / magnitudeSquared;
    }
    zRe.fill(0);
    zIm.fill(0);
    zRe[out] = 1;
    if (!solveComplex(transposedRe, transposedIm, n, zRe, zIm)) {
      throw new UserError(`stage "${system.stageId}": the circuit's small-signal system is singular at ${hz} Hz (noise analysis)`);
    }
    const gainSquared = (a: number, b: number): number => {
      const re = (a === GROUND ? 0 : zRe[a]) - (b === GROUND ? 0 : zRe[b]);
      const im = (a === GROUND ? 0 : zIm[a]) - (b === GROUND ? 0 : zIm[b]);
      return re * re + im * im;
    };
    if (source !== null && source.ohms > 0) add(SOURCE_NOISE_LABEL, f, fourKT * sourceConductance * gainSquared(input, GROUND));
    for (const { a, b, siemens, element } of system.noisyConductances) add(`${system.stageId}.${element}`, f, fourKT * siemens * gainSquared(a, b));
    system.deviceKinds.forEach((kind, d) => {
      const label = `${system.stageId}.${system.deviceIds[d]}`;
      const port = system.devicePortStart[d];
      const amps = (k: number): number => operatingPoint.portAmps[port + k];
      const twoQ = 2 * ELEMENTARY_CHARGE_COULOMBS;
      if (kind === DeviceKind.Junction) {
        add(`${label} shot noise`, f, twoQ * Math.abs(amps(0)) * gainSquared(system.portFrom[port], system.portTo[port]));
      } else if (kind === DeviceKind.Bjt) {
        // Ports (b,e) and (b,c): the emitter current and minus the collector's, so IC = -i(b,c), IB = i(b,e) + i(b,c).
        const base = system.portVoltA[port];
        const emitter = system.portVoltB[port];
        const collector = system.portVoltB[port + 1];
        add(`${label} shot noise`, f, twoQ * (Math.abs(amps(1)) * gainSquared(collector, emitter) + Math.abs(amps(0) + amps(1)) * gainSquared(base, emitter)));
      } else if (kind === DeviceKind.Jfet) {
        // Channel noise of a saturated FET, 4 k T (2/3) gm (van der Ziel), gm = dId/dVgs at rest.
        const gm = Math.abs(operatingPoint.jacobian[jacobianStarts[d] + 2]);
        add(`${label} channel noise`, f, fourKT * (2 / 3) * gm * gainSquared(system.portVoltA[port + 1], system.portVoltB[port + 1]));
      }
    });
    for (const opamp of system.opampNoise) {
      const label = `${system.stageId}.${opamp.elementId}`;
      const voltage = opamp.voltsPerRootHz * opamp.gm;
      if (voltage > 0) add(`${label} voltage noise`, f, voltage * voltage * gainSquared(opamp.compensation, GROUND));
      const current = opamp.ampsPerRootHz;
      if (current > 0) add(`${label} current noise`, f, current * current * (gainSquared(opamp.plus, GROUND) + gainSquared(opamp.minus, GROUND)));
    }
  });
  return { totalSquared, bySource };
}
