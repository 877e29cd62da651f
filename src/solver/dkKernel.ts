/**
 * Generates the per-sample loop of one DK model (dkModel.ts) as JavaScript, compiled once per
 * processor: the model's matrices become inlined constants with their zero terms left out, the state,
 * port voltages, currents and Jacobian live in locals for a whole block, and each device's equations
 * come from devices.ts with its constants in place. Each block of coupled ports gets a fast solve:
 * undamped Newton with junction limiting from the predictor v = p + F i (last sample's currents),
 * at most FAST_NEWTON_ITERATIONS steps, the Newton system I - F J eliminated in straight-line code
 * without pivoting (its structural zeros skipped). A block it does not settle (a pivot below
 * PIVOT_FLOOR, or no convergence) goes to the processor's robust solve from the same start (damped
 * Newton with pivoting, then homotopy, then hold: dkProcessor.ts), so the fast path changes the
 * cost, never the answer's tolerance. See docs/models.md, "Nonlinear solves" and "Speed".
 */
import type { DeviceKind } from '../netlist/deviceKind.js';
import { compileWithDeviceHelpers, emitDeviceEvaluation, emitDeviceLimit, type DeviceSlots, type LimitSlots } from './devices.js';
import type { DkModel } from './dkModel.js';

/** Newton steps the generated solve takes before it hands a block to the robust solve. */
export const FAST_NEWTON_ITERATIONS = 8;
/** A pivot of I - F J smaller than this (it is dimensionless, about 1 or more on its diagonal) sends the block to the robust solve, which pivots. */
export const PIVOT_FLOOR = 1e-12;

/** The solver's layout of the model's devices, in solve order. */
export interface KernelLayout {
  model: DkModel;
  kinds: readonly DeviceKind[];
  portCounts: readonly number[];
  /** Constants of each device (in solve order). */
  deviceParams: readonly Float64Array[];
  devicePort: Int32Array;
  jacStart: Int32Array;
  /** First device of each block, plus the end. */
  blockDevice: Int32Array;
  /** Jacobian index and conduction threshold (siemens) of each diode string. */
  diodeJac: Int32Array;
  diodeThreshold: Float64Array;
  tolerance: number;
}

/** What the kernel reads and writes on its processor. */
export interface KernelHost {
  x: Float64Array;
  p: Float64Array;
  v: Float64Array;
  i: Float64Array;
  jac: Float64Array;
  pSolved: Float64Array;
  vSolved: Float64Array;
  iSolved: Float64Array;
  conductingSamples: number;
  countedSamples: number;
  reset(): void;
  /** Robust solve of block j from `p` (this sample's drive) and `iSolved`, `vSolved`, `pSolved` (the last sample's). */
  solveBlockRobustly(j: number): void;
}

export type DkKernel = (block: Float64Array) => void;

/** A JavaScript literal that reads back as exactly `value`. */
function literal(value: number): string {
  if (!Number.isFinite(value)) throw new Error(`circuit kernel: non-finite constant ${value}`);
  return value < 0 || Object.is(value, -0) ? `(${Object.is(value, -0) ? '-0' : String(value)})` : String(value);
}

/** `start + c0 * n0 + c1 * n1 ...` with the zero coefficients left out ('0' when nothing is left). */
function linearSum(start: string | null, terms: ReadonlyArray<readonly [number, string]>): string {
  const parts = start === null ? [] : [start];
  for (const [coefficient, name] of terms) if (coefficient !== 0) parts.push(`${literal(coefficient)} * ${name}`);
  return parts.length === 0 ? '0' : parts.join(' + ');
}

function range(from: number, to: number): number[] {
  return Array.from({ length: Math.max(0, to - from) }, (_, k) => from + k);
}

class KernelSource {
  private readonly m: DkModel;
  private readonly layout: KernelLayout;
  private readonly jacCount: number;

  constructor(layout: KernelLayout) {
    this.layout = layout;
    this.m = layout.model;
    const last = layout.kinds.length - 1;
    this.jacCount = last < 0 ? 0 : layout.jacStart[last] + layout.portCounts[last] ** 2;
  }

  private f(row: number, col: number): number {
    return this.m.f[row * this.m.ports + col];
  }

  /** Locals loaded from, and stored to, the host's arrays. */
  private transfers(): { load: string; store: string } {
    const { states, ports } = this.m;
    const groups: Array<[string, string, number]> = [
      ['x', 'X', states],
      ['v', 'V', ports],
      ['i', 'I', ports],
      ['ps', 'PS', ports],
      ['J', 'JAC', this.jacCount],
    ];
    const load = groups.flatMap(([local, array, count]) => range(0, count).map((k) => `${local}${k} = ${array}[${k}];`)).join('\n');
    const store = groups.flatMap(([local, array, count]) => range(0, count).map((k) => `${array}[${k}] = ${local}${k};`)).join('\n');
    const solved = range(0, ports).map((k) => `VS[${k}] = v${k}; IS[${k}] = i${k};`).join('\n');
    return { load, store: `${store}\n${solved}` };
  }

  /** The locals of device d as emitter slots: its constants inlined, v/i/J/t locals of its ports. */
  private slots(d: number): DeviceSlots & LimitSlots {
    const { portCounts, deviceParams, devicePort, jacStart } = this.layout;
    return {
      param: (k) => literal(deviceParams[d][k]),
      volts: (q) => `v${devicePort[d] + q}`,
      amps: (q) => `i${devicePort[d] + q}`,
      jacobian: (row, col) => `J${jacStart[d] + row * portCounts[d] + col}`,
      limited: (q) => `t${devicePort[d] + q}`,
    };
  }

  /** `emit` for every device of block j, joined. */
  private forBlockDevices(j: number, emit: (kind: DeviceKind, slots: DeviceSlots & LimitSlots) => string): string {
    const { kinds, blockDevice } = this.layout;
    return range(blockDevice[j], blockDevice[j + 1])
      .map((d) => emit(kinds[d], this.slots(d)))
      .join('\n');
  }

  /**
   * Straight-line solve of (I - F J) d = g over ports lo..hi-1 by Gaussian elimination without
   * pivoting; runs `exit` (a break) on a pivot below PIVOT_FLOOR. Leaves d<r>.
   */
  private newtonStep(lo: number, hi: number, j: number, exit: string): string {
    const { portCounts, devicePort, jacStart, blockDevice } = this.layout;
    const size = hi - lo;
    const lines: string[] = [];
    const entry: Array<Array<string | null>> = range(0, size).map(() => range(0, size).map(() => null));
    // I - F J: J is block-diagonal by device, so column c of F J only sums over c's own device's ports.
    for (let d = blockDevice[j]; d < blockDevice[j + 1]; d++) {
      const first = devicePort[d];
      const k = portCounts[d];
      for (let r = lo; r < hi; r++) {
        for (let col = 0; col < k; col++) {
          const c = first + col;
          const terms = range(0, k).flatMap((q) => (this.f(r, first + q) === 0 ? [] : [`${literal(this.f(r, first + q))} * J${jacStart[d] + q * k + col}`]));
          if (terms.length === 0 && r !== c) continue;
          const name = `m${r - lo}_${c - lo}`;
          lines.push(`let ${name} = ${r === c ? '1' : '0'} - ${terms.length === 0 ? '0' : terms.join(' - ')};`);
          entry[r - lo][c - lo] = name;
        }
      }
    }
    for (let r = 0; r < size; r++) lines.push(`let d${r} = g${lo + r};`);
    for (let k = 0; k < size; k++) {
      const pivot = entry[k][k] as string;
      lines.push(`if (!(Math.abs(${pivot}) > ${literal(PIVOT_FLOOR)})) ${exit};`);
      for (let r = k + 1; r < size; r++) {
        const below = entry[r][k];
        if (below === null) continue;
        lines.push(`const l${r}_${k} = ${below} / ${pivot};`);
        for (let c = k + 1; c < size; c++) {
          const right = entry[k][c];
          if (right === null) continue;
          const target = entry[r][c];
          if (target === null) {
            entry[r][c] = `m${r}_${c}`;
            lines.push(`let m${r}_${c} = -(l${r}_${k} * ${right});`);
          } else lines.push(`${target} -= l${r}_${k} * ${right};`);
        }
        lines.push(`d${r} -= l${r}_${k} * d${k};`);
      }
    }
    for (let k = size - 1; k >= 0; k--) {
      const terms = range(k + 1, size).flatMap((c) => (entry[k][c] === null ? [] : [` - ${entry[k][c]} * d${c}`]));
      lines.push(`d${k} = (d${k}${terms.join('')}) / ${entry[k][k]};`);
    }
    return lines.join('\n');
  }

  private blockSolve(j: number): string {
    const m = this.m;
    const lo = m.blockStart[j];
    const hi = m.blockStart[j + 1];
    const ports = range(lo, hi);
    const { blockDevice, jacStart, portCounts } = this.layout;
    const jacFrom = jacStart[blockDevice[j]];
    const lastDevice = blockDevice[j + 1] - 1;
    const jacTo = jacStart[lastDevice] + portCounts[lastDevice] ** 2;
    const earlier = ports
      .map((r) => {
        const terms = range(0, lo).map((c) => [this.f(r, c), `i${c}`] as const);
        return terms.some(([coefficient]) => coefficient !== 0) ? `p${r} = ${linearSum(`p${r}`, terms)};` : '';
      })
      .join('\n');
    const own = (r: number): ReadonlyArray<readonly [number, string]> => ports.map((c) => [this.f(r, c), `i${c}`] as const);
    const tolerance = literal(this.layout.tolerance);
    const limitedUpdate = [ports.map((r) => `let t${r} = v${r} + d${r - lo};`).join('\n'), this.forBlockDevices(j, emitDeviceLimit), ports.map((r) => `v${r} = t${r};`).join('\n')].join('\n');
    const convergedTest = ports.map((r) => `Math.abs(g${r}) <= ${tolerance} * Math.max(1, Math.abs(v${r}), Math.abs(p${r}))`).join(' && ');
    return `// block ${j}: ports ${lo}..${hi - 1}
${earlier}
{
predict${j}: {
${ports.map((r) => `const g${r} = ${linearSum(`p${r} - v${r}`, own(r))};`).join('\n')}
${this.newtonStep(lo, hi, j, `break predict${j}`)}
${limitedUpdate}
}
let settled = false;
for (let iteration = 0; iteration < ${FAST_NEWTON_ITERATIONS}; iteration++) {
${this.forBlockDevices(j, emitDeviceEvaluation)}
${ports.map((r) => `const g${r} = ${linearSum(`p${r} - v${r}`, own(r))};`).join('\n')}
if (${convergedTest}) { settled = true; break; }
${this.newtonStep(lo, hi, j, 'break')}
${limitedUpdate}
}
if (!settled) {
${ports.map((r) => `P[${r}] = p${r}; PS[${r}] = ps${r}; VS[${r}] = vs${r}; IS[${r}] = is${r}; I[${r}] = is${r};`).join('\n')}
host.solveBlockRobustly(${j});
${ports.map((r) => `v${r} = V[${r}]; i${r} = I[${r}];`).join('\n')}
${range(jacFrom, jacTo).map((q) => `J${q} = JAC[${q}];`).join('\n')}
}
}`;
  }

  source(): string {
    const m = this.m;
    const { states, ports } = m;
    const blocks = m.blockStart.length - 1;
    const { load, store } = this.transfers();
    const declare = (prefix: string, count: number): string => (count === 0 ? '' : `let ${range(0, count).map((k) => `${prefix}${k} = 0`).join(', ')};`);
    const drive = range(0, ports)
      .map((k) => `let p${k} = ${linearSum(linearSum(m.e0[k] === 0 ? null : literal(m.e0[k]), [[m.e[k], 'u']]), range(0, states).map((s) => [m.d[k * states + s], `x${s}`] as const))};`)
      .join('\n');
    const { diodeJac, diodeThreshold } = this.layout;
    const metering =
      diodeJac.length === 0
        ? ''
        : `host.conductingSamples += ${Array.from(diodeJac, (q, k) => `(J${q} > ${literal(diodeThreshold[k])})`).join(' | ')};\nhost.countedSamples += 1;`;
    const output = linearSum(
      linearSum(literal(m.h0 - m.restOutput), [[m.h, 'u']]),
      [...range(0, states).map((s) => [m.g[s], `x${s}`] as const), ...range(0, ports).map((k) => [m.k[k], `i${k}`] as const)],
    );
    const update = range(0, states)
      .map((r) => {
        const start = linearSum(m.b0[r] === 0 ? null : literal(m.b0[r]), [[m.b[r], 'u']]);
        const terms = [...range(0, states).map((s) => [m.a[r * states + s], `x${s}`] as const), ...range(0, ports).map((k) => [m.c[r * ports + k], `i${k}`] as const)];
        return `const n${r} = ${linearSum(start, terms)};`;
      })
      .join('\n');
    return `const X = host.x, P = host.p, V = host.v, I = host.i, JAC = host.jac, PS = host.pSolved, VS = host.vSolved, IS = host.iSolved;
return function process(block) {
${declare('x', states)}
${declare('v', ports)}
${declare('i', ports)}
${declare('ps', ports)}
${declare('J', this.jacCount)}
${load}
for (let n = 0; n < block.length; n++) {
const u = block[n];
${drive}
${range(0, ports).map((k) => `const vs${k} = v${k}, is${k} = i${k};`).join('\n')}
${range(0, blocks).map((j) => this.blockSolve(j)).join('\n')}
${range(0, ports).map((k) => `ps${k} = p${k};`).join('\n')}
${metering}
let y = ${output};
${update}
if (y - y !== 0) {
// Only reachable from non-finite input: restart at rest rather than pass NaN or Inf on.
host.reset();
${load}
y = 0;
} else {
${range(0, states).map((r) => `x${r} = n${r};`).join('\n')}
}
block[n] = y;
}
${store}
};`;
  }
}

/**
 * Compiled kernels by source. Processors of one model (a render's and its warm-up copy, the renders of
 * one variant on one thread) share one compiled function, hence one set of JIT type feedback, so the
 * warm-up (circuit/kernelWarmUp.ts) prepares the kernel the render runs.
 */
const compiledKernels = new Map<string, (host: KernelHost) => DkKernel>();
const KERNEL_CACHE_SIZE = 32;

/** Compile the per-sample loop of `layout`'s model, running on `host`'s state. */
export function compileDkKernel(layout: KernelLayout, host: KernelHost): DkKernel {
  const source = new KernelSource(layout).source();
  let factory = compiledKernels.get(source);
  if (factory === undefined) {
    factory = compileWithDeviceHelpers<(host: KernelHost) => DkKernel>(`return function bindKernel(host) {\n${source}\n};`);
    if (compiledKernels.size >= KERNEL_CACHE_SIZE) compiledKernels.delete(compiledKernels.keys().next().value as string);
    compiledKernels.set(source, factory);
  }
  return factory(host);
}
