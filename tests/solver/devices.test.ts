// Device equations (src/solver/devices.ts), emitted once and compiled into the generic evaluator and
// the per-circuit kernels: the helpers against Math and the handbook series they stand for, and the
// Shockley diode against its formula.
import { describe, expect, test } from 'vitest';
import { DeviceKind } from '../../src/netlist/deviceKind.js';
import { evaluateDevice, limitedExp, tanhSeries } from '../../src/solver/devices.js';
import { expectClose } from '../helpers/expectClose.js';

describe('tanhSeries', () => {
  test('equals Math.tanh to rounding inside the series range and exactly outside it', () => {
    // Taylor series of tanh (Abramowitz & Stegun 4.5.64): the omitted terms are below 1e-19 relative for |z| < 0.02.
    for (let k = -400; k <= 400; k++) {
      const z = (k / 400) * 0.0199;
      expectClose(tanhSeries(z), Math.tanh(z), { rtol: 4.5e-16 });
    }
    for (const z of [0.02, -0.02, 0.5, -3, 40]) expect(tanhSeries(z)).toBe(Math.tanh(z));
    expect(Object.is(tanhSeries(0), 0)).toBe(true);
  });
});

describe('limitedExp', () => {
  test('is exp below its tangent continuation, and 0 where exp is below the rounding of 1', () => {
    for (const x of [-39.9, -10, 0, 1, 49.9]) expectClose(limitedExp(x), Math.exp(x), { rtol: 1e-15 });
    // Above the limit: the tangent line at 50 (value and slope e^50).
    expectClose(limitedExp(52), Math.exp(50) * 3, { rtol: 1e-15 });
    // The floor: a junction's e - 1 is -1 either way (1 + 4e-18 rounds to 1 in double precision).
    expect(limitedExp(-41)).toBe(0);
    expect(Math.exp(-41) - 1).toBe(-1);
  });
});

describe('evaluateDevice (compiled from the emitted equations)', () => {
  test('a junction gives the Shockley diode equation and its derivative', () => {
    // Shockley diode equation i = Is (exp(v / (n Vt)) - 1), di/dv = Is / (n Vt) exp(v / (n Vt)).
    const is = 2.52e-9;
    const scale = 1.752 * 0.025693;
    const current = new Float64Array(1);
    const jacobian = new Float64Array(1);
    for (const v of [-1, 0, 0.3, 0.65]) {
      evaluateDevice(DeviceKind.Junction, Float64Array.of(is, scale), 0, Float64Array.of(v), current, 0, jacobian, 0);
      expectClose(current[0], is * (Math.exp(v / scale) - 1), { rtol: 1e-14, atol: 1e-24 });
      expectClose(jacobian[0], (is / scale) * Math.exp(v / scale), { rtol: 1e-14, atol: 1e-24 });
    }
  });
});
