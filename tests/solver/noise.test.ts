// Output noise of the circuit core (src/solver/noise.ts, src/analysis/designNoise.ts) against
// handbook formulas: Johnson-Nyquist thermal noise 4kTR of a resistor network (a divider shows
// 4kT (R1 || R2)), the band-limited noise of an RC low-pass (the integral of 4kTR / (1 + (f/fc)^2)),
// and the textbook noise sum of a non-inverting op-amp stage with its source resistance.
import { describe, expect, test } from 'vitest';
import { analyseCircuitStage } from '../../src/circuit/circuitStage.js';
import { designNoise } from '../../src/analysis/designNoise.js';
import type { CircuitElement, CircuitStage, Design, OpampParams } from '../../src/design/types.js';
import { stageOutputNoise } from '../../src/solver/noise.js';
import { expectClose } from '../helpers/expectClose.js';
import { circuitContext, TEMPERATURE_C } from './testCircuits.js';

const FOUR_KT = 4 * 1.380649e-23 * (TEMPERATURE_C + 273.15); // Boltzmann constant exact (SI 2019)

function stage(elements: CircuitElement[], output = 'out'): CircuitStage {
  return { id: 's', type: 'circuit', input: 'in', output, elements };
}

function design(s: CircuitStage): Design<number> {
  return { name: 'noise', supplyVolts: 9, temperatureC: TEMPERATURE_C, knobs: {}, stages: [s] };
}

describe('thermal noise of resistor networks', () => {
  test('a divider from a shorted input shows 4kT (R1 || R2), half from each resistor', () => {
    const divider = stage([
      { id: 'r1', type: 'resistor', nodes: ['in', 'out'], ohms: 10e3 },
      { id: 'r2', type: 'resistor', nodes: ['out', 'gnd'], ohms: 30e3 },
    ]);
    const { system, operatingPoint } = analyseCircuitStage(divider, circuitContext(), {});
    const noise = stageOutputNoise(system, operatingPoint, [100, 1000, 10000], TEMPERATURE_C, null);
    for (const power of noise.totalSquared) expectClose(power, FOUR_KT * ((10e3 * 30e3) / 40e3), { rtol: 1e-9 });
    // Each resistor's share: r1's current noise into R1 || R2 gives 4kT/R1 (R1 || R2)^2 = 4kT (R1||R2) R2/(R1+R2).
    expectClose(noise.bySource.get('s.r1')![0] / noise.totalSquared[0], 30e3 / 40e3, { rtol: 1e-9 });
    expectClose(noise.bySource.get('s.r2')![0] / noise.totalSquared[0], 10e3 / 40e3, { rtol: 1e-9 });
  });

  test('an RC low-pass integrates to 4kTR fc (atan(20k/fc) - atan(20/fc)) over the audio band', () => {
    const r = 10e3;
    const c = 15.9e-9; // fc = 1 / (2 pi R C), about 1 kHz
    const rc = stage([
      { id: 'r', type: 'resistor', nodes: ['in', 'out'], ohms: r },
      { id: 'c', type: 'capacitor', nodes: ['out', 'gnd'], farads: c },
    ]);
    const fc = 1 / (2 * Math.PI * r * c);
    const expected = Math.sqrt(FOUR_KT * r * fc * (Math.atan(20000 / fc) - Math.atan(20 / fc)));
    const report = designNoise(design(rc), { source: null, sourceLabel: 'short', referenceVolts: 1 });
    expectClose(report.unweightedVolts, expected, { rtol: 2e-3 }); // trapezoidal rule on a 1/12-octave grid
    expect(report.contributors).toEqual([{ part: 's.r', share: 1 }]);
  });
});

describe('Johnson-Nyquist totals', () => {
  test('a lone resistor gives sqrt(4kTRB) over the band', () => {
    const lone = stage([{ id: 'r', type: 'resistor', nodes: ['in', 'out'], ohms: 47e3 }]);
    const report = designNoise(design(lone), { source: null, sourceLabel: 'short', referenceVolts: 1 });
    // The band integral is a trapezoidal rule in ln f on a 1/12-octave grid: 1.4e-4 high for a flat density.
    expectClose(report.unweightedVolts, Math.sqrt(FOUR_KT * 47e3 * (20000 - 20)), { rtol: 3e-4 });
  });

  test('R with C to ground integrates to sqrt(kT/C) over all frequencies, whatever R', () => {
    // kT/C noise: the integral of 4kTR / (1 + (2 pi f R C)^2) over 0..inf is kT/C.
    const c = 1e-9;
    for (const r of [1e3, 1e5]) {
      const rc = stage([
        { id: 'r', type: 'resistor', nodes: ['in', 'out'], ohms: r },
        { id: 'c', type: 'capacitor', nodes: ['out', 'gnd'], farads: c },
      ]);
      const { system, operatingPoint } = analyseCircuitStage(rc, circuitContext(), {});
      const fc = 1 / (2 * Math.PI * r * c);
      // Log grid from fc / 1e4 to fc x 1e4 (the rest holds 1e-4 of the total), trapezoidal in ln f.
      const hz = Array.from({ length: 801 }, (_, i) => fc * 10 ** (-4 + i / 100));
      const density = stageOutputNoise(system, operatingPoint, hz, TEMPERATURE_C, null).totalSquared;
      let total = 0;
      for (let i = 0; i + 1 < hz.length; i++) total += 0.5 * (density[i] * hz[i] + density[i + 1] * hz[i + 1]) * Math.log(hz[i + 1] / hz[i]);
      expectClose(total, (FOUR_KT / 4) / c, { rtol: 2e-3 });
    }
  });
});

describe('junction shot noise', () => {
  test('a diode fed through R: (4kT/R + 2qI) across R || r_d (Schottky shot noise 2qI; Johnson 4kT/R)', () => {
    const r = 10e3;
    const diode = stage([
      { id: 'rin', type: 'resistor', nodes: ['in', 'a'], ohms: 1e15 },
      { id: 'r', type: 'resistor', nodes: ['vcc', 'a'], ohms: r },
      { id: 'd', type: 'diode', nodes: ['a', 'gnd'], diode: { name: 'ideal junction', saturationCurrent: 1e-14, ideality: 1, seriesResistance: 0, ratedCurrent: 1, source: 'test' }, count: 1 },
    ], 'a');
    const { system, operatingPoint } = analyseCircuitStage(diode, circuitContext(), {});
    const current = operatingPoint.portAmps[0];
    const gd = operatingPoint.jacobian[0];
    expect(current).toBeGreaterThan(0.5e-3); // about (9 V - 0.7 V) / 10k
    const noise = stageOutputNoise(system, operatingPoint, [1000], TEMPERATURE_C, null);
    const impedance = 1 / (1 / r + gd + 1e-12 + 1e-15); // R, the junction, gmin and rin in parallel
    expectClose(noise.bySource.get('s.d shot noise')![0], 2 * 1.602176634e-19 * current * impedance ** 2, { rtol: 1e-6 });
    expectClose(noise.totalSquared[0], (FOUR_KT / r + 2 * 1.602176634e-19 * current) * impedance ** 2, { rtol: 1e-5 });
  });
});

describe('op-amp noise', () => {
  // A flat, quiet-ish part: en 10 nV/rtHz, in 1 pA/rtHz, GBW far above the band.
  const part: OpampParams = {
    name: 'flat', gbwHz: 1e12, slewRateVoltsPerSecond: 1e12, headroomLowVolts: 0, headroomHighVolts: 0, supplyMinVolts: 0, supplyMaxVolts: 100,
    openLoopGain: 1e9, commonModeLowVolts: null, commonModeHighVolts: null, noiseVoltage: 10e-9, noiseCurrent: 1e-12, ranges: {}, source: 'test',
  };
  const rf = 90e3;
  const rg = 10e3;
  const rs = 1e3;
  const nonInverting = stage([
    { id: 'cin', type: 'capacitor', nodes: ['in', 'p'], farads: 1 },
    { id: 'rbias', type: 'resistor', nodes: ['p', 'vref'], ohms: 1e12 },
    { id: 'u1', type: 'opamp', nodes: ['p', 'm', 'out'], opamp: part },
    { id: 'rf', type: 'resistor', nodes: ['out', 'm'], ohms: rf },
    { id: 'rg', type: 'resistor', nodes: ['m', 'vref'], ohms: rg },
  ]);

  test('non-inverting stage with a 1k source: the textbook sum of en, in, Rs, Rf and Rg', () => {
    // Output noise^2 = (en^2 + 4kT Rs + in^2 Rs^2) (1 + Rf/Rg)^2 + 4kT Rf + 4kT Rg (Rf/Rg)^2 + in^2 Rf^2
    // (non-inverting amplifier noise model, e.g. Motchenbacher & Connelly, Low-Noise Electronic System Design, ch. 7; from memory).
    const gain = 1 + rf / rg;
    const { system, operatingPoint } = analyseCircuitStage(nonInverting, circuitContext(), {});
    const noise = stageOutputNoise(system, operatingPoint, [1000], TEMPERATURE_C, { ohms: rs, henries: 0 });
    const expected = (10e-9 ** 2 + FOUR_KT * rs + 1e-24 * rs * rs) * gain * gain + FOUR_KT * rf + FOUR_KT * rg * (rf / rg) ** 2 + 1e-24 * rf * rf;
    expectClose(noise.totalSquared[0], expected, { rtol: 1e-4 }); // the 1 T bias resistor adds 1e-9 of it
    expectClose(noise.bySource.get('s.u1 voltage noise')![0], 10e-9 ** 2 * gain * gain, { rtol: 1e-6 });
    expectClose(noise.bySource.get('source')![0], FOUR_KT * rs * gain * gain, { rtol: 1e-6 });
  });

  test('an inductive source (a pickup) raises the input resistance noise where |Z| grows: the source term follows 4kT Rs at the input', () => {
    const { system, operatingPoint } = analyseCircuitStage(nonInverting, circuitContext(), {});
    const pickup = stageOutputNoise(system, operatingPoint, [100, 10000], TEMPERATURE_C, { ohms: 10e3, henries: 3 });
    // A series R + L generates 4kT R of voltage noise at any frequency; the ideal op-amp input draws
    // no current, so the source term is 4kT R gain^2 however large |Z| is.
    for (const power of pickup.bySource.get('source')!) expectClose(power, FOUR_KT * 10e3 * (1 + rf / rg) ** 2, { rtol: 1e-6 });
    // The input current noise flows through |Z| = |R + j w L|: ten times more at 10 kHz than at 100 Hz beyond R.
    const current = pickup.bySource.get('s.u1 current noise')!;
    expect(current[1]).toBeGreaterThan(10 * current[0]);
  });
});
