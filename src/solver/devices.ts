/**
 * Nonlinear device models: port currents and their Jacobian as functions of the port voltages. Each
 * device reads its constants from a shared parameter array and writes its k port currents and its
 * k x k Jacobian (row-major, d i_row / d v_col) into caller-owned arrays, so solvers call them per
 * Newton iteration without allocating. Equations and sources: docs/models.md, "Devices".
 */

export const enum DeviceKind {
  /** Shockley junction (a diode string): params [Is, m n Vt]. One port anode -> cathode. */
  Junction = 0,
  /** Ebers-Moll transport model: params [Is, n Vt, betaF, betaR, sign (+1 NPN, -1 PNP)]. Ports (b,e) and (b,c). */
  Bjt = 1,
  /** Shichman-Hodges square law: params [Idss, Vp (< 0), lambda, sign (+1 n, -1 p)]. Ports (g,s) (no current) and (d,s). */
  Jfet = 2,
  /** Op-amp input stage: params [Imax, gm]; i = Imax tanh(gm v / Imax) into the compensation node. */
  InputStage = 3,
  /** Op-amp output's approach to its rails: params [I0, Vlow, Vhigh, Vknee]. */
  RailClamp = 4,
}

/** Ports per device kind. */
export const PORT_COUNT: Readonly<Record<DeviceKind, number>> = {
  [DeviceKind.Junction]: 1,
  [DeviceKind.Bjt]: 2,
  [DeviceKind.Jfet]: 2,
  [DeviceKind.InputStage]: 1,
  [DeviceKind.RailClamp]: 1,
};

/**
 * exp(x), continued as its tangent line above EXP_LIMIT so a wild Newton iterate stays finite
 * (the usual junction-voltage limiting of circuit simulators, in its simplest form).
 */
const EXP_LIMIT = 50;
const EXP_AT_LIMIT = Math.exp(EXP_LIMIT);

function limitedExp(x: number): number {
  return x < EXP_LIMIT ? Math.exp(x) : EXP_AT_LIMIT * (1 + x - EXP_LIMIT);
}

/** The slope of `limitedExp` at x, given its value there (one exp() for both). */
function limitedExpSlope(x: number, value: number): number {
  return x < EXP_LIMIT ? value : EXP_AT_LIMIT;
}

/** Square-law drain current and its partials for vds >= 0 (Shichman & Hodges, IEEE JSSC 3(3), 1968). */
function squareLaw(vgs: number, vds: number, beta: number, pinchOff: number, lambda: number, out: Float64Array): void {
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

const jfetScratch = new Float64Array(3);

/**
 * Evaluate device `kind` with constants at `params[p..]`, port voltages at `v[at..]`: port currents
 * to `current[at..]`, Jacobian (k x k) to `jacobian[jacAt..]`.
 */
export function evaluateDevice(
  kind: DeviceKind,
  params: Float64Array,
  p: number,
  v: Float64Array,
  current: Float64Array,
  at: number,
  jacobian: Float64Array,
  jacAt: number,
): void {
  switch (kind) {
    case DeviceKind.Junction: {
      // Shockley diode equation, i = Is (exp(v / (m n Vt)) - 1).
      const is = params[p];
      const scale = params[p + 1];
      const x = v[at] / scale;
      const e = limitedExp(x);
      current[at] = is * (e - 1);
      jacobian[jacAt] = (is / scale) * limitedExpSlope(x, e);
      return;
    }
    case DeviceKind.Bjt: {
      // Ebers-Moll transport model (Ebers & Moll, Proc. IRE 42(12), 1954): forward and reverse
      // diffusion currents If, Ir; port (b,e) carries the emitter current, port (b,c) minus the collector's.
      const is = params[p];
      const scale = params[p + 1];
      const betaF = params[p + 2];
      const betaR = params[p + 3];
      const sign = params[p + 4];
      const xf = (sign * v[at]) / scale;
      const xr = (sign * v[at + 1]) / scale;
      const ef = limitedExp(xf);
      const er = limitedExp(xr);
      const forward = is * (ef - 1);
      const reverse = is * (er - 1);
      const gf = (is / scale) * limitedExpSlope(xf, ef);
      const gr = (is / scale) * limitedExpSlope(xr, er);
      current[at] = sign * (forward * (1 + 1 / betaF) - reverse);
      current[at + 1] = sign * (reverse * (1 + 1 / betaR) - forward);
      jacobian[jacAt] = gf * (1 + 1 / betaF);
      jacobian[jacAt + 1] = -gr;
      jacobian[jacAt + 2] = -gf;
      jacobian[jacAt + 3] = gr * (1 + 1 / betaR);
      return;
    }
    case DeviceKind.Jfet: {
      const idss = params[p];
      const pinchOff = params[p + 1];
      const lambda = params[p + 2];
      const sign = params[p + 3];
      const beta = idss / (pinchOff * pinchOff);
      const vgs = sign * v[at];
      const vds = sign * v[at + 1];
      let id: number;
      let dGate: number;
      let dDrain: number;
      if (vds >= 0) {
        squareLaw(vgs, vds, beta, pinchOff, lambda, jfetScratch);
        id = jfetScratch[0];
        dGate = jfetScratch[1];
        dDrain = jfetScratch[2];
      } else {
        // The channel is symmetric: with vds < 0 drain and source swap roles.
        squareLaw(vgs - vds, -vds, beta, pinchOff, lambda, jfetScratch);
        id = -jfetScratch[0];
        dGate = -jfetScratch[1];
        dDrain = jfetScratch[1] + jfetScratch[2];
      }
      current[at] = 0;
      current[at + 1] = sign * id;
      jacobian[jacAt] = 0;
      jacobian[jacAt + 1] = 0;
      jacobian[jacAt + 2] = dGate;
      jacobian[jacAt + 3] = dDrain;
      return;
    }
    case DeviceKind.InputStage: {
      const maxAmps = params[p];
      const gm = params[p + 1];
      const t = Math.tanh((gm * v[at]) / maxAmps);
      current[at] = maxAmps * t;
      jacobian[jacAt] = gm * (1 - t * t);
      return;
    }
    case DeviceKind.RailClamp: {
      const scaleAmps = params[p];
      const low = params[p + 1];
      const high = params[p + 2];
      const knee = params[p + 3];
      const xa = (v[at] - high) / knee;
      const xb = (low - v[at]) / knee;
      const above = limitedExp(xa);
      const below = limitedExp(xb);
      current[at] = scaleAmps * (above - below);
      jacobian[jacAt] = (scaleAmps / knee) * (limitedExpSlope(xa, above) + limitedExpSlope(xb, below));
      return;
    }
  }
}

/**
 * Junction voltage limiting (Nagel, "SPICE2: a computer program to simulate semiconductor circuits",
 * UCB/ERL M520, 1975; the pnjlim rule): above the critical voltage, where the junction conducts
 * more than about 1 S, a Newton step of more than two exponential scales is shortened to the
 * logarithm of its length, so an iterate deep in an exponential comes down in a few steps and never
 * overshoots into overflow. `scale` is the exponential's voltage scale, `saturationAmps` its Is.
 */
function limitJunction(vNew: number, vOld: number, scale: number, saturationAmps: number): number {
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
 * Limit the Newton step of device `kind` (constants at `params[p..]`) from `vOld` to `vNew` on its
 * ports at `at..`, in place in `vNew`. Exponential ports only: the square law and the op-amp input
 * stage are tame.
 */
export function limitDeviceStep(kind: DeviceKind, params: Float64Array, p: number, vOld: Float64Array, vNew: Float64Array, at: number): void {
  switch (kind) {
    case DeviceKind.Junction: {
      vNew[at] = limitJunction(vNew[at], vOld[at], params[p + 1], params[p]);
      return;
    }
    case DeviceKind.Bjt: {
      const scale = params[p + 1];
      const sign = params[p + 4];
      vNew[at] = sign * limitJunction(sign * vNew[at], sign * vOld[at], scale, params[p]);
      vNew[at + 1] = sign * limitJunction(sign * vNew[at + 1], sign * vOld[at + 1], scale, params[p]);
      return;
    }
    case DeviceKind.RailClamp: {
      const scaleAmps = params[p];
      const low = params[p + 1];
      const high = params[p + 2];
      const knee = params[p + 3];
      // The clamp is two junctions: past the high rail and below the low one.
      if (vNew[at] > high) vNew[at] = high + limitJunction(vNew[at] - high, vOld[at] - high, knee, scaleAmps);
      else if (vNew[at] < low) vNew[at] = low - limitJunction(low - vNew[at], low - vOld[at], knee, scaleAmps);
      return;
    }
    case DeviceKind.Jfet:
    case DeviceKind.InputStage:
      return;
  }
}
