/**
 * Circuit stages shared by the circuit-core tests, built directly as data (no design file). Each
 * stage's component values are exported so the independent references (hand formulas, ODE models)
 * read the very same numbers. Part values: see each constant.
 */
import type { BjtParams, CircuitContext, CircuitStage, JfetParams, OpampParams } from '../../src/design/types.js';
import { D1N4148, IDEAL_OPAMP, TL072 } from '../circuit/parts.js';
import { gaussianNoise } from '../dsp/testSignals.js';

export const SUPPLY_VOLTS = 9;
export const REFERENCE_VOLTS = SUPPLY_VOLTS / 2;
export const TEMPERATURE_C = 25;
/** The rate circuit stages run at in a render: 8 x 48 kHz. */
export const RENDER_RATE = 8 * 48000;

export function circuitContext(sampleRate = RENDER_RATE): CircuitContext {
  return { sampleRate, supplyVolts: SUPPLY_VOLTS, temperatureC: TEMPERATURE_C };
}

// 2N3904: Is 6.734 fA, BF 416.4, BR 0.7371, NF 1 (Fairchild's 2N3904 model card; from memory).
export const Q2N3904: BjtParams = {
  name: '2n3904',
  polarity: 'npn',
  saturationCurrent: 6.734e-15,
  betaForward: 416.4,
  betaReverse: 0.7371,
  ideality: 1,
  ranges: {},
  source: 'test',
};

// 2N5457 n-channel JFET: IDSS 1-5 mA and VGS(off) -0.5 to -6 V (ON Semiconductor 2N5457 datasheet;
// from memory). Mid-range picks within those limits; lambda 0.01 /V is an assumed typical value.
export const J2N5457: JfetParams = {
  name: '2n5457',
  polarity: 'n',
  idss: 3e-3,
  pinchOff: -1.8,
  lambda: 0.01,
  ranges: {},
  source: 'test',
};

// LM358: unity-gain bandwidth 0.7 MHz, slew rate 0.3 V/us, large-signal gain 100 V/mV, output high
// swing to V+ - 1.5 V, low swing to within about 5 mV of ground (TI LM358 datasheet typicals; from
// memory). A slow part, so slewing spans several samples at 8 x 48 kHz.
export const LM358: OpampParams = {
  name: 'lm358',
  gbwHz: 0.7e6,
  slewRateVoltsPerSecond: 0.3e6,
  headroomLowVolts: 0.005,
  headroomHighVolts: 1.5,
  supplyMinVolts: 3,
  supplyMaxVolts: 32,
  openLoopGain: 1e5,
  commonModeLowVolts: null,
  commonModeHighVolts: null,
  noiseVoltage: null,
  noiseCurrent: null,
  ranges: {},
  source: 'test',
};

/** TL072 non-inverting stage: coupling cap and bias to vref, gain 1 + RF/RG, anti-parallel 1N4148s with RD in series across RF. */
export const OPAMP_DIODE = { cinFarads: 100e-9, rbOhms: 1e6, rfOhms: 100e3, rgOhms: 4.7e3, rdOhms: 1e3, opamp: TL072, diode: D1N4148 };

export function opampDiodeStage(): CircuitStage {
  const v = OPAMP_DIODE;
  return {
    id: 'od', type: 'circuit', input: 'in', output: 'out',
    elements: [
      { id: 'cin', type: 'capacitor', nodes: ['in', 'p'], farads: v.cinFarads },
      { id: 'rb', type: 'resistor', nodes: ['p', 'vref'], ohms: v.rbOhms },
      { id: 'u1', type: 'opamp', nodes: ['p', 'm', 'out'], opamp: v.opamp },
      { id: 'rf', type: 'resistor', nodes: ['out', 'm'], ohms: v.rfOhms },
      { id: 'rg', type: 'resistor', nodes: ['m', 'vref'], ohms: v.rgOhms },
      { id: 'rd', type: 'resistor', nodes: ['out', 'x'], ohms: v.rdOhms },
      { id: 'd1', type: 'diode', nodes: ['x', 'm'], diode: v.diode, count: 1 },
      { id: 'd2', type: 'diode', nodes: ['m', 'x'], diode: v.diode, count: 1 },
    ],
  };
}

/** TL072 non-inverting amplifier, gain 1 + RF / RG = 11, input coupled and biased to vref. */
export const TL072_NON_INVERTING = { cinFarads: 1e-6, rbOhms: 1e6, rfOhms: 100e3, rgOhms: 10e3, opamp: TL072 };

export function tl072NonInvertingStage(): CircuitStage {
  const v = TL072_NON_INVERTING;
  return {
    id: 'tl', type: 'circuit', input: 'in', output: 'out',
    elements: [
      { id: 'cin', type: 'capacitor', nodes: ['in', 'p'], farads: v.cinFarads },
      { id: 'rb', type: 'resistor', nodes: ['p', 'vref'], ohms: v.rbOhms },
      { id: 'u1', type: 'opamp', nodes: ['p', 'm', 'out'], opamp: v.opamp },
      { id: 'rf', type: 'resistor', nodes: ['out', 'm'], ohms: v.rfOhms },
      { id: 'rg', type: 'resistor', nodes: ['m', 'vref'], ohms: v.rgOhms },
    ],
  };
}

/** Voltage-divider-biased common-emitter stage, emitter bypassed, collector loaded by CL. */
export const COMMON_EMITTER = {
  r1Ohms: 47e3, r2Ohms: 10e3, rcOhms: 4.7e3, reOhms: 1e3, ceFarads: 100e-6, cinFarads: 1e-6, clFarads: 1e-9, bjt: Q2N3904,
};

export function commonEmitterStage(): CircuitStage {
  const v = COMMON_EMITTER;
  return {
    id: 'ce', type: 'circuit', input: 'in', output: 'c',
    elements: [
      { id: 'cin', type: 'capacitor', nodes: ['in', 'b'], farads: v.cinFarads },
      { id: 'r1', type: 'resistor', nodes: ['vcc', 'b'], ohms: v.r1Ohms },
      { id: 'r2', type: 'resistor', nodes: ['b', 'gnd'], ohms: v.r2Ohms },
      { id: 'rc', type: 'resistor', nodes: ['vcc', 'c'], ohms: v.rcOhms },
      { id: 're', type: 'resistor', nodes: ['e', 'gnd'], ohms: v.reOhms },
      { id: 'ce', type: 'capacitor', nodes: ['e', 'gnd'], farads: v.ceFarads },
      { id: 'cl', type: 'capacitor', nodes: ['c', 'gnd'], farads: v.clFarads },
      { id: 'q1', type: 'npn', nodes: ['c', 'b', 'e'], bjt: v.bjt },
    ],
  };
}

/** Self-biased JFET common-source stage, source bypassed, drain loaded by CL. */
export const COMMON_SOURCE = {
  rdOhms: 3.3e3, rsOhms: 680, rgOhms: 1e6, csFarads: 47e-6, cinFarads: 100e-9, clFarads: 1e-9, jfet: J2N5457,
};

export function commonSourceStage(): CircuitStage {
  const v = COMMON_SOURCE;
  return {
    id: 'cs', type: 'circuit', input: 'in', output: 'd',
    elements: [
      { id: 'cin', type: 'capacitor', nodes: ['in', 'g'], farads: v.cinFarads },
      { id: 'rg', type: 'resistor', nodes: ['g', 'gnd'], ohms: v.rgOhms },
      { id: 'rd', type: 'resistor', nodes: ['vcc', 'd'], ohms: v.rdOhms },
      { id: 'rs', type: 'resistor', nodes: ['s', 'gnd'], ohms: v.rsOhms },
      { id: 'cs', type: 'capacitor', nodes: ['s', 'gnd'], farads: v.csFarads },
      { id: 'cl', type: 'capacitor', nodes: ['d', 'gnd'], farads: v.clFarads },
      { id: 'j1', type: 'njfet', nodes: ['d', 'g', 's'], jfet: v.jfet },
    ],
  };
}

/** LM358 unity-gain follower, input coupled and biased to vref: large inputs drive it into both rails. */
export const FOLLOWER = { cinFarads: 1e-6, rbOhms: 100e3, opamp: LM358 };

export function followerStage(): CircuitStage {
  const v = FOLLOWER;
  return {
    id: 'fo', type: 'circuit', input: 'in', output: 'out',
    elements: [
      { id: 'cin', type: 'capacitor', nodes: ['in', 'p'], farads: v.cinFarads },
      { id: 'rb', type: 'resistor', nodes: ['p', 'vref'], ohms: v.rbOhms },
      { id: 'u1', type: 'opamp', nodes: ['p', 'out', 'out'], opamp: v.opamp },
    ],
  };
}

/** Ideal op-amp non-inverting stage (gain 11), input coupled and biased to vref. */
export function idealNonInvertingStage(): CircuitStage {
  return {
    id: 'ni', type: 'circuit', input: 'in', output: 'out',
    elements: [
      { id: 'cin', type: 'capacitor', nodes: ['in', 'p'], farads: 1e-6 },
      { id: 'rb', type: 'resistor', nodes: ['p', 'vref'], ohms: 1e6 },
      { id: 'u1', type: 'opamp', nodes: ['p', 'm', 'out'], opamp: IDEAL_OPAMP },
      { id: 'rf', type: 'resistor', nodes: ['out', 'm'], ohms: 100e3 },
      { id: 'rg', type: 'resistor', nodes: ['m', 'g'], ohms: 10e3 },
      { id: 'cg', type: 'capacitor', nodes: ['g', 'gnd'], farads: 10e-6 },
    ],
  };
}

/** Seeded Gaussian noise through two one-pole low-passes at `cornerHz`, scaled to `rmsVolts`. */
export function lowpassedNoise(length: number, cornerHz: number, rmsVolts: number, seed: number, sampleRate = RENDER_RATE): Float64Array {
  const white = gaussianNoise(length, 1, seed);
  const a = Math.exp((-2 * Math.PI * cornerHz) / sampleRate);
  const out = new Float64Array(length);
  let first = 0;
  let second = 0;
  let energy = 0;
  for (let n = 0; n < length; n++) {
    first = a * first + (1 - a) * white[n];
    second = a * second + (1 - a) * first;
    out[n] = second;
    energy += second * second;
  }
  const scale = rmsVolts / Math.sqrt(energy / length);
  return out.map((x) => x * scale);
}
