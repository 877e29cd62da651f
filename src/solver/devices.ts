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

function limitedExpSlope(x: number): number {
  return x < EXP_LIMIT ? Math.exp(x) : EXP_AT_LIMIT;
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
      current[at] = is * (limitedExp(x) - 1);
      jacobian[jacAt] = (is / scale) * limitedExpSlope(x);
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
      const forward = is * (limitedExp(xf) - 1);
      const reverse = is * (limitedExp(xr) - 1);
      const gf = (is / scale) * limitedExpSlope(xf);
      const gr = (is / scale) * limitedExpSlope(xr);
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
      const above = limitedExp((v[at] - high) / knee);
      const below = limitedExp((low - v[at]) / knee);
      current[at] = scaleAmps * (above - below);
      jacobian[jacAt] = (scaleAmps / knee) * (limitedExpSlope((v[at] - high) / knee) + limitedExpSlope((low - v[at]) / knee));
      return;
    }
  }
}
