/**
 * Runs a DK model sample by sample (see dkModel.ts). The per-sample loop is generated for the model
 * (dkKernel.ts) and tries a fast undamped Newton first; a block it does not settle comes here, to the
 * robust solve: damped Newton-Raphson on g(v) = p + F f(v) - v:
 *   - warm start: the predictor v = p + F i with the block's currents of the previous sample;
 *   - each step solves (I - F J) dv = g(v); exponential ports are limited (junction limiting,
 *     devices.ts); a limited step is taken whole (at most MAX_UPHILL_STEPS times a solve even if
 *     the residual grows), any other is halved (up to MAX_HALVINGS times) until the residual shrinks;
 *   - converged when every |g_k| <= TOLERANCE_VOLTS x max(1, |v_k|, |p_k|) (relative to the largest
 *     term of g, whose rounding no iterate can beat); at most MAX_ITERATIONS steps.
 * Fallback, in order: (1) homotopy in the input: the block's drive p is moved from the last sample's
 * solved value to this sample's in HOMOTOPY_STEPS (then HOMOTOPY_STEPS_FINE) steps, each solved by
 * Newton from the one before; (2) if even that fails and the best iterate's residual is large, the
 * block keeps the last sample's voltages and currents (a hold), so an unconverged iterate never
 * reaches the state. `fallbackSamples` counts blocks that needed (1) or (2), `holdSamples` those that
 * needed (2). Neither path allocates or creates closures per sample.
 */
import type { Processor } from '../dsp/processor.js';
import { conductionThresholdSiemens, type ConductionMeter } from '../dsp/conduction.js';
import { factorLu, solveLu } from './denseLu.js';
import { DeviceKind, PORT_COUNT } from '../netlist/deviceKind.js';
import { evaluateDevice, limitDeviceStep } from './devices.js';
import { compileDkKernel, type DkKernel, type KernelHost } from './dkKernel.js';
import type { DkModel } from './dkModel.js';
import type { MnaSystem } from './mna.js';

export const MAX_ITERATIONS = 50;
export const MAX_HALVINGS = 12;
export const TOLERANCE_VOLTS = 1e-10;
/** Junction-limited steps a Newton solve may take although the residual grew. */
export const MAX_UPHILL_STEPS = 4;
export const HOMOTOPY_STEPS = 8;
export const HOMOTOPY_STEPS_FINE = 128;
/** A best iterate whose scaled residual exceeds this is not used: the block holds instead. */
const HOLD_RESIDUAL = 1e-4;

export class DkProcessor implements Processor, ConductionMeter, KernelHost {
  readonly latencySamples = 0;
  /** Samples with any diode string conducting, and samples counted, since the last reset. */
  conductingSamples = 0;
  countedSamples = 0;
  /** Jacobian index and conduction threshold (siemens) of each diode string, in solve order. */
  private readonly diodeJac: Int32Array;
  private readonly diodeThreshold: Float64Array;
  /** Block solves that needed the homotopy or the hold fallback. */
  fallbackSamples = 0;
  /** Block solves that ended in the hold fallback. */
  holdSamples = 0;

  private readonly m: DkModel;
  private readonly params: Float64Array;
  private readonly kinds: DeviceKind[];
  private readonly paramStart: Int32Array;
  private readonly devicePort: Int32Array; // first solve-order port of each solve-order device
  private readonly jacStart: Int32Array;
  private readonly blockDevice: Int32Array; // first device of each block, plus the end
  private readonly blockJacEnd: Int32Array; // end of each block's Jacobian entries
  // The generated kernel's state (KernelHost), between blocks: capacitor histories, this sample's
  // drive, port voltages and currents, device Jacobians, and the last solved sample's values.
  readonly x: Float64Array;
  readonly p: Float64Array;
  readonly v: Float64Array;
  readonly i: Float64Array;
  readonly jac: Float64Array;
  readonly pSolved: Float64Array;
  readonly vSolved: Float64Array;
  readonly iSolved: Float64Array;
  private readonly vTrial: Float64Array;
  private readonly iTrial: Float64Array;
  private readonly jacTrial: Float64Array;
  private readonly residual: Float64Array;
  private readonly step: Float64Array;
  private readonly newton: Float64Array;
  private readonly pivots: Int32Array;
  private readonly columnScale: Float64Array;
  private readonly pTarget: Float64Array;
  private readonly kernel: DkKernel;
  /** Set by `residualNorm`: the iterate it measured meets the tolerance. */
  private converged = false;

  constructor(model: DkModel, system: MnaSystem) {
    this.m = model;
    this.params = system.params;
    const order = [...model.deviceOrder];
    this.kinds = order.map((d) => system.deviceKinds[d]);
    this.paramStart = Int32Array.from(order, (d) => system.deviceParamStart[d]);
    this.devicePort = new Int32Array(order.length);
    this.jacStart = new Int32Array(order.length);
    let port = 0;
    let jac = 0;
    this.kinds.forEach((kind, d) => {
      this.devicePort[d] = port;
      this.jacStart[d] = jac;
      port += PORT_COUNT[kind];
      jac += PORT_COUNT[kind] * PORT_COUNT[kind];
    });
    this.blockDevice = new Int32Array(model.blockStart.length);
    let device = 0;
    model.blockStart.forEach((start, j) => {
      while (device < order.length && this.devicePort[device] < start) device++;
      this.blockDevice[j] = device;
    });
    const diodes = this.kinds.flatMap((kind, d) => (kind === DeviceKind.Junction ? [d] : []));
    this.diodeJac = Int32Array.from(diodes, (d) => this.jacStart[d]);
    // The named stages' definition (dsp/conduction.ts): the string's zero-bias conductance Is / (m n Vt)
    // plus a share of the conductance the rest of the circuit shows its port (1 / |F_kk|).
    this.diodeThreshold = Float64Array.from(diodes, (d) => {
      const port = this.devicePort[d];
      const params = this.paramStart[d];
      return conductionThresholdSiemens(this.params[params] / this.params[params + 1], 1 / Math.abs(model.f[port * model.ports + port]));
    });
    this.blockJacEnd = Int32Array.from({ length: model.blockStart.length - 1 }, (_, j) => {
      const end = this.blockDevice[j + 1];
      return end < order.length ? this.jacStart[end] : jac;
    });
    const ports = model.ports;
    let largestBlock = 0;
    for (let j = 0; j + 1 < model.blockStart.length; j++) largestBlock = Math.max(largestBlock, model.blockStart[j + 1] - model.blockStart[j]);
    this.x = new Float64Array(model.states);
    this.p = new Float64Array(ports);
    this.v = new Float64Array(ports);
    this.i = new Float64Array(ports);
    this.jac = new Float64Array(jac);
    this.vTrial = new Float64Array(ports);
    this.iTrial = new Float64Array(ports);
    this.jacTrial = new Float64Array(jac);
    this.residual = new Float64Array(largestBlock);
    this.step = new Float64Array(largestBlock);
    this.newton = new Float64Array(largestBlock * largestBlock);
    this.pivots = new Int32Array(largestBlock);
    this.columnScale = new Float64Array(largestBlock);
    this.pSolved = new Float64Array(ports);
    this.vSolved = new Float64Array(ports);
    this.iSolved = new Float64Array(ports);
    this.pTarget = new Float64Array(ports);
    this.reset();
    this.kernel = compileDkKernel(
      {
        model,
        kinds: this.kinds,
        portCounts: this.kinds.map((kind) => PORT_COUNT[kind]),
        deviceParams: order.map((d) => this.params.slice(system.deviceParamStart[d], d + 1 < system.deviceKinds.length ? system.deviceParamStart[d + 1] : this.params.length)),
        devicePort: this.devicePort,
        jacStart: this.jacStart,
        blockDevice: this.blockDevice,
        diodeJac: this.diodeJac,
        diodeThreshold: this.diodeThreshold,
        tolerance: TOLERANCE_VOLTS,
      },
      this,
    );
  }

  /** True when this circuit has diode strings to meter. */
  get hasDiodes(): boolean {
    return this.diodeJac.length > 0;
  }

  reset(): void {
    this.conductingSamples = 0;
    this.countedSamples = 0;
    this.x.set(this.m.restState);
    this.i.set(this.m.restPortAmps);
    this.iSolved.set(this.m.restPortAmps);
    // At rest the drive and the port voltages are those of the operating point: p = D x + e0, v = p + F i.
    const m = this.m;
    for (let k = 0; k < m.ports; k++) {
      let sum = m.e0[k];
      for (let s = 0; s < m.states; s++) sum += m.d[k * m.states + s] * m.restState[s];
      this.pSolved[k] = sum;
    }
    for (let k = 0; k < m.ports; k++) {
      let sum = this.pSolved[k];
      for (let c = 0; c < m.ports; c++) sum += m.f[k * m.ports + c] * m.restPortAmps[c];
      this.vSolved[k] = sum;
    }
    this.v.set(this.vSolved);
    // The devices' Jacobian at rest: the kernel's first predictor step uses it.
    for (let j = 0; j + 1 < m.blockStart.length; j++) this.evaluateBlock(j, this.v, this.iTrial, this.jac);
  }

  process(block: Float64Array): void {
    this.kernel(block);
  }

  /** Evaluate the devices of block j at `v`, into `current` and `jacobian`. */
  private evaluateBlock(j: number, v: Float64Array, current: Float64Array, jacobian: Float64Array): void {
    for (let d = this.blockDevice[j]; d < this.blockDevice[j + 1]; d++) {
      evaluateDevice(this.kinds[d], this.params, this.paramStart[d], v, current, this.devicePort[d], jacobian, this.jacStart[d]);
    }
  }

  /**
   * Largest |g_k| over the block's ports, g = p + F i - v (the line search's merit); writes g into
   * `residual` and sets `converged` when every |g_k| <= TOLERANCE_VOLTS x max(1, |v_k|, |p_k|): relative
   * to the largest term of g, whose rounding no iterate can beat.
   */
  private residualNorm(lo: number, hi: number, v: Float64Array, current: Float64Array): number {
    const f = this.m.f;
    const ports = this.m.ports;
    let norm = 0;
    let converged = true;
    for (let r = lo; r < hi; r++) {
      let g = this.p[r] - v[r];
      for (let c = lo; c < hi; c++) g += f[r * ports + c] * current[c];
      this.residual[r - lo] = g;
      const size = Math.abs(g);
      if (!(size <= norm)) norm = size; // NaN propagates as "largest"
      if (!(size <= TOLERANCE_VOLTS * Math.max(1, Math.abs(v[r]), Math.abs(this.p[r])))) converged = false;
    }
    this.converged = converged;
    return norm;
  }

  /**
   * The robust solve of block j (KernelHost): `p` holds this sample's drive for the block, including
   * the blocks solved before it; `pSolved`, `vSolved`, `iSolved` the last sample's solution. Leaves
   * the block's solution in `v`, `i` and `jac`, and the fallback counts updated.
   */
  solveBlockRobustly(j: number): void {
    const m = this.m;
    const f = m.f;
    const ports = m.ports;
    const lo = m.blockStart[j];
    const hi = m.blockStart[j + 1];
    const v = this.v;
    const i = this.i;
    // Predictor: last sample's currents through this sample's linear part.
    for (let r = lo; r < hi; r++) {
      i[r] = this.iSolved[r];
      let sum = this.p[r];
      for (let c = lo; c < hi; c++) sum += f[r * ports + c] * i[c];
      v[r] = sum;
    }
    if (!this.newtonBlock(j, lo, hi)) {
      this.fallbackSamples++;
      if (!this.homotopy(j, lo, hi, HOMOTOPY_STEPS) && !this.homotopy(j, lo, hi, HOMOTOPY_STEPS_FINE)) {
        this.residualNorm(lo, hi, v, i);
        if (!this.withinHoldResidual(lo, hi)) {
          this.holdSamples++;
          for (let r = lo; r < hi; r++) {
            v[r] = this.vSolved[r];
            i[r] = this.iSolved[r];
          }
        }
      }
    }
    for (let r = lo; r < hi; r++) {
      this.pSolved[r] = this.p[r];
      this.vSolved[r] = v[r];
      this.iSolved[r] = i[r];
    }
  }

  /** The best iterate (its residual in `residual`) is close enough to use: every |g_k| <= HOLD_RESIDUAL x max(1, |v_k|, |p_k|). */
  private withinHoldResidual(lo: number, hi: number): boolean {
    for (let r = lo; r < hi; r++) if (!(Math.abs(this.residual[r - lo]) <= HOLD_RESIDUAL * Math.max(1, Math.abs(this.v[r]), Math.abs(this.p[r])))) return false;
    return true;
  }

  /**
   * Homotopy in the input: move the block's drive from the last solved sample's to this sample's in
   * `steps` equal steps, each solved by Newton from the one before. True when every step converged;
   * `p` holds this sample's drive afterwards either way.
   */
  private homotopy(j: number, lo: number, hi: number, steps: number): boolean {
    const v = this.v;
    const i = this.i;
    for (let r = lo; r < hi; r++) {
      this.pTarget[r] = this.p[r];
      v[r] = this.vSolved[r];
      i[r] = this.iSolved[r];
    }
    let converged = true;
    for (let step = 1; step <= steps && converged; step++) {
      const t = step / steps;
      for (let r = lo; r < hi; r++) this.p[r] = this.pSolved[r] + t * (this.pTarget[r] - this.pSolved[r]);
      converged = this.newtonBlock(j, lo, hi);
    }
    for (let r = lo; r < hi; r++) this.p[r] = this.pTarget[r];
    return converged;
  }

  /** Damped Newton on block j from the voltages in `v`; true when converged (`v`, `i` hold the best iterate either way). */
  private newtonBlock(j: number, lo: number, hi: number): boolean {
    const m = this.m;
    const f = m.f;
    const ports = m.ports;
    const size = hi - lo;
    const v = this.v;
    const i = this.i;
    this.evaluateBlock(j, v, i, this.jac);
    let norm = this.residualNorm(lo, hi, v, i);
    let converged = this.converged;
    let uphill = 0;
    for (let iteration = 0; iteration < MAX_ITERATIONS && !converged; iteration++) {
      // Newton matrix I - F J over the block (J is block-diagonal by device).
      const a = this.newton;
      a.fill(0, 0, size * size);
      for (let r = 0; r < size; r++) a[r * size + r] = 1;
      for (let d = this.blockDevice[j]; d < this.blockDevice[j + 1]; d++) {
        const k = PORT_COUNT[this.kinds[d]];
        const first = this.devicePort[d];
        const jacAt = this.jacStart[d];
        for (let r = 0; r < size; r++) {
          for (let q = 0; q < k; q++) {
            const fr = f[(lo + r) * ports + first + q];
            if (fr === 0) continue;
            for (let col = 0; col < k; col++) a[r * size + (first - lo + col)] -= fr * this.jac[jacAt + q * k + col];
          }
        }
      }
      if (!factorLu(a, size, this.pivots, this.columnScale)) return false;
      const step = this.step;
      for (let r = 0; r < size; r++) step[r] = this.residual[r];
      solveLu(a, size, this.pivots, step);
      // The limited full step, then shorter ones until the residual shrinks.
      for (let r = lo; r < hi; r++) this.vTrial[r] = v[r] + step[r - lo];
      for (let d = this.blockDevice[j]; d < this.blockDevice[j + 1]; d++) {
        limitDeviceStep(this.kinds[d], this.params, this.paramStart[d], v, this.vTrial, this.devicePort[d]);
      }
      let limited = false;
      for (let r = lo; r < hi; r++) {
        const limitedStep = this.vTrial[r] - v[r];
        if (limitedStep !== step[r - lo]) limited = true;
        step[r - lo] = limitedStep;
      }
      let scale = 1;
      let accepted = false;
      for (let halving = 0; halving <= MAX_HALVINGS && !accepted; halving++) {
        for (let r = lo; r < hi; r++) this.vTrial[r] = v[r] + scale * step[r - lo];
        this.evaluateBlock(j, this.vTrial, this.iTrial, this.jacTrial);
        const trialNorm = this.residualNorm(lo, hi, this.vTrial, this.iTrial);
        // A junction-limited step is taken whole, as circuit simulators do: coming down an
        // exponential, the residual may grow before it falls (at most MAX_UPHILL_STEPS times a solve,
        // so a limited step cannot cycle).
        if (trialNorm < norm || this.converged || (limited && halving === 0 && uphill < MAX_UPHILL_STEPS)) {
          if (!(trialNorm < norm)) uphill++;
          norm = trialNorm;
          accepted = true;
        }
        scale *= 0.5;
      }
      if (!accepted) {
        this.residualNorm(lo, hi, v, i); // `residual` back to the kept iterate's
        return false;
      }
      for (let r = lo; r < hi; r++) {
        v[r] = this.vTrial[r];
        i[r] = this.iTrial[r];
      }
      for (let q = this.jacStart[this.blockDevice[j]]; q < this.blockJacEnd[j]; q++) this.jac[q] = this.jacTrial[q];
      converged = this.converged;
    }
    return converged;
  }
}
