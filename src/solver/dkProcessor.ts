/**
 * Runs a DK model sample by sample (see dkModel.ts). Each block of coupled ports is solved by damped
 * Newton-Raphson on g(v) = p + F f(v) - v:
 *   - warm start: the predictor v = p + F i with the block's currents of the previous sample;
 *   - each step solves (I - F J) dv = g(v) and is halved (up to MAX_HALVINGS times) until the
 *     residual shrinks (backtracking line search);
 *   - at most MAX_ITERATIONS steps; stops when |g| < TOLERANCE_VOLTS.
 * Fallback: when a block does not converge (cap reached, or no step reduces the residual) the
 * iterate with the smallest residual so far is kept and `fallbackSamples` counts it; device
 * exponentials are limited (devices.ts), so that iterate is finite. The hot loop allocates nothing.
 */
import type { Processor } from '../circuit/processor.js';
import { factorLu, solveLu } from './denseLu.js';
import { evaluateDevice, PORT_COUNT, type DeviceKind } from './devices.js';
import type { DkModel } from './dkModel.js';
import type { MnaSystem } from './mna.js';

export const MAX_ITERATIONS = 50;
export const MAX_HALVINGS = 12;
export const TOLERANCE_VOLTS = 1e-9;

export class DkProcessor implements Processor {
  readonly latencySamples = 0;
  /** Samples where a block's Newton solve stopped unconverged and kept its best iterate. */
  fallbackSamples = 0;

  private readonly m: DkModel;
  private readonly params: Float64Array;
  private readonly kinds: DeviceKind[];
  private readonly paramStart: Int32Array;
  private readonly devicePort: Int32Array; // first solve-order port of each solve-order device
  private readonly jacStart: Int32Array;
  private readonly blockDevice: Int32Array; // first device of each block, plus the end
  private readonly blockJacEnd: Int32Array; // end of each block's Jacobian entries
  private x: Float64Array;
  private xNext: Float64Array;
  private readonly p: Float64Array;
  private readonly v: Float64Array;
  private readonly i: Float64Array;
  private readonly jac: Float64Array;
  private readonly vTrial: Float64Array;
  private readonly iTrial: Float64Array;
  private readonly jacTrial: Float64Array;
  private readonly residual: Float64Array;
  private readonly step: Float64Array;
  private readonly newton: Float64Array;
  private readonly pivots: Int32Array;

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
    this.blockJacEnd = Int32Array.from({ length: model.blockStart.length - 1 }, (_, j) => {
      const end = this.blockDevice[j + 1];
      return end < order.length ? this.jacStart[end] : jac;
    });
    const ports = model.ports;
    let largestBlock = 0;
    for (let j = 0; j + 1 < model.blockStart.length; j++) largestBlock = Math.max(largestBlock, model.blockStart[j + 1] - model.blockStart[j]);
    this.x = new Float64Array(model.states);
    this.xNext = new Float64Array(model.states);
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
    this.reset();
  }

  reset(): void {
    this.x.set(this.m.restState);
    this.i.set(this.m.restPortAmps);
  }

  process(block: Float64Array): void {
    const m = this.m;
    const states = m.states;
    const ports = m.ports;
    const blocks = m.blockStart.length - 1;
    for (let n = 0; n < block.length; n++) {
      const u = block[n];
      const x = this.x;
      for (let k = 0; k < ports; k++) {
        let sum = m.e0[k] + m.e[k] * u;
        for (let s = 0; s < states; s++) sum += m.d[k * states + s] * x[s];
        this.p[k] = sum;
      }
      for (let j = 0; j < blocks; j++) this.solveBlock(j);
      let y = m.h0 + m.h * u - m.restOutput;
      for (let s = 0; s < states; s++) y += m.g[s] * x[s];
      for (let k = 0; k < ports; k++) y += m.k[k] * this.i[k];
      const next = this.xNext;
      for (let r = 0; r < states; r++) {
        let sum = m.b0[r] + m.b[r] * u;
        for (let s = 0; s < states; s++) sum += m.a[r * states + s] * x[s];
        for (let k = 0; k < ports; k++) sum += m.c[r * ports + k] * this.i[k];
        next[r] = sum;
      }
      if (y - y !== 0) {
        // Only reachable from non-finite input: restart at rest rather than pass NaN or Inf on.
        this.reset();
        y = 0;
      } else {
        this.xNext = x;
        this.x = next;
      }
      block[n] = y;
    }
  }

  /** Evaluate the devices of block j at `v`, into `current` and `jacobian`. */
  private evaluateBlock(j: number, v: Float64Array, current: Float64Array, jacobian: Float64Array): void {
    for (let d = this.blockDevice[j]; d < this.blockDevice[j + 1]; d++) {
      evaluateDevice(this.kinds[d], this.params, this.paramStart[d], v, current, this.devicePort[d], jacobian, this.jacStart[d]);
    }
  }

  /** Largest |g(v)| over the block's ports, g = p + F i - v; writes g into `residual`. */
  private residualNorm(lo: number, hi: number, v: Float64Array, current: Float64Array): number {
    const f = this.m.f;
    const ports = this.m.ports;
    let norm = 0;
    for (let r = lo; r < hi; r++) {
      let g = this.p[r] - v[r];
      for (let c = lo; c < hi; c++) g += f[r * ports + c] * current[c];
      this.residual[r - lo] = g;
      const size = Math.abs(g);
      if (!(size <= norm)) norm = size; // NaN propagates as "largest"
    }
    return norm;
  }

  private solveBlock(j: number): void {
    const m = this.m;
    const f = m.f;
    const ports = m.ports;
    const lo = m.blockStart[j];
    const hi = m.blockStart[j + 1];
    const size = hi - lo;
    const v = this.v;
    const i = this.i;
    // Contributions of the blocks already solved this sample.
    for (let r = lo; r < hi; r++) {
      let sum = this.p[r];
      for (let c = 0; c < lo; c++) sum += f[r * ports + c] * i[c];
      this.p[r] = sum;
    }
    // Predictor: last sample's currents through this sample's linear part.
    for (let r = lo; r < hi; r++) {
      let sum = this.p[r];
      for (let c = lo; c < hi; c++) sum += f[r * ports + c] * i[c];
      v[r] = sum;
    }
    this.evaluateBlock(j, v, i, this.jac);
    let norm = this.residualNorm(lo, hi, v, i);
    let converged = norm < TOLERANCE_VOLTS;
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
      if (!factorLu(a, size, this.pivots)) break;
      const step = this.step;
      for (let r = 0; r < size; r++) step[r] = this.residual[r];
      solveLu(a, size, this.pivots, step);
      let scale = 1;
      let accepted = false;
      for (let halving = 0; halving <= MAX_HALVINGS && !accepted; halving++) {
        for (let r = lo; r < hi; r++) this.vTrial[r] = v[r] + scale * step[r - lo];
        this.evaluateBlock(j, this.vTrial, this.iTrial, this.jacTrial);
        const trialNorm = this.residualNorm(lo, hi, this.vTrial, this.iTrial);
        if (trialNorm < norm) {
          norm = trialNorm;
          accepted = true;
        }
        scale *= 0.5;
      }
      if (!accepted) break;
      for (let r = lo; r < hi; r++) {
        v[r] = this.vTrial[r];
        i[r] = this.iTrial[r];
      }
      for (let q = this.jacStart[this.blockDevice[j]]; q < this.blockJacEnd[j]; q++) this.jac[q] = this.jacTrial[q];
      converged = norm < TOLERANCE_VOLTS;
    }
    if (!converged) this.fallbackSamples++;
  }
}
