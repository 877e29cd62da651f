/**
 * Nonlinear device models: port currents and their Jacobian as functions of the port voltages.
 * Each device's equations are written once, as source emitted into the solvers that run them
 * (`emitDeviceEvaluation`, `emitDeviceLimit`): the generated per-circuit kernels (dkKernel.ts) get
 * them with the part's constants inlined, and the generic `evaluateDevice` / `limitDeviceStep` below
 * (the operating point, the kernels' robust fallback) are compiled from the same text once at load.
 * A device writes its k port currents and its k x k Jacobian (row-major, d i_row / d v_col) into
 * caller-owned slots, so solvers call it per Newton iteration without allocating. Equations and
 * sources: docs/models.md, "Devices".
 */

import { DeviceKind, PORT_COUNT } from '../netlist/deviceKind.js';

/**
 * exp(x), continued as its tangent line above EXP_LIMIT so a wild Newton iterate stays finite
 * (the usual junction-voltage limiting of circuit simulators, in its simplest form), and taken as 0
 * below -EXP_FLOOR: exp(-40) = 4e-18 is below the rounding of any sum it enters (a junction's
 * e - 1, a conductance beside gmin), and skipping it saves the exp() of every reverse-biased
 * junction and of an op-amp's far rail. Emitted as an expression of the local `x` (kernels inline
 * it: a call returning a double would box its result).
 */
const EXP_LIMIT = 50;
const EXP_AT_LIMIT = Math.exp(EXP_LIMIT);
const EXP_FLOOR = 40;

function emitLimitedExp(x: string): string {
  return `(${x} < ${EXP_LIMIT} ? (${x} > ${-EXP_FLOOR} ? Math.exp(${x}) : 0) : ${EXP_AT_LIMIT} * (1 + ${x} - ${EXP_LIMIT}))`;
}

/** The slope of the limited exponential at the local `x`, given its value `value` there (one exp() for both). */
function emitLimitedExpSlope(x: string, value: string): string {
  return `(${x} < ${EXP_LIMIT} ? ${value} : ${EXP_AT_LIMIT})`;
}

/** Below this |z|, tanh is summed as its Taylor series instead of calling Math.tanh. */
const TANH_SERIES_LIMIT = 0.02;

/**
 * Statements setting `target` to tanh(z) of the local `z`. Where |z| < TANH_SERIES_LIMIT (an op-amp
 * input stage in its linear range, i.e. nearly always) by its Taylor series to the z^9 term
 * (Abramowitz & Stegun, Handbook of Mathematical Functions, 4.5.64): the first term left out,
 * 1382 z^11 / 155925, is below 1e-19 of the sum there, so the result is Math.tanh's to rounding,
 * several times cheaper.
 */
function emitTanh(target: string, z: string): string {
  return `if (Math.abs(${z}) < ${TANH_SERIES_LIMIT}) {
  const z2 = ${z} * ${z};
  ${target} = ${z} * (1 + z2 * (-1 / 3 + z2 * (2 / 15 + z2 * (-17 / 315 + z2 * (62 / 2835)))));
} else ${target} = Math.tanh(${z});`;
}

/** Statement limiting the local `limited` (new iterate) against `old` by `limitJunction`; the cheap test is inlined, since most steps are short. */
function emitLimitJunction(limited: string, old: string, scale: string, saturationAmps: string): string {
  return `if (!(Math.abs(${limited} - ${old}) <= 2 * ${scale})) ${limited} = limitJunction(${limited}, ${old}, ${scale}, ${saturationAmps});`;
}

/** Square-law drain current and its partials for vds >= 0 (Shichman & Hodges, IEEE JSSC 3(3), 1968). */
export function squareLaw(vgs: number, vds: number, beta: number, pinchOff: number, lambda: number, out: Float64Array): void {
  const overdrive = vgs - pinchOff;
  if (overdrive <= 0) {
    out[0] = 0;
    out[1] = 0;
    out[2] = 0;
    return;
  }
  const modulation = 1 + lambda * vds;
  if (vds < overdrive) {
    // Triode region.
    const core = beta * vds * (2 * overdrive - vds);
    out[0] = core * modulation;
    out[1] = 2 * beta * vds * modulation;
    out[2] = 2 * beta * (overdrive - vds) * modulation + core * lambda;
  } else {
    // Saturation.
    const core = beta * overdrive * overdrive;
    out[0] = core * modulation;
    out[1] = 2 * beta * overdrive * modulation;
    out[2] = core * lambda;
  }
}

/**
 * Junction voltage limiting (Nagel, "SPICE2: a computer program to simulate semiconductor circuits",
 * UCB/ERL M520, 1975; the pnjlim rule): above the critical voltage, where the junction conducts
 * more than about 1 S, a Newton step of more than two exponential scales is shortened to the
 * logarithm of its length, so an iterate deep in an exponential comes down in a few steps and never
 * overshoots into overflow. `scale` is the exponential's voltage scale, `saturationAmps` its Is.
 */
export function limitJunction(vNew: number, vOld: number, scale: number, saturationAmps: number): number {
  if (Math.abs(vNew - vOld) <= 2 * scale) return vNew; // cheap test first: most steps are short
  const critical = criticalVoltage(saturationAmps, scale);
  if (vNew > critical) {
    if (vOld > 0) {
      const arg = 1 + (vNew - vOld) / scale;
      return arg > 0 ? vOld + scale * Math.log(arg) : critical;
    }
    return scale * Math.log(vNew / scale);
  }
  return vNew;
}

/** Critical voltage of an exponential Is exp(v / scale): where its conductance reaches 1/sqrt(2) S. */
function criticalVoltage(saturationAmps: number, scale: number): number {
  return scale * Math.log(scale / (Math.SQRT2 * saturationAmps));
}


/**
 * Where a device's emitted equations read and write: each function returns a JavaScript expression
 * (`param`, `volts`) or an assignable one (`amps`, `jacobian`, `limited`). A kernel passes locals
 * and inlined constants, the generic evaluator indexed arrays.
 */
export interface DeviceSlots {
  /** Constant k of the device (see DeviceKind). */
  param(k: number): string;
  /** Voltage of port q (for a limit: the last iterate's). */
  volts(q: number): string;
  amps(q: number): string;
  jacobian(row: number, col: number): string;
}

export interface LimitSlots {
  param(k: number): string;
  /** The last iterate's voltage of port q. */
  volts(q: number): string;
  /** The new iterate's voltage of port q, limited in place. */
  limited(q: number): string;
}

/** The functions emitted device code calls, by the names it calls them. */
const DEVICE_HELPERS = { limitJunction, squareLaw, jfetScratch: new Float64Array(3) };

/**
 * Compile `body` (the source of a function body ending in `return ...;`) with the device helpers
 * and `extra` bindings in scope, and return what it returns.
 */
export function compileWithDeviceHelpers<T>(body: string, extra: Readonly<Record<string, unknown>> = {}): T {
  const bindings = { ...DEVICE_HELPERS, ...extra };
  const factory = new Function(...Object.keys(bindings), `'use strict';\n${body}`) as (...values: unknown[]) => T;
  return factory(...Object.values(bindings));
}

/** Statements evaluating one device of `kind`: its port currents and Jacobian from its port voltages. */
export function emitDeviceEvaluation(kind: DeviceKind, s: DeviceSlots): string {
  switch (kind) {
    case DeviceKind.Junction:
      // Shockley diode equation, i = Is (exp(v / (m n Vt)) - 1).
      return `{
  const x = ${s.volts(0)} * (1 / ${s.param(1)});
  const e = ${emitLimitedExp('x')};
  ${s.amps(0)} = ${s.param(0)} * (e - 1);
  ${s.jacobian(0, 0)} = (${s.param(0)} / ${s.param(1)}) * ${emitLimitedExpSlope('x', 'e')};
}`;
    case DeviceKind.Bjt:
      // Ebers-Moll transport model (Ebers & Moll, Proc. IRE 42(12), 1954): forward and reverse
      // diffusion currents If, Ir; port (b,e) carries the emitter current, port (b,c) minus the collector's.
      return `{
  const is = ${s.param(0)}, scale = ${s.param(1)}, betaF = ${s.param(2)}, betaR = ${s.param(3)}, sign = ${s.param(4)};
  const xf = ${s.volts(0)} * (sign / scale);
  const xr = ${s.volts(1)} * (sign / scale);
  const ef = ${emitLimitedExp('xf')};
  const er = ${emitLimitedExp('xr')};
  const forward = is * (ef - 1);
  const reverse = is * (er - 1);
  const gf = (is / scale) * ${emitLimitedExpSlope('xf', 'ef')};
  const gr = (is / scale) * ${emitLimitedExpSlope('xr', 'er')};
  ${s.amps(0)} = sign * (forward * (1 + 1 / betaF) - reverse);
  ${s.amps(1)} = sign * (reverse * (1 + 1 / betaR) - forward);
  ${s.jacobian(0, 0)} = gf * (1 + 1 / betaF);
  ${s.jacobian(0, 1)} = -gr;
  ${s.jacobian(1, 0)} = -gf;
  ${s.jacobian(1, 1)} = gr * (1 + 1 / betaR);
}`;
    case DeviceKind.Jfet:
      // Square law (squareLaw above); the channel is symmetric: with vds < 0 drain and source swap roles.
      return `{
  const pinchOff = ${s.param(1)}, lambda = ${s.param(2)}, sign = ${s.param(3)};
  const beta = ${s.param(0)} / (pinchOff * pinchOff);
  const vgs = sign * ${s.volts(0)};
  const vds = sign * ${s.volts(1)};
  let id, dGate, dDrain;
  if (vds >= 0) {
    squareLaw(vgs, vds, beta, pinchOff, lambda, jfetScratch);
    id = jfetScratch[0];
    dGate = jfetScratch[1];
    dDrain = jfetScratch[2];
  } else {
    squareLaw(vgs - vds, -vds, beta, pinchOff, lambda, jfetScratch);
    id = -jfetScratch[0];
    dGate = -jfetScratch[1];
    dDrain = jfetScratch[1] + jfetScratch[2];
  }
  ${s.amps(0)} = 0;
  ${s.amps(1)} = sign * id;
  ${s.jacobian(0, 0)} = 0;
  ${s.jacobian(0, 1)} = 0;
  ${s.jacobian(1, 0)} = dGate;
  ${s.jacobian(1, 1)} = dDrain;
}`;
    case DeviceKind.InputStage:
      return `{
  const maxAmps = ${s.param(0)};
  const z = ${s.volts(0)} * (${s.param(1)} / maxAmps);
  let t;
  ${emitTanh('t', 'z')}
  ${s.amps(0)} = maxAmps * t;
  ${s.jacobian(0, 0)} = ${s.param(1)} * (1 - t * t);
}`;
    case DeviceKind.RailClamp:
      return `{
  const knee = ${s.param(3)};
  const xa = (${s.volts(0)} - ${s.param(2)}) * (1 / knee);
  const xb = (${s.param(1)} - ${s.volts(0)}) * (1 / knee);
  const above = ${emitLimitedExp('xa')};
  const below = ${emitLimitedExp('xb')};
  ${s.amps(0)} = ${s.param(0)} * (above - below);
  ${s.jacobian(0, 0)} = (${s.param(0)} / knee) * (${emitLimitedExpSlope('xa', 'above')} + ${emitLimitedExpSlope('xb', 'below')});
}`;
  }
}

/**
 * Statements limiting one device's Newton step (junction limiting, `limitJunction`), in place in the
 * new iterate. Exponential ports only: the square law and the op-amp input stage are tame.
 */
export function emitDeviceLimit(kind: DeviceKind, s: LimitSlots): string {
  switch (kind) {
    case DeviceKind.Junction:
      return emitLimitJunction(s.limited(0), s.volts(0), s.param(1), s.param(0));
    case DeviceKind.Bjt:
      return [0, 1]
        .map(
          (q) => `{
  const sign = ${s.param(4)};
  let limited = sign * ${s.limited(q)};
  const old = sign * ${s.volts(q)};
  ${emitLimitJunction('limited', 'old', s.param(1), s.param(0))}
  ${s.limited(q)} = sign * limited;
}`,
        )
        .join('\n');
    case DeviceKind.RailClamp:
      // The clamp is two junctions: past the high rail and below the low one.
      return `{
  const low = ${s.param(1)}, high = ${s.param(2)};
  if (${s.limited(0)} > high) {
    let past = ${s.limited(0)} - high;
    const old = ${s.volts(0)} - high;
    ${emitLimitJunction('past', 'old', s.param(3), s.param(0))}
    ${s.limited(0)} = high + past;
  } else if (${s.limited(0)} < low) {
    let past = low - ${s.limited(0)};
    const old = low - ${s.volts(0)};
    ${emitLimitJunction('past', 'old', s.param(3), s.param(0))}
    ${s.limited(0)} = low - past;
  }
}`;
    case DeviceKind.Jfet:
    case DeviceKind.InputStage:
      return '';
  }
}

const ALL_KINDS = [DeviceKind.Junction, DeviceKind.Bjt, DeviceKind.Jfet, DeviceKind.InputStage, DeviceKind.RailClamp];

/** Slots of the generic evaluator: constants at `params[p..]`, ports at `[at..]`, Jacobian at `jacobian[jacAt..]`. */
function arraySlots(kind: DeviceKind): DeviceSlots & LimitSlots {
  return {
    param: (k) => `params[p + ${k}]`,
    volts: (q) => `vOld[at + ${q}]`,
    amps: (q) => `current[at + ${q}]`,
    jacobian: (row, col) => `jacobian[jacAt + ${row * PORT_COUNT[kind] + col}]`,
    limited: (q) => `vNew[at + ${q}]`,
  };
}

function compileDispatch<T>(name: string, parameters: string, emit: (kind: DeviceKind) => string): T {
  const cases = ALL_KINDS.map((kind) => `case ${kind}: {\n${emit(kind)}\nreturn;\n}`).join('\n');
  return compileWithDeviceHelpers<T>(`return function ${name}(${parameters}) {\nswitch (kind) {\n${cases}\n}\n};`);
}

/**
 * Evaluate device `kind` with constants at `params[p..]`, port voltages at `v[at..]`: port currents
 * to `current[at..]`, Jacobian (k x k) to `jacobian[jacAt..]`.
 */
export const evaluateDevice = compileDispatch<
  (kind: DeviceKind, params: Float64Array, p: number, v: Float64Array, current: Float64Array, at: number, jacobian: Float64Array, jacAt: number) => void
>('evaluateDevice', 'kind, params, p, vOld, current, at, jacobian, jacAt', (kind) => emitDeviceEvaluation(kind, arraySlots(kind)));

/**
 * Limit the Newton step of device `kind` (constants at `params[p..]`) from `vOld` to `vNew` on its
 * ports at `at..`, in place in `vNew`.
 */
export const limitDeviceStep = compileDispatch<(kind: DeviceKind, params: Float64Array, p: number, vOld: Float64Array, vNew: Float64Array, at: number) => void>(
  'limitDeviceStep',
  'kind, params, p, vOld, vNew, at',
  (kind) => emitDeviceLimit(kind, arraySlots(kind)),
);

/** The limited exponential as a function (for tests and reports). */
export const limitedExp = compileWithDeviceHelpers<(x: number) => number>(`return function limitedExp(x) {\nreturn ${emitLimitedExp('x')};\n};`);

/** tanh as the devices compute it (for tests). */
export const tanhSeries = compileWithDeviceHelpers<(z: number) => number>(`return function tanhSeries(z) {\nlet t;\n${emitTanh('t', 'z')}\nreturn t;\n};`);
