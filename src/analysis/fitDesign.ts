/**
 * Fitting a design to a recording of the built circuit: chosen values ("free keys", the `--set` keys
 * of knobs, stage fields, element values and inline diode parameters) are moved so the model's render
 * of the dry take matches the recording, aligned first (alignTakes.ts).
 *
 * Cost: the error-to-signal ratio ESR = sum e^2 / sum w^2 of the pre-emphasised error e = P(g m - w)
 * between the model's render m and the aligned recording w, g the interface gain (least squares, or
 * fixed), P the first-order pre-emphasis 1 - 0.85 z^-1 (Wright, Damskagg, Valimaki, DAFx 2019: it
 * weights the treble the ear hears; from memory). Method: Levenberg-Marquardt (Marquardt, J. SIAM
 * 11(2), 1963) on each key's coordinate (the logarithm of a positive value, a knob position as is),
 * bounded by clamping, with a forward-difference Jacobian. Uncertainty: s^2 (J^T J)^-1 with
 * s^2 = SSE / (N - p) (audio samples are correlated, so these are lower bounds). Identifiability: the
 * eigenvectors of the column-normalised J^T J with eigenvalue below IDENTIFIABLE_RATIO of the largest
 * name the keys that move the output only together (an RC section's R and C); they are held.
 */
import { buildChain } from '../circuit/chain.js';
import { renderChannel } from '../circuit/renderChannel.js';
import type { PartsLibrary } from '../design/parts.js';
import { parseDesignText } from '../design/parseDesign.js';
import { resolveDesign } from '../design/resolve.js';
import type { Design, DiodeParams, Resistance, Stage } from '../design/types.js';
import type { OversampleFactor } from '../dsp/oversampler.js';
import { UserError } from '../errors.js';
import { welch } from '../dsp/welch.js';
import { OCTAVE_BANDS_HZ } from '../dsp/audioBand.js';
import { advance, alignRecording } from './alignTakes.js';

const PRE_EMPHASIS = 0.85;
const EDGE_SECONDS = 0.05;
const MAX_ITERATIONS = 30;
/** Forward-difference step in a key's coordinate (0.1 % of a logarithmic value). */
const DIFFERENCE_STEP = 1e-3;
const IDENTIFIABLE_RATIO = 1e-6;
/** Stop when an accepted step lowers the cost by less than this fraction. */
const CONVERGED_RELATIVE = 1e-6;
/** The fitted latency stays within this many samples of the first estimate; its difference step. */
const LATENCY_SPAN_SAMPLES = 4;
const LATENCY_STEP_SAMPLES = 0.01;

/** One free key: its coordinate is ln(value) (positive values) or the value (knob positions). */
interface FreeKey {
  key: string;
  initial: number;
  min: number;
  max: number;
  logarithmic: boolean;
  /** The inline diode this parameter belongs to ("stage.field") and which parameter, for diode keys. */
  diode?: { field: string; param: keyof Pick<DiodeParams, 'saturationCurrent' | 'ideality' | 'seriesResistance'>; base: DiodeParams };
}

export interface FitInputs {
  designText: string;
  designFile: string;
  parts: PartsLibrary;
  /** `--set` overrides applied before the fit. */
  overrides: string[];
  /** `key` or `key=min..max`. */
  free: string[];
  dry: Float64Array;
  wet: Float64Array;
  sampleRate: number;
  wetName: string;
  oversample: OversampleFactor;
  latencySamples?: number;
  gainDb?: number;
  onProgress?: (fraction: number) => void;
}

export interface FitReport {
  latencySamples: number;
  latencyMs: number;
  gainDb: number;
  esrBeforePercent: number;
  esrAfterPercent: number;
  esrBeforeDb: number | null;
  esrAfterDb: number | null;
  fitted: { key: string; value: number; initial: number; uncertainty: number | null; identifiable: boolean }[];
  residualByOctave: { hz: number; db: number | null }[];
  /** The fitted values as `--set` overrides (after the run's own). */
  overrides: string[];
}

const DIODE_PARAMS = ['saturationCurrent', 'ideality', 'seriesResistance'] as const;

function stageById(design: Design, id: string, key: string): Stage {
  const stage = design.stages.find((s) => s.id === id);
  if (stage === undefined) throw new UserError(`--free ${key}: no stage "${id}" in the design`);
  return stage;
}

/** The current value of a `--set` key in the parsed design, or null if it is not a number the fit can move. */
function currentValue(design: Design, key: string): { value: number; diode?: FreeKey['diode'] } {
  const parts = key.split('.');
  if (parts.length === 1) {
    const position = design.knobs[key];
    if (position === undefined) throw new UserError(`--free ${key}: no knob "${key}" in the design`);
    return { value: position };
  }
  const stage = stageById(design, parts[0], key);
  if (stage.type === 'circuit') {
    const element = stage.elements.find((e) => e.id === parts[1]);
    if (element === undefined) throw new UserError(`--free ${key}: no element "${parts[1]}" in stage "${stage.id}"`);
    if (parts[2] === 'value' && (element.type === 'resistor' || element.type === 'pot')) return { value: element.ohms };
    if (parts[2] === 'value' && element.type === 'capacitor') return { value: element.farads };
    throw new UserError(`--free ${key}: only element values (stage.element.value) can be fitted in a circuit stage`);
  }
  const record = stage as unknown as Record<string, unknown>;
  const field = record[parts[1]];
  if (parts.length === 3 && (DIODE_PARAMS as readonly string[]).includes(parts[2]) && typeof field === 'object' && field !== null && 'saturationCurrent' in field) {
    const base = field as DiodeParams;
    const param = parts[2] as (typeof DIODE_PARAMS)[number];
    return { value: base[param], diode: { field: `${parts[0]}.${parts[1]}`, param, base } };
  }
  const value = parts.length === 2 ? field : typeof field === 'object' && field !== null ? (parts[2] === 'fixed' ? (field as { fixedOhms: number }).fixedOhms : parts[2] === 'pot' ? (field as { potOhms: number }).potOhms : undefined) : undefined;
  if (typeof value !== 'number') throw new UserError(`--free ${key}: not a numeric value of stage "${stage.id}" (fit a resistor, capacitor, pot part, knob or diode parameter)`);
  return { value };
}

function parseFreeKeys(design: Design, free: readonly string[]): FreeKey[] {
  return free.map((text) => {
    const [key, bounds] = text.split('=') as [string, string | undefined];
    const { value, diode } = currentValue(design, key.trim());
    const knob = !key.includes('.');
    const logarithmic = !knob && value > 0;
    let [min, max] = knob ? [0, 1] : logarithmic ? [value / 10, value * 10] : [0, Math.max(1, value * 10)];
    if (diode?.param === 'ideality') [min, max] = [Math.max(0.5, value / 2), value * 2];
    if (bounds !== undefined) {
      const match = /^\s*([^.]+(?:\.\d+)?(?:[eE][+-]?\d+)?)\s*\.\.\s*(.+)\s*$/.exec(bounds);
      const low = match ? Number(match[1]) : NaN;
      const high = match ? Number(match[2]) : NaN;
      if (!(low < high) || (logarithmic && !(low > 0))) throw new UserError(`--free ${text}: bounds must read min..max with min < max${logarithmic ? ' and min > 0' : ''}, e.g. ${key}=1000..10000`);
      [min, max] = [low, high];
    }
    if (!(value >= min && value <= max)) throw new UserError(`--free ${text}: the design's value ${value} lies outside the bounds ${min}..${max}`);
    return { key: key.trim(), initial: value, min, max, logarithmic, ...(diode ? { diode } : {}) };
  });
}

const toCoordinate = (k: FreeKey, value: number): number => (k.logarithmic ? Math.log(value) : value);
const toValue = (k: FreeKey, theta: number): number => (k.logarithmic ? Math.exp(theta) : theta);

/** The overrides that put `values` into the design (diode parameters of one part combined inline). */
function overridesFor(keys: readonly FreeKey[], values: readonly number[]): string[] {
  const diodes = new Map<string, DiodeParams>();
  const out: string[] = [];
  keys.forEach((k, i) => {
    if (k.diode) {
      const part = diodes.get(k.diode.field) ?? { ...k.diode.base };
      part[k.diode.param] = values[i];
      diodes.set(k.diode.field, part);
    } else out.push(`${k.key}=${values[i]}`);
  });
  for (const [field, d] of diodes) out.push(`${field}=${JSON.stringify({ saturationCurrent: d.saturationCurrent, ideality: d.ideality, seriesResistance: d.seriesResistance })}`);
  return out;
}

/**
 * Pre-emphasis, and the samples the cost counts: the first and last EDGE_SECONDS are left out (set to
 * 0), where the recording's fractional shift rings against the take's abrupt ends.
 */
function preEmphasis(signal: Float64Array, sampleRate: number): Float64Array {
  const out = new Float64Array(signal.length);
  const edge = Math.min(Math.round(EDGE_SECONDS * sampleRate), Math.floor(signal.length / 8));
  for (let n = edge; n < signal.length - edge; n++) out[n] = signal[n] - PRE_EMPHASIS * (n > 0 ? signal[n - 1] : 0);
  return out;
}

function dot(a: Float64Array, b: Float64Array): number {
  let sum = 0;
  for (let n = 0; n < a.length; n++) sum += a[n] * b[n];
  return sum;
}

/** Eigenvalues and eigenvectors of a small symmetric matrix (cyclic Jacobi; Golub & Van Loan 8.5). */
function symmetricEigen(matrix: number[][]): { values: number[]; vectors: number[][] } {
  const n = matrix.length;
  const a = matrix.map((row) => [...row]);
  const v: number[][] = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)));
  for (let sweep = 0; sweep < 50; sweep++) {
    let off = 0;
    for (let p = 0; p < n; p++) for (let q = p + 1; q < n; q++) off += a[p][q] ** 2;
    if (off < 1e-30) break;
    for (let p = 0; p < n; p++) {
      for (let q = p + 1; q < n; q++) {
        if (Math.abs(a[p][q]) < 1e-300) continue;
        const theta = (a[q][q] - a[p][p]) / (2 * a[p][q]);
        const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1);
        const s = t * c;
        for (let k = 0; k < n; k++) {
          const [akp, akq] = [a[k][p], a[k][q]];
          a[k][p] = c * akp - s * akq;
          a[k][q] = s * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {
          const [apk, aqk] = [a[p][k], a[q][k]];
          a[p][k] = c * apk - s * aqk;
          a[q][k] = s * apk + c * aqk;
        }
        for (let k = 0; k < n; k++) {
          const [vkp, vkq] = [v[k][p], v[k][q]];
          v[k][p] = c * vkp - s * vkq;
          v[k][q] = s * vkp + c * vkq;
        }
      }
    }
  }
  return { values: a.map((row, i) => row[i]), vectors: Array.from({ length: n }, (_, j) => v.map((row) => row[j])) };
}

/**
 * Keys (indices into `active`'s keys) that move the output only together with others: components of
 * the near-null eigenvectors of the column-normalised J^T J, or a column that is zero.
 */
function weakKeys(normal: number[][], active: number[]): Set<number> {
  const norms = active.map((_, a) => Math.sqrt(normal[a][a]));
  const scaled = normal.map((row, a) => row.map((x, b) => (norms[a] > 0 && norms[b] > 0 ? x / (norms[a] * norms[b]) : a === b ? 1 : 0)));
  const { values, vectors } = symmetricEigen(scaled);
  const largest = Math.max(...values);
  const weak = new Set<number>();
  values.forEach((value, e) => {
    if (value < IDENTIFIABLE_RATIO * largest) vectors[e].forEach((component, a) => Math.abs(component) > 0.1 && weak.add(active[a]));
  });
  active.forEach((i, a) => norms[a] === 0 && weak.add(i));
  return weak;
}

/** Solve the small dense system m x = b (Gaussian elimination with partial pivoting); null if singular. */
function solveSmall(m: number[][], b: number[]): number[] | null {
  const n = b.length;
  const a = m.map((row, i) => [...row, b[i]]);
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let row = col + 1; row < n; row++) if (Math.abs(a[row][col]) > Math.abs(a[pivot][col])) pivot = row;
    if (!(Math.abs(a[pivot][col]) > 1e-300)) return null;
    [a[col], a[pivot]] = [a[pivot], a[col]];
    for (let row = col + 1; row < n; row++) {
      const factor = a[row][col] / a[col][col];
      for (let k = col; k <= n; k++) a[row][k] -= factor * a[col][k];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let row = n - 1; row >= 0; row--) {
    let sum = a[row][n];
    for (let k = row + 1; k < n; k++) sum -= a[row][k] * x[k];
    x[row] = sum / a[row][row];
  }
  return x;
}

export function fitDesign(inputs: FitInputs): FitReport {
  const parse = (extra: string[]): Design<Resistance> => parseDesignText(inputs.designText, inputs.designFile, inputs.parts, [...inputs.overrides, ...extra]);
  const base = parse([]);
  const keys = parseFreeKeys(base, inputs.free);
  const render = (values: readonly number[]): Float64Array => {
    const design = resolveDesign(parse(overridesFor(keys, values)));
    return renderChannel(buildChain(design, { sampleRate: inputs.sampleRate, oversample: inputs.oversample }), inputs.dry);
  };
  const initialValues = keys.map((k) => k.initial);
  const initialRender = render(initialValues);
  const fixedGain = inputs.gainDb === undefined ? null : 10 ** (inputs.gainDb / 20);
  const clamp = (t: number[]): number[] => t.map((x, i) => Math.min(toCoordinate(keys[i], keys[i].max), Math.max(toCoordinate(keys[i], keys[i].min), x)));
  const valuesOf = (t: number[]): number[] => t.map((x, i) => toValue(keys[i], x));

  // The latency is first estimated against the model's render, which a model far from the circuit
  // biases (its phase differs); it is then fitted with the keys, within LATENCY_SPAN_SAMPLES.
  const latencyStart = inputs.latencySamples ?? alignRecording(initialRender, inputs.wet, inputs.sampleRate, inputs.wetName).latencySamples;
  const fitLatency = inputs.latencySamples === undefined;
  const targetAt = (latency: number): Float64Array => preEmphasis(advance(inputs.wet, latency), inputs.sampleRate);
  const startTarget = targetAt(latencyStart);
  const targetEnergy = dot(startTarget, startTarget);
  if (!(targetEnergy > 0)) throw new UserError(`${inputs.wetName}: the recording is silent`);
  /** Pre-emphasised error of a render against the recording at `latency`, at the best (or fixed) gain. */
  const errorOf = (rendered: Float64Array, target: Float64Array): { error: Float64Array; gain: number; cost: number } => {
    const model = preEmphasis(rendered, inputs.sampleRate);
    const modelEnergy = dot(model, model);
    const gain = fixedGain ?? (modelEnergy > 0 ? dot(model, target) / modelEnergy : 1);
    const error = new Float64Array(model.length);
    for (let n = 0; n < model.length; n++) error[n] = gain * model[n] - target[n];
    return { error, gain, cost: dot(error, error) };
  };
  const before = errorOf(initialRender, startTarget);
  // Coordinates: the keys', then (when fitted) the latency in samples.
  let theta = [...keys.map((k, i) => toCoordinate(k, initialValues[i])), ...(fitLatency ? [latencyStart] : [])];
  const clampAll = (t: number[]): number[] => [...clamp(t.slice(0, keys.length)), ...t.slice(keys.length).map((l) => Math.min(latencyStart + LATENCY_SPAN_SAMPLES, Math.max(latencyStart - LATENCY_SPAN_SAMPLES, l)))];
  const latencyOf = (t: number[]): number => (fitLatency ? t[keys.length] : latencyStart);
  let renderNow = initialRender;
  let targetNow = startTarget;
  let current = before;
  let held = theta.map(() => false);
  let normal: number[][] = [];
  let lambda = 1e-3;
  for (let iteration = 0; iteration < MAX_ITERATIONS; iteration++) {
    inputs.onProgress?.(iteration / MAX_ITERATIONS);
    const columns = theta.map((_, i) => {
      if (held[i]) return null;
      const stepped = [...theta];
      const isLatency = i === keys.length;
      stepped[i] += isLatency ? LATENCY_STEP_SAMPLES : DIFFERENCE_STEP;
      const { error } = isLatency ? errorOf(renderNow, targetAt(stepped[i])) : errorOf(render(valuesOf(stepped.slice(0, keys.length))), targetNow);
      const h = isLatency ? LATENCY_STEP_SAMPLES : DIFFERENCE_STEP;
      return error.map((e, n) => (e - current.error[n]) / h);
    });
    const active = columns.flatMap((c, i) => (c === null ? [] : [i]));
    if (active.length === 0) break;
    normal = active.map((i) => active.map((j) => dot(columns[i] as Float64Array, columns[j] as Float64Array)));
    const weak = weakKeys(normal, active);
    if (weak.size > 0) {
      held = held.map((h, i) => h || weak.has(i));
      continue;
    }
    const gradient = active.map((i) => dot(columns[i] as Float64Array, current.error));
    let improved = false;
    for (let attempt = 0; attempt < 10 && !improved; attempt++) {
      const damped = normal.map((row, r) => row.map((x, c) => (r === c ? x * (1 + lambda) : x)));
      const step = solveSmall(damped, gradient.map((g) => -g));
      if (step === null) break;
      const trial = [...theta];
      active.forEach((i, r) => (trial[i] += step[r]));
      const clamped = clampAll(trial);
      const trialRender = render(valuesOf(clamped.slice(0, keys.length)));
      const trialTarget = targetAt(latencyOf(clamped));
      const candidate = errorOf(trialRender, trialTarget);
      if (candidate.cost < current.cost) {
        const relative = (current.cost - candidate.cost) / current.cost;
        theta = clamped;
        current = candidate;
        renderNow = trialRender;
        targetNow = trialTarget;
        lambda = Math.max(1e-9, lambda / 10);
        improved = true;
        if (relative < CONVERGED_RELATIVE) iteration = MAX_ITERATIONS;
      } else lambda *= 10;
    }
    if (!improved) break;
  }
  const latencySamples = latencyOf(theta);
  const target = targetNow;
  theta = theta.slice(0, keys.length);
  const heldKeys = held.slice(0, keys.length);

  // Uncertainties from the last Jacobian of the identifiable keys.
  const activeKeys = held.flatMap((h, i) => (h ? [] : [i]));
  const sigmaSquared = current.cost / Math.max(1, target.length - activeKeys.length);
  const identity = activeKeys.map((_, a) => activeKeys.map((__, b) => (a === b ? 1 : 0)));
  const inverseColumns = normal.length === activeKeys.length ? identity.map((e) => solveSmall(normal, e)) : [];
  const values = valuesOf(theta);
  const fitted = keys.map((k, i) => {
    const a = activeKeys.indexOf(i);
    const variance = a >= 0 && inverseColumns[a] ? sigmaSquared * (inverseColumns[a] as number[])[a] : null;
    const sigma = variance !== null && variance >= 0 ? Math.sqrt(variance) : null;
    return {
      key: k.key,
      value: heldKeys[i] ? k.initial : values[i],
      initial: k.initial,
      uncertainty: sigma === null || heldKeys[i] ? null : k.logarithmic ? values[i] * sigma : sigma,
      identifiable: !heldKeys[i],
    };
  });
  const finalValues = fitted.map((f) => f.value);
  const esr = (cost: number): number => cost / targetEnergy;
  const db = (ratio: number): number | null => (ratio > 0 ? 10 * Math.log10(ratio) : null);
  return {
    latencySamples,
    latencyMs: (1000 * latencySamples) / inputs.sampleRate,
    gainDb: 20 * Math.log10(Math.abs(current.gain)),
    esrBeforePercent: 100 * esr(before.cost),
    esrAfterPercent: 100 * esr(current.cost),
    esrBeforeDb: db(esr(before.cost)),
    esrAfterDb: db(esr(current.cost)),
    fitted,
    residualByOctave: residualByOctave(current.error, target, inputs.sampleRate),
    overrides: overridesFor(keys, finalValues),
  };
}

/** Residual energy over the recording's in each octave band, dB (Welch densities, IEC 61260 octave edges f / sqrt(2)..f sqrt(2)). */
function residualByOctave(error: Float64Array, target: Float64Array, sampleRate: number): { hz: number; db: number | null }[] {
  const segmentLength = Math.min(8192, 2 ** Math.floor(Math.log2(Math.max(256, error.length))));
  if (error.length < segmentLength) return OCTAVE_BANDS_HZ.map((hz) => ({ hz, db: null }));
  const e = welch(error, sampleRate, { segmentLength });
  const w = welch(target, sampleRate, { segmentLength });
  return OCTAVE_BANDS_HZ.map((hz) => {
    let errorSum = 0;
    let targetSum = 0;
    for (let k = Math.ceil(hz / Math.SQRT2 / e.binHz); k <= Math.floor((hz * Math.SQRT2) / e.binHz) && k < e.values.length; k++) {
      errorSum += e.values[k];
      targetSum += w.values[k];
    }
    return { hz, db: errorSum > 0 && targetSum > 0 ? 10 * Math.log10(errorSum / targetSum) : null };
  });
}
