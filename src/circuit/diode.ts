/**
 * Shockley diode with ohmic series resistance, and strings of equal diodes in series.
 *
 *   i = Is (exp((v - i Rs) / (n Vt)) - 1),   Vt = k T / q
 *
 * (Shockley diode equation with ohmic resistance; e.g. Sedra & Smith, Microelectronic Circuits,
 * ch. 4, and the SPICE diode model.) A string of m equal diodes carries one current and splits the
 * voltage m ways, so it behaves as one diode with n -> m n and Rs -> m Rs (docs/models.md, "Elements").
 */
import { requirePositive, UserError } from '../errors.js';
import type { DiodeParams } from '../design/types.js';
import { thermalVoltage } from '../netlist/thermalVoltage.js';

/** Saturation currents below this are not physical and would push exp() towards overflow. */
const MIN_SATURATION_AMPS = 1e-30;

/** The parameters the Shockley model needs (a library part or an inline one). */
export type ShockleyParams = Pick<DiodeParams, 'saturationCurrent' | 'ideality' | 'seriesResistance'>;

/** A string of equal diodes reduced to one equivalent diode. */
export interface DiodeString {
  readonly saturationAmps: number; // Is
  readonly emissionVolts: number; // m n Vt: the exponential's voltage scale
  readonly seriesOhms: number; // m Rs
}

/** Throws a UserError naming `where` unless the diode parameters and count are usable. */
export function validateDiode(diode: ShockleyParams, count: number, where: string): void {
  requirePositive(diode.saturationCurrent, `${where} saturationCurrent`, 'A');
  if (diode.saturationCurrent < MIN_SATURATION_AMPS || diode.saturationCurrent > 1) {
    throw new UserError(`${where} saturationCurrent: expected 1e-30 to 1 A, got ${diode.saturationCurrent}`);
  }
  requirePositive(diode.ideality, `${where} ideality`, 'dimensionless units');
  requirePositive(diode.seriesResistance, `${where} seriesResistance`, 'ohm', true);
  if (!Number.isInteger(count) || count < 0) {
    throw new UserError(`${where}: diode count must be a whole number 0 or more, got ${count}`);
  }
}

/** The equivalent diode of `count` equal diodes in series, or null for count 0 (no diode that way). */
export function diodeString(diode: ShockleyParams, count: number, temperatureC: number): DiodeString | null {
  if (count === 0) return null;
  return {
    saturationAmps: diode.saturationCurrent,
    emissionVolts: count * diode.ideality * thermalVoltage(temperatureC),
    seriesOhms: count * diode.seriesResistance,
  };
}

/**
 * Forward voltage of `count` equal diodes in series carrying `currentAmps`:
 * Vf = m (n Vt ln(I / Is + 1) + I Rs), the Shockley equation solved for the voltage.
 */
export function forwardVoltage(diode: ShockleyParams, count: number, currentAmps: number, temperatureC: number): number {
  const vt = thermalVoltage(temperatureC);
  return count * (diode.ideality * vt * Math.log1p(currentAmps / diode.saturationCurrent) + currentAmps * diode.seriesResistance);
}

/**
 * Incremental conductance di/dv of a string at forward current i: from v = N ln(i/Is + 1) + R i,
 * dv/di = N / (i + Is) + R.
 */
export function stringConductance(string: DiodeString, currentAmps: number): number {
  return 1 / (string.emissionVolts / (currentAmps + string.saturationAmps) + string.seriesOhms);
}

/**
 * Voltage across a string at which its incremental conductance reaches `siemens`
 * (Infinity if it never does because the ohmic resistance caps it, 0 if it already does at 0 V).
 */
export function voltageAtConductance(string: DiodeString, siemens: number): number {
  const ohms = 1 / siemens - string.seriesOhms;
  if (ohms <= 0) return Infinity;
  const current = string.emissionVolts / ohms - string.saturationAmps;
  if (current <= 0) return 0;
  return string.emissionVolts * Math.log1p(current / string.saturationAmps) + current * string.seriesOhms;
}
