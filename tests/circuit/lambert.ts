import { lambertW0Log } from 'lambert-w-function';
import { thermalVoltage } from '../../src/netlist/thermalVoltage.js';
import type { DiodeParams } from '../../src/design/types.js';

/**
 * Node voltage of `count` equal diodes (n, Is, Rs each) behind a series resistor R, driven by vin.
 * With N = count n Vt and Rt = R + count Rs,
 *   i = (N / Rt) W((Is Rt / N) exp((vin + Is Rt) / N)) - Is,   v = vin - R i
 * (Shockley with series resistance solved by the Lambert W function; e.g. Banwell & Jayakumar,
 * Electronics Letters 36(4), 2000). W from the npm package lambert-w-function (log-argument form).
 */
export function lambertClipperVolts(vin: number, seriesOhms: number, diode: DiodeParams, count: number, temperatureC: number): number {
  const emissionVolts = count * diode.ideality * thermalVoltage(temperatureC);
  const rt = seriesOhms + count * diode.seriesResistance;
  const is = diode.saturationCurrent;
  const logArgument = Math.log((is * rt) / emissionVolts) + (vin + is * rt) / emissionVolts;
  const current = (emissionVolts / rt) * lambertW0Log(logArgument) - is;
  return vin - seriesOhms * current;
}
