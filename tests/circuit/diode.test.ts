// Tests for src/circuit/diode.ts (Shockley diode strings).
import { describe, expect, test } from 'vitest';
import { diodeString, forwardVoltage, stringConductance, voltageAtConductance } from '../../src/circuit/diode.js';
import { thermalVoltage } from '../../src/netlist/thermalVoltage.js';
import { UserError } from '../../src/errors.js';
import { validateDiode } from '../../src/circuit/diode.js';
import { expectClose } from '../helpers/expectClose.js';
import { D1N4148 } from './parts.js';

describe('thermal voltage', () => {
  test('kT/q at 25 C is 25.69 mV', () => {
    // Vt = kT/q (SI brochure, 9th ed., 2019), 25.69 mV at 25 C (k, q exact in the 2019 SI).
    expectClose(thermalVoltage(25), 0.02569, { atol: 0.000005 });
  });
});

describe('forward voltage', () => {
  test('1N4148 at 10 mA is within the datasheet limit VF <= 1.0 V', () => {
    // 1N4148 datasheet: VF <= 1.0 V at IF = 10 mA.
    const vf = forwardVoltage(D1N4148, 1, 10e-3, 25);
    expect(vf).toBeLessThanOrEqual(1.0);
    expect(vf).toBeGreaterThan(0.5);
  });

  test('1N4148 model card gives 0.694 V at 10 mA with Vt = 25.85 mV', () => {
    // Manufacturer model card (Is 2.52 nA, n 1.752, Rs 0.568 ohm): model Vf 0.694 V at 10 mA, computed with Vt = 25.85 mV.
    // Vt = 25.85 mV is kT/q at 299.98 K = 26.83 C.
    expectClose(thermalVoltage(26.83), 0.02585, { atol: 0.000005 });
    expectClose(forwardVoltage(D1N4148, 1, 10e-3, 26.83), 0.694, { atol: 0.0005 });
  });

  test('1N34A card gives 0.345 V at 5 mA and the 1N5817 card 0.419 V at 1 A', () => {
    // The model cards in shared/parts.json (Vt = 25.85 mV): 1N34A 0.345 V at 5 mA, 1N5817 0.419 V at 1 A.
    const ge = { saturationCurrent: 2.6e-6, ideality: 1.6, seriesResistance: 6.5 };
    const schottky = { saturationCurrent: 31.7e-6, ideality: 1.373, seriesResistance: 0.051 };
    expectClose(forwardVoltage(ge, 1, 5e-3, 26.83), 0.345, { atol: 0.001 });
    expectClose(forwardVoltage(schottky, 1, 1, 26.83), 0.419, { atol: 0.001 });
  });

  test('a string of m diodes drops m times the voltage of one', () => {
    // Same current through each diode of a series string (Kirchhoff's current law).
    expectClose(forwardVoltage(D1N4148, 3, 2e-3, 25), 3 * forwardVoltage(D1N4148, 1, 2e-3, 25), { rtol: 1e-12 });
  });
});

describe('string conductance', () => {
  test('di/dv from the string matches a central difference of its i(v)', () => {
    // Definition of the derivative; i(v) inverted numerically from Vf(I).
    const string = diodeString(D1N4148, 2, 25)!;
    const i = 1e-3;
    const h = 1e-7;
    const dv = forwardVoltage(D1N4148, 2, i + h, 25) - forwardVoltage(D1N4148, 2, i - h, 25);
    expectClose(stringConductance(string, i), (2 * h) / dv, { rtol: 1e-6 });
  });

  test('voltageAtConductance inverts stringConductance', () => {
    const string = diodeString(D1N4148, 1, 25)!;
    const v = voltageAtConductance(string, 1e-3);
    const current = string.emissionVolts / (1 / 1e-3 - string.seriesOhms) - string.saturationAmps;
    expectClose(v, forwardVoltage(D1N4148, 1, current, 25), { rtol: 1e-12 });
    expectClose(stringConductance(string, current), 1e-3, { rtol: 1e-9 });
    // The ohmic resistance caps the conductance at 1/Rs.
    expect(voltageAtConductance(string, 2 / D1N4148.seriesResistance)).toBe(Infinity);
  });
});

describe('validation', () => {
  test('bad parameters throw a UserError naming the place', () => {
    expect(() => validateDiode({ ...D1N4148, saturationCurrent: -1 }, 1, 'stage "clip" diode')).toThrow(UserError);
    expect(() => validateDiode(D1N4148, 1.5, 'stage "clip" diode')).toThrow(/stage "clip" diode/);
  });
});
