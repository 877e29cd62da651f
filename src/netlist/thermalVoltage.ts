/** The thermal voltage of semiconductor junctions, Vt = k T / q, from the exact 2019 SI constants. */

/** Boltzmann constant, exact in the 2019 SI. */
const BOLTZMANN_JOULES_PER_KELVIN = 1.380649e-23;
/** Elementary charge, exact in the 2019 SI. */
const ELEMENTARY_CHARGE_COULOMBS = 1.602176634e-19;
const ZERO_CELSIUS_KELVIN = 273.15;

/** Vt = k T / q in volts; 25.69 mV at 25 C. */
export function thermalVoltage(temperatureC: number): number {
  return (BOLTZMANN_JOULES_PER_KELVIN * (temperatureC + ZERO_CELSIUS_KELVIN)) / ELEMENTARY_CHARGE_COULOMBS;
}
