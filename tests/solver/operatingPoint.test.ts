// DC operating points (src/solver/operatingPoint.ts, through analyseCircuitStage) against hand
// calculations from the textbooks' bias formulas.
import { describe, expect, test } from 'vitest';
import { analyseCircuitStage } from '../../src/circuit/circuitStage.js';
import type { CircuitStage } from '../../src/design/types.js';
import { expectClose } from '../helpers/expectClose.js';
import { D1N4148, RED_LED } from '../circuit/parts.js';
import { lambertClipperVolts } from '../circuit/lambert.js';
import { thermalVolts } from './odeReference.js';
import {
  COMMON_EMITTER, COMMON_SOURCE, OPAMP_DIODE, REFERENCE_VOLTS, SUPPLY_VOLTS, TEMPERATURE_C,
  circuitContext, commonEmitterStage, commonSourceStage, idealNonInvertingStage, opampDiodeStage,
} from './testCircuits.js';

function restVolts(stage: CircuitStage): (node: string) => number {
  const { system, operatingPoint } = analyseCircuitStage(stage, circuitContext(), {});
  return (node) => {
    const k = system.unknownNames.indexOf(node);
    if (k < 0) throw new Error(`no node ${node}`);
    return operatingPoint.unknowns[k];
  };
}

describe('voltage-divider-biased common-emitter stage', () => {
  // Thevenin base bias (Sedra & Smith, Microelectronic Circuits, BJT DC bias with a voltage divider):
  //   VTh = VCC R2 / (R1 + R2), RTh = R1 || R2, IE = (VTh - VBE) / (RE + RTh / (beta + 1)),
  //   IC = alpha IE, VC = VCC - RC IC, VE = RE IE, VB = VTh - RTh IE / (beta + 1).
  const v = COMMON_EMITTER;
  const beta = v.bjt.betaForward;
  const vth = (SUPPLY_VOLTS * v.r2Ohms) / (v.r1Ohms + v.r2Ohms);
  const rth = (v.r1Ohms * v.r2Ohms) / (v.r1Ohms + v.r2Ohms);
  const emitterAmps = (vbe: number): number => (vth - vbe) / (v.reOhms + rth / (beta + 1));
  const rest = restVolts(commonEmitterStage());
  const ie = rest('e') / v.reOhms;

  test('with the textbook VBE = 0.7 V: IE within what a 0.1 V error in VBE moves it', () => {
    // The constant-VBE approximation (Sedra & Smith: VBE ~ 0.7 V for a small-signal silicon
    // transistor; common practice to expect it within about 0.1 V).
    const allowance = 0.1 / (v.reOhms + rth / (beta + 1));
    expectClose(ie, emitterAmps(0.7), { atol: allowance });
    expectClose(rest('c'), SUPPLY_VOLTS - v.rcOhms * (beta / (beta + 1)) * emitterAmps(0.7), { atol: v.rcOhms * allowance });
  });

  test('with VBE iterated from IC = Is exp(VBE / Vt): node voltages within 1 uV', () => {
    // The textbook's refinement: VBE = Vt ln(IC / Is + 1), IC = alpha IE, repeated until it settles.
    // The Ebers-Moll transport model in forward activity gives exactly this (its reverse currents
    // here are about Is, femtoamperes).
    const vt = v.bjt.ideality * thermalVolts(TEMPERATURE_C);
    let vbe = 0.7;
    for (let k = 0; k < 50; k++) vbe = vt * Math.log(((beta / (beta + 1)) * emitterAmps(vbe)) / v.bjt.saturationCurrent + 1);
    const handIe = emitterAmps(vbe);
    expectClose(rest('e'), v.reOhms * handIe, { atol: 1e-6 });
    expectClose(rest('b'), vth - (rth * handIe) / (beta + 1), { atol: 1e-6 });
    expectClose(rest('c'), SUPPLY_VOLTS - v.rcOhms * (beta / (beta + 1)) * handIe, { atol: 1e-6 });
  });
});

describe('self-biased JFET common-source stage', () => {
  test('ID solves the square law with VGS = -ID RS (the textbook quadratic), lambda iterated', () => {
    // Sedra & Smith, JFET self bias: ID = IDSS (1 - VGS / VP)^2 (1 + lambda VDS) with VGS = -ID RS:
    // a quadratic in ID for fixed M = 1 + lambda VDS; the root with VGS above VP is the one.
    const v = COMMON_SOURCE;
    const { idss, pinchOff: vp, lambda } = v.jfet;
    const k = v.rsOhms / vp;
    let id = 0;
    for (let iteration = 0; iteration < 50; iteration++) {
      const m = 1 + lambda * (SUPPLY_VOLTS - id * (v.rdOhms + v.rsOhms));
      const a = idss * m * k * k;
      const b = 2 * idss * m * k - 1;
      const c = idss * m;
      const roots = [(-b - Math.sqrt(b * b - 4 * a * c)) / (2 * a), (-b + Math.sqrt(b * b - 4 * a * c)) / (2 * a)];
      id = roots.find((root) => -root * v.rsOhms > vp && root > 0)!;
    }
    const rest = restVolts(commonSourceStage());
    expectClose(rest('s'), id * v.rsOhms, { atol: 1e-6 });
    expectClose(rest('d'), SUPPLY_VOLTS - id * v.rdOhms, { atol: 1e-6 });
    expectClose(rest('g'), 0, { atol: 1e-9 });
    // Saturation, as the formula assumes: VDS above VGS - VP.
    expect(rest('d') - rest('s')).toBeGreaterThan(-id * v.rsOhms - vp);
  });
});

describe('op-amp stages bias at vref', () => {
  test('ideal op-amp, non-inverting with its ground leg through a capacitor: every node at vref', () => {
    // At DC the capacitor is open, the stage is a unity follower of p, and p sits at vref through
    // its bias resistor (no input current): out = m = p = VCC / 2, to the ideal part's 1e-7 gain error.
    const rest = restVolts(idealNonInvertingStage());
    for (const node of ['p', 'm', 'out', 'g']) expectClose(rest(node), REFERENCE_VOLTS, { atol: 1e-6 });
  });

  test('TL072 stage with feedback diodes: the finite-gain closed-loop formula A0 beta / (1 + A0 beta)', () => {
    // Sub-millivolt across them, the diodes act as their zero-bias resistance n Vt / Is each (the
    // Shockley equation's slope at 0; the pair in parallel, with Rs, in series with RD), across RF:
    // beta = RG / (RF' + RG) with RF' = RF || (RD + (Rs + n Vt / Is) / 2). The gain A0 is referred to
    // ground (the macromodel's Rc, assemble.ts): out = A0 (p - m), m = vref + beta (out - vref),
    // p = vref, so out = vref A0 beta / (1 + A0 beta) (negative-feedback algebra, e.g. Sedra & Smith,
    // feedback chapter).
    const v = OPAMP_DIODE;
    const diodeOhms = v.diode.seriesResistance + (v.diode.ideality * thermalVolts(TEMPERATURE_C)) / v.diode.saturationCurrent;
    const branchOhms = v.rdOhms + diodeOhms / 2;
    const rf = (v.rfOhms * branchOhms) / (v.rfOhms + branchOhms);
    const beta = v.rgOhms / (rf + v.rgOhms);
    const a0 = v.opamp.openLoopGain;
    const rest = restVolts(opampDiodeStage());
    const out = (REFERENCE_VOLTS * a0 * beta) / (1 + a0 * beta);
    // 1 nV: the pair's cubic term (relative (u / n Vt)^2 / 6 at u = 0.5 mV) is below that.
    expectClose(rest('out'), out, { atol: 1e-9 });
    expectClose(rest('m'), REFERENCE_VOLTS + beta * (out - REFERENCE_VOLTS), { atol: 1e-9 });
    expectClose(rest('p'), REFERENCE_VOLTS, { atol: 1e-9 });
  });
});

describe('diode strings biased from the supply', () => {
  test.each([
    ['red LED', RED_LED, 1],
    ['two 1N4148 in series', D1N4148, 2],
  ] as const)('%s behind 2.2k from vcc: the Lambert W solution of the Shockley equation', (_name, diode, count) => {
    const stage: CircuitStage = {
      id: 'bias', type: 'circuit', input: 'in', output: 'k',
      elements: [
        { id: 'r', type: 'resistor', nodes: ['vcc', 'k'], ohms: 2.2e3 },
        { id: 'd', type: 'diode', nodes: ['k', 'gnd'], diode, count },
        { id: 'rin', type: 'resistor', nodes: ['in', 'gnd'], ohms: 10e3 },
      ],
    };
    // Banwell & Jayakumar's closed form (tests/circuit/lambert.ts); the 1e-12 S across the junction
    // moves the node by nanovolts.
    expectClose(restVolts(stage)('k'), lambertClipperVolts(SUPPLY_VOLTS, 2.2e3, diode, count, TEMPERATURE_C), { atol: 1e-7 });
  });
});
