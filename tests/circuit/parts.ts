/**
 * Part parameters for the circuit tests, built inline so the tests do not depend on the parts
 * library file. Diode values: manufacturer / circulated SPICE model cards, as in shared/parts.json.
 */
import type { DiodeParams, OpampParams } from '../../src/design/types.js';

// 1N4148 manufacturer model card: Is 2.52 nA, n 1.752, Rs 0.568 ohm.
export const D1N4148: DiodeParams = {
  name: '1n4148',
  saturationCurrent: 2.52e-9,
  ideality: 1.752,
  seriesResistance: 0.568,
  ratedCurrent: 0.2,
  source: 'test',
};

// 1N34A germanium, circulated model card: Is 2.6 uA, n 1.6, Rs 6.5 ohm.
export const D1N34A: DiodeParams = {
  name: '1n34a',
  saturationCurrent: 2.6e-6,
  ideality: 1.6,
  seriesResistance: 6.5,
  ratedCurrent: 0.05,
  source: 'test',
};

// Red LED, generic card: Is 93.2 pA, n 3.73, Rs 0.042 ohm.
export const RED_LED: DiodeParams = {
  name: 'led-red',
  saturationCurrent: 93.2e-12,
  ideality: 3.73,
  seriesResistance: 0.042,
  ratedCurrent: 0.02,
  source: 'test',
};

export const IDEAL_OPAMP: OpampParams = {
  name: 'ideal',
  gbwHz: Infinity,
  slewRateVoltsPerSecond: Infinity,
  headroomLowVolts: 0,
  headroomHighVolts: 0,
  supplyMinVolts: 0,
  supplyMaxVolts: Infinity,
  openLoopGain: Infinity,
  commonModeLowVolts: null,
  commonModeHighVolts: null,
  noiseVoltage: null,
  noiseCurrent: null,
  ranges: {},
  source: 'test',
};

// TL072: GBW 4 MHz typ, slew 16 V/us typ (TL072 datasheet typicals). Headroom 1.5 V each
// side from the +-13.5 V swing at +-15 V into 10k (same datasheet).
export const TL072: OpampParams = {
  name: 'tl072',
  gbwHz: 4e6,
  slewRateVoltsPerSecond: 16e6,
  headroomLowVolts: 1.5,
  headroomHighVolts: 1.5,
  supplyMinVolts: 6,
  supplyMaxVolts: 36,
  openLoopGain: 2e5, // 200 V/mV typ (TL072 datasheet, large-signal voltage gain; from memory)
  commonModeLowVolts: null,
  commonModeHighVolts: null,
  noiseVoltage: null,
  noiseCurrent: null,
  ranges: {},
  source: 'test',
};
