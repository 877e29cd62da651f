// Tests for src/circuit/clipper.ts (RC diode clipper with capacitor) against an independent ODE
// solver: Hairer & Wanner's ODEX (Gragg-Bulirsch-Stoer extrapolation), npm package `odex`.
import { beforeAll, describe, expect, test } from 'vitest';
import { Solver } from 'odex';
import { lambertW0Log } from 'lambert-w-function';
import { createClipper, designClipper } from '../../src/circuit/clipper.js';
import type { CircuitContext, ClipperStage } from '../../src/design/types.js';
import { D1N4148 } from './parts.js';

const SERIES_OHMS = 2200;
const CAP_FARADS = 10e-9;
const AMPLITUDE_VOLTS = 2;
const HZ = 1000;
const TEMPERATURE_C = 25;

// Vt = kT/q with k and q exact in the 2019 SI (SI brochure, 9th ed., 2019), written out here on purpose.
const VT = (1.380649e-23 * (TEMPERATURE_C + 273.15)) / 1.602176634e-19;

/** Current of one 1N4148 at voltage v, Shockley with series resistance via Lambert W (exact). */
function diodeCurrent(v: number): number {
  const n = D1N4148.ideality * VT;
  const rs = D1N4148.seriesResistance;
  const is = D1N4148.saturationCurrent;
  return (n / rs) * lambertW0Log(Math.log((is * rs) / n) + (v + is * rs) / n) - is;
}

/** Anti-parallel pair: C dv/dt = (vin - v)/R - (i(v) - i(-v)). */
function referenceRun(sampleRate: number, samples: number): Float64Array {
  const solver = new Solver(1);
  solver.denseOutput = true;
  solver.absoluteTolerance = 1e-13;
  solver.relativeTolerance = 1e-13;
  solver.maxSteps = 1e6;
  const out = new Float64Array(samples);
  let index = 0;
  const derivative = (t: number, y: number[]): number[] => {
    const vin = AMPLITUDE_VOLTS * Math.sin(2 * Math.PI * HZ * t);
    const v = y[0];
    return [((vin - v) / SERIES_OHMS - (diodeCurrent(v) - diodeCurrent(-v))) / CAP_FARADS];
  };
  solver.solve(derivative, 0, [0], (samples - 0.5) / sampleRate, solver.grid(1 / sampleRate, (_t: number, y: number[]) => {
    if (index < samples) out[index++] = y[0];
  }));
  return out;
}

function clipperRun(sampleRate: number, samples: number, solver: 'table' | 'newton'): Float64Array {
  const spec: ClipperStage<number> = {
    id: 'clip', type: 'clipper', series: SERIES_OHMS, cap: CAP_FARADS, diode: D1N4148, downDiode: D1N4148, up: 1, down: 1,
  };
  const ctx: CircuitContext = { sampleRate, supplyVolts: 9, temperatureC: TEMPERATURE_C };
  const block = new Float64Array(samples);
  for (let i = 0; i < samples; i++) block[i] = AMPLITUDE_VOLTS * Math.sin((2 * Math.PI * HZ * i) / sampleRate);
  createClipper(designClipper(spec, ctx, { solver })).process(block);
  return block;
}

function maxError(a: Float64Array, b: Float64Array): number {
  let worst = 0;
  for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs(a[i] - b[i]));
  return worst;
}

describe('RC clipper against ODEX', () => {
  // Reference: ODEX at 1e-13 tolerance on the exact model (Lambert-W diode current, both strings
  // with their series resistance). The trapezoidal rule is second order, so its error must fall
  // 4x per doubling of the rate and vanish against the reference.
  const rates = [384000, 768000, 1536000];
  const newtonError = new Map<number, number>();
  const tableError = new Map<number, number>();
  beforeAll(() => {
    for (const fs of rates) {
      const samples = Math.round(fs * 0.002) + 1; // two periods of 1 kHz, the first includes the start-up
      const reference = referenceRun(fs, samples);
      newtonError.set(fs, maxError(clipperRun(fs, samples, 'newton'), reference));
      tableError.set(fs, maxError(clipperRun(fs, samples, 'table'), reference));
    }
  });

  test('at 384 kHz the waveform is within 0.3 mV of the reference (peak about 0.65 V)', () => {
    expect(newtonError.get(384000)).toBeLessThan(3e-4);
  });

  test('error falls as the square of the time step (second-order convergence)', () => {
    const first = newtonError.get(384000)! / newtonError.get(768000)!;
    const second = newtonError.get(768000)! / newtonError.get(1536000)!;
    for (const ratio of [first, second]) {
      expect(ratio).toBeGreaterThan(3.6);
      expect(ratio).toBeLessThan(4.4);
    }
    expect(newtonError.get(1536000)).toBeLessThan(2e-5);
  });

  test('the table solver lands on the same trajectory as Newton', () => {
    // Within 10 uV (-96 dB re the 0.65 V peak): the table's 1 uV tolerance with the recursion's
    // accumulation (diodeNode.ts), far below the discretisation error the test above bounds.
    for (const fs of rates) expect(Math.abs(tableError.get(fs)! - newtonError.get(fs)!)).toBeLessThan(1e-5);
  });
});
