/**
 * Tolerance spread: `runs` builds of a design, each part drawn within its tolerance, and for each
 * build the figures `measure` gives at the reference tone. A part with a fractional tolerance t gets
 * value x (1 + d), d Gaussian with sigma = t / 3, clipped at +-t (common practice: the band is about
 * three sigma of a maker's process); a semiconductor on "datasheet" draws each ranged parameter from a
 * Gaussian around its typical value, sigma a third of the distance to the range's end on that side,
 * clipped to the range. Draws are seeded (dsp/random.ts): the same seed gives the same report.
 *
 * `sensitivity` ranks parts by the share of each figure's variance they explain: the squared
 * correlation between the part's relative deviation and the figure over the builds (for independent
 * parts and a figure near-linear in them, the variance share of a first-order decomposition).
 */
import { buildChain } from '../circuit/chain.js';
import { analyseCircuitStage } from '../circuit/circuitStage.js';
import { resolveDesign } from '../design/resolve.js';
import { UserError } from '../errors.js';
import { defaultTolerances, type PartKind, type Tolerance } from '../design/tolerances.js';
import type { CircuitElement, CircuitStage, Design, DiodeParams, OpampParams, ParamRange, Pot, Resistance, Stage } from '../design/types.js';
import type { OversampleFactor } from '../dsp/oversampler.js';
import { normalDeviates } from '../dsp/random.js';
import { OCTAVE_BANDS_HZ } from '../dsp/audioBand.js';
import { findOnset, sweepThdByLevel } from './levelSweep.js';
import { measureSteadyTone, REFERENCE_TONE, TONE_WINDOW } from './referenceTone.js';
import { predictResponse } from './response.js';

/** Octave points of the response figures. */
export const SPREAD_OCTAVES_HZ = OCTAVE_BANDS_HZ;
const SWEEP = { minVolts: 0.005, maxVolts: 2, points: 25 };
/** Every design's figures; a design with `circuit` stages adds `operatingPoint.<stage>.<node>`. */
export const SPREAD_FIGURES: readonly string[] = ['gainDb', 'thdPercent', 'onset1Volts', 'onset3Volts', 'onset10Volts', ...SPREAD_OCTAVES_HZ.map((hz) => `responseDb@${hz}Hz`)];
/** Parts explaining less than this share of a figure's variance are left out of `sensitivity`. */
const MIN_SHARE = 0.01;
/** Parts listed per figure in `sensitivity`. */
const TOP_PARTS = 3;

/** One drawable part: its name (as `--set` knows it), kind, tolerance, and how a relative deviation is applied. */
interface SpreadPart {
  part: string;
  kind: PartKind;
  tolerance: Tolerance;
}

export type Figures = Record<string, number | null>;

export interface FigureStats {
  mean: number | null;
  std: number | null;
  p05: number | null;
  p50: number | null;
  p95: number | null;
  min: number | null;
  max: number | null;
}

export interface SpreadReport {
  design: string;
  runs: number;
  seed: number;
  oversample: OversampleFactor;
  tolerances: { byKind: Record<PartKind, Tolerance>; parts: { part: string; kind: PartKind; tolerance: Tolerance | 'held' }[] };
  nominal: Figures;
  figures: Record<string, FigureStats>;
  sensitivity: { part: string; figure: string; share: number }[];
  /** Every build's figures, part deviations and `--set` overrides (op-amp draws cannot be stated there), for percentile builds and plots. */
  builds: { deviations: Record<string, number>; overrides: string[]; figures: Figures }[];
  /** Builds the models refused (their overrides and the reason); the statistics leave them out. */
  failedBuilds: { overrides: string[]; message: string }[];
}

export interface SpreadOptions {
  runs: number;
  seed: number;
  oversample: OversampleFactor;
  onProgress?: (fraction: number) => void;
}

type Draw = () => number;

/** d in [-t, t]: Gaussian, sigma t / 3, clipped. */
function fractionalDeviation(normal: Draw, tolerance: number): number {
  return Math.max(-tolerance, Math.min(tolerance, (normal() * tolerance) / 3));
}

/** A ranged parameter around `typical`: sigma a third of the distance to the range's end on each side, clipped to the range. */
function rangedValue(normal: Draw, typical: number, range: ParamRange | undefined): number {
  if (range === undefined) return typical;
  const z = Math.max(-3, Math.min(3, normal()));
  const span = z < 0 ? typical - range.min : range.max - typical;
  return Math.max(range.min, Math.min(range.max, typical + (z * span) / 3));
}

/** Resolves a part's tolerance: its own entry (stage.field or stage.element; a pot's fixed and track share the field's), else its kind's. */
function toleranceOf(design: Design, key: string, kind: PartKind): Tolerance {
  const tolerances = design.tolerances ?? defaultTolerances();
  return tolerances.byPart.get(key) ?? tolerances.byKind[kind];
}

/**
 * One build: every part of `design` drawn (in a fixed order, so a seed gives one build sequence),
 * returning the drawn design and each part's relative deviation from nominal.
 */
class BuildDrawer {
  readonly parts: SpreadPart[] = [];
  readonly deviations: Record<string, number> = {};
  /** The build as `--set` overrides (parts whose draw a design file can state: all but op-amps). */
  readonly overrides: string[] = [];
  private readonly listing: boolean;

  constructor(
    private readonly design: Design,
    private readonly normal: Draw | null,
  ) {
    this.listing = normal === null;
  }

  private note(part: string, kind: PartKind, tolerance: Tolerance, deviation: number): void {
    if (this.listing) this.parts.push({ part, kind, tolerance });
    this.deviations[part] = deviation;
  }

  /**
   * A value with a fractional tolerance (or "datasheet", which plain passives do not have: held).
   * `part` is also its `--set` key unless `setKey` says otherwise; `field` names its tolerance entry.
   */
  value(part: string, field: string, kind: PartKind, nominal: number, setKey = part): number {
    const tolerance = toleranceOf(this.design, field, kind);
    const deviation = typeof tolerance === 'number' && this.normal !== null ? fractionalDeviation(this.normal, tolerance) : 0;
    this.note(part, kind, tolerance, deviation);
    const drawn = nominal * (1 + deviation);
    if (deviation !== 0) this.overrides.push(`${setKey}=${drawn}`);
    return drawn;
  }

  /** A resistor field, or a pot object's fixed part and track (`--set stage.field.fixed`, `.pot`; a tone stage's own `fixed` and `pot`). */
  resistance(stageId: string, field: string | null, r: Resistance): Resistance {
    const key = field === null ? stageId : `${stageId}.${field}`;
    if (typeof r === 'number') return r === 0 ? 0 : this.value(key, key, 'resistor', r);
    const pot: Pot = { ...r };
    if (r.fixedOhms > 0) pot.fixedOhms = this.value(`${key}.fixed`, field === null ? `${key}.fixed` : key, 'resistor', r.fixedOhms);
    pot.potOhms = this.value(`${key}.pot`, field === null ? `${key}.pot` : key, 'pot', r.potOhms);
    return pot;
  }

  capacitance(stageId: string, field: string, farads: number | null): number | null {
    return farads === null ? null : this.value(`${stageId}.${field}`, `${stageId}.${field}`, 'capacitor', farads);
  }

  /**
   * A diode: on "datasheet", Is and n drawn within the part's ranges (held where the library gives
   * none); a numeric tolerance scales Is.
   */
  diode(part: string, diode: DiodeParams, setKey = part): DiodeParams {
    const tolerance = toleranceOf(this.design, part, 'diode');
    if (this.normal === null || (tolerance === 'datasheet' && diode.ranges === undefined)) {
      this.note(part, 'diode', tolerance, 0);
      return diode;
    }
    const drawn =
      tolerance === 'datasheet'
        ? { ...diode, saturationCurrent: rangedValue(this.normal, diode.saturationCurrent, diode.ranges?.saturationCurrent), ideality: rangedValue(this.normal, diode.ideality, diode.ranges?.ideality) }
        : { ...diode, saturationCurrent: diode.saturationCurrent * (1 + fractionalDeviation(this.normal, tolerance)) };
    const deviation = drawn.saturationCurrent / diode.saturationCurrent - 1;
    this.note(part, 'diode', tolerance, deviation);
    if (deviation !== 0) this.overrides.push(`${setKey}=${JSON.stringify({ saturationCurrent: drawn.saturationCurrent, ideality: drawn.ideality, seriesResistance: drawn.seriesResistance })}`);
    return drawn;
  }

  /**
   * An op-amp: on "datasheet", GBW and slew rate each drawn within the part's ranges (min to typ in the
   * library; held where it gives none); a numeric tolerance scales them together. Not expressible as
   * `--set` (op-amps are library parts), so op-amp draws are left out of a build's overrides.
   */
  opamp(part: string, opamp: OpampParams): OpampParams {
    const tolerance = toleranceOf(this.design, part, 'opamp');
    if (this.normal === null || !Number.isFinite(opamp.gbwHz)) {
      this.note(part, 'opamp', tolerance, 0);
      return opamp;
    }
    if (tolerance === 'datasheet') {
      const gbwHz = rangedValue(this.normal, opamp.gbwHz, opamp.ranges.gbwHz);
      const slewRateVoltsPerSecond = rangedValue(this.normal, opamp.slewRateVoltsPerSecond, opamp.ranges.slewRateVoltsPerSecond);
      this.note(part, 'opamp', tolerance, gbwHz / opamp.gbwHz - 1);
      return { ...opamp, gbwHz, slewRateVoltsPerSecond };
    }
    const deviation = fractionalDeviation(this.normal, tolerance);
    this.note(part, 'opamp', tolerance, deviation);
    return { ...opamp, gbwHz: opamp.gbwHz * (1 + deviation), slewRateVoltsPerSecond: opamp.slewRateVoltsPerSecond * (1 + deviation) };
  }

  /**
   * A transistor on "datasheet": each of `keys` drawn within the part's range (the first key's
   * deviation is the one reported); `inline` states the drawn part as a design file's inline part.
   * Any other tolerance holds it (transistors have no fractional tolerance here).
   */
  private rangedPart<K extends string, P extends Record<K, number> & { ranges: Partial<Record<K, ParamRange>> }>(
    part: string,
    kind: 'bjt' | 'jfet',
    params: P,
    keys: readonly [K, ...K[]],
    inline: (drawn: P) => object,
  ): P {
    const tolerance = toleranceOf(this.design, part, kind);
    if (this.normal === null || tolerance !== 'datasheet') {
      this.note(part, kind, tolerance, 0);
      return params;
    }
    const drawn = { ...params };
    for (const key of keys) (drawn as Record<K, number>)[key] = rangedValue(this.normal, params[key], params.ranges[key]);
    this.note(part, kind, tolerance, drawn[keys[0]] / params[keys[0]] - 1);
    this.overrides.push(`${part}.part=${JSON.stringify(inline(drawn))}`);
    return drawn;
  }

  element(stageId: string, element: CircuitElement): CircuitElement {
    const part = `${stageId}.${element.id}`;
    switch (element.type) {
      case 'resistor':
        return { ...element, ohms: this.value(part, part, 'resistor', element.ohms, `${part}.value`) };
      case 'capacitor':
        return { ...element, farads: this.value(part, part, 'capacitor', element.farads, `${part}.value`) };
      case 'pot':
        return { ...element, ohms: this.value(part, part, 'pot', element.ohms, `${part}.value`) };
      case 'diode':
        return { ...element, diode: this.diode(part, element.diode, `${part}.part`) };
      case 'opamp':
        return { ...element, opamp: this.opamp(part, element.opamp) };
      case 'npn':
      case 'pnp': {
        const { polarity, betaReverse, ideality } = element.bjt;
        const bjt = this.rangedPart(part, 'bjt', element.bjt, ['betaForward', 'saturationCurrent'], (b) => ({ polarity, saturationCurrent: b.saturationCurrent, betaForward: b.betaForward, betaReverse, ideality }));
        return bjt === element.bjt ? element : { ...element, bjt };
      }
      case 'njfet':
      case 'pjfet': {
        const { polarity, lambda } = element.jfet;
        const jfet = this.rangedPart(part, 'jfet', element.jfet, ['idss', 'pinchOff'], (j) => ({ polarity, idss: j.idss, pinchOff: j.pinchOff, lambda }));
        return jfet === element.jfet ? element : { ...element, jfet };
      }
    }
  }

  stage(stage: Stage): Stage {
    const id = stage.id;
    switch (stage.type) {
      case 'circuit':
        return { ...stage, elements: stage.elements.map((element) => this.element(id, element)) } satisfies CircuitStage;
      case 'input':
        return { ...stage, series: this.resistance(id, 'series', stage.series), coupling: this.value(`${id}.coupling`, `${id}.coupling`, 'capacitor', stage.coupling), pulldown: this.resistance(id, 'pulldown', stage.pulldown) };
      case 'gain':
        return {
          ...stage,
          opamp: this.opamp(`${id}.opamp`, stage.opamp),
          rf: this.resistance(id, 'rf', stage.rf),
          rg: stage.rg === null ? null : this.resistance(id, 'rg', stage.rg),
          cg: this.capacitance(id, 'cg', stage.cg),
          cf: this.capacitance(id, 'cf', stage.cf),
          feedbackDiode: stage.feedbackDiode === null ? null : this.diode(`${id}.feedbackDiode`, stage.feedbackDiode),
        };
      case 'clipper':
        return { ...stage, series: this.resistance(id, 'series', stage.series), cap: this.capacitance(id, 'cap', stage.cap), diode: this.diode(`${id}.diode`, stage.diode), downDiode: this.diode(`${id}.downDiode`, stage.downDiode) };
      case 'tone':
        return { ...stage, r: this.resistance(id, null, stage.r), cap: this.value(`${id}.cap`, `${id}.cap`, 'capacitor', stage.cap) };
      case 'lowpass':
      case 'highpass':
        return { ...stage, r: this.resistance(id, 'r', stage.r), c: this.value(`${id}.c`, `${id}.c`, 'capacitor', stage.c) };
      case 'volume':
        return { ...stage, potOhms: this.value(`${id}.pot`, `${id}.pot`, 'pot', stage.potOhms) };
    }
  }

  build(): Design {
    return { ...this.design, stages: this.design.stages.map((stage) => this.stage(stage)) };
  }
}

/** What `measure` computes at the reference tone, for one build. */
export function buildFigures(design: Design<number>, oversample: OversampleFactor): Figures {
  const { sampleRate } = REFERENCE_TONE;
  const chain = buildChain(design, { sampleRate, oversample });
  const steady = measureSteadyTone(chain, design, REFERENCE_TONE);
  const sweep = sweepThdByLevel(chain, { sampleRate, windowLength: TONE_WINDOW, fundamentalBin: steady.fundamentalBin, settleSeconds: steady.settleSeconds, ...SWEEP });
  const response = predictResponse(design, sampleRate, oversample, [REFERENCE_TONE.freqHz, ...SPREAD_OCTAVES_HZ]);
  const figures: Figures = {
    gainDb: response[0].db,
    thdPercent: steady.analysis.thdPercent,
    onset1Volts: findOnset(sweep, 1),
    onset3Volts: findOnset(sweep, 3),
    onset10Volts: findOnset(sweep, 10),
  };
  SPREAD_OCTAVES_HZ.forEach((hz, i) => (figures[`responseDb@${hz}Hz`] = response[i + 1].db));
  const ctx = { sampleRate, supplyVolts: design.supplyVolts, temperatureC: design.temperatureC };
  for (const stage of design.stages) {
    if (stage.type !== 'circuit') continue;
    const { system, operatingPoint } = analyseCircuitStage(stage, ctx, design.knobs);
    for (let node = 0; node < system.nodeCount; node++) {
      const name = system.unknownNames[node];
      if (!name.includes('#')) figures[`operatingPoint.${stage.id}.${name}`] = operatingPoint.unknowns[node];
    }
  }
  return figures;
}

/** Linear-interpolated percentile of ascending `sorted` (type 7 of Hyndman & Fan, Am. Stat. 50(4), 1996). */
function percentile(sorted: readonly number[], p: number): number {
  const position = (sorted.length - 1) * p;
  const low = Math.floor(position);
  const high = Math.min(sorted.length - 1, low + 1);
  return sorted[low] + (sorted[high] - sorted[low]) * (position - low);
}

function statsOf(values: readonly (number | null)[]): FigureStats {
  const finite = values.filter((v): v is number => v !== null && Number.isFinite(v)).sort((a, b) => a - b);
  if (finite.length === 0) return { mean: null, std: null, p05: null, p50: null, p95: null, min: null, max: null };
  const mean = finite.reduce((sum, v) => sum + v, 0) / finite.length;
  const variance = finite.length > 1 ? finite.reduce((sum, v) => sum + (v - mean) ** 2, 0) / (finite.length - 1) : 0;
  return { mean, std: Math.sqrt(variance), p05: percentile(finite, 0.05), p50: percentile(finite, 0.5), p95: percentile(finite, 0.95), min: finite[0], max: finite[finite.length - 1] };
}

/** Squared Pearson correlation of paired values (0 when either does not vary). */
function squaredCorrelation(x: readonly number[], y: readonly number[]): number {
  const n = x.length;
  if (n < 3) return 0;
  const mx = x.reduce((s, v) => s + v, 0) / n;
  const my = y.reduce((s, v) => s + v, 0) / n;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    sxy += (x[i] - mx) * (y[i] - my);
    sxx += (x[i] - mx) ** 2;
    syy += (y[i] - my) ** 2;
  }
  return sxx > 0 && syy > 0 ? (sxy * sxy) / (sxx * syy) : 0;
}

export function runSpread(design: Design, options: SpreadOptions): SpreadReport {
  const listing = new BuildDrawer(design, null);
  const nominalDesign = listing.build();
  const nominal = buildFigures(resolveDesign(nominalDesign), options.oversample);
  const normal = normalDeviates(options.seed);
  const builds: SpreadReport['builds'] = [];
  const failed: { overrides: string[]; message: string }[] = [];
  for (let run = 0; run < options.runs; run++) {
    const drawer = new BuildDrawer(design, normal);
    try {
      const figures = buildFigures(resolveDesign(drawer.build()), options.oversample);
      builds.push({ deviations: drawer.deviations, overrides: drawer.overrides, figures });
    } catch (error) {
      // A drawn build the models refuse (e.g. a circuit with no operating point) is reported, not fatal.
      if (!(error instanceof UserError)) throw error;
      failed.push({ overrides: drawer.overrides, message: error.message });
    }
    options.onProgress?.((run + 1) / options.runs);
  }
  if (builds.length === 0) throw new UserError(`spread: no build could be measured (the first: ${failed[0]?.message ?? 'none drawn'})`);
  const names = Object.keys(nominal);
  const figures = Object.fromEntries(names.map((name) => [name, statsOf(builds.map((b) => b.figures[name] ?? null))]));
  const varied = listing.parts.filter((part) => builds.some((b) => b.deviations[part.part] !== 0));
  const sensitivity = names.flatMap((figure) => {
    const paired = builds.filter((b) => b.figures[figure] !== null && Number.isFinite(b.figures[figure] as number));
    const y = paired.map((b) => b.figures[figure] as number);
    return varied
      .map(({ part }) => ({ part, figure, share: squaredCorrelation(paired.map((b) => b.deviations[part] ?? 0), y) }))
      .filter((entry) => entry.share >= MIN_SHARE)
      .sort((a, b) => b.share - a.share)
      .slice(0, TOP_PARTS);
  });
  const tolerances = design.tolerances ?? defaultTolerances();
  return {
    design: design.name,
    runs: options.runs,
    seed: options.seed,
    oversample: options.oversample,
    tolerances: {
      byKind: tolerances.byKind,
      parts: listing.parts.map(({ part, kind, tolerance }) => ({ part, kind, tolerance: varied.some((v) => v.part === part) ? tolerance : 'held' })),
    },
    nominal,
    figures,
    sensitivity,
    builds,
    failedBuilds: failed,
  };
}

/**
 * The figure that spreads most, as a relative amplitude: a dB figure's 5-95 % width w as 10^(w/20) - 1,
 * any other figure's width over its nominal magnitude. Operating points are left out (not a sound).
 */
export function mostSpreadFigure(report: SpreadReport): string | null {
  let best: string | null = null;
  let bestWidth = -1;
  for (const [name, stats] of Object.entries(report.figures)) {
    if (name.startsWith('operatingPoint.') || stats.p05 === null || stats.p95 === null) continue;
    const nominal = report.nominal[name];
    const width = name.includes('Db') ? 10 ** ((stats.p95 - stats.p05) / 20) - 1 : nominal ? (stats.p95 - stats.p05) / Math.abs(nominal) : 0;
    if (width > bestWidth) {
      best = name;
      bestWidth = width;
    }
  }
  return best;
}

/** The builds whose `figure` lies closest to its 5th and 95th percentiles. */
export function percentileBuilds(report: SpreadReport, figure: string): { low: SpreadReport['builds'][number]; high: SpreadReport['builds'][number] } | null {
  const stats = report.figures[figure];
  if (stats === undefined || stats.p05 === null || stats.p95 === null) return null;
  const closest = (target: number): SpreadReport['builds'][number] =>
    report.builds.reduce((best, build) => {
      const value = build.figures[figure];
      const bestValue = best.figures[figure];
      if (value === null || value === undefined) return best;
      return bestValue === null || bestValue === undefined || Math.abs(value - target) < Math.abs(bestValue - target) ? build : best;
    });
  return { low: closest(stats.p05), high: closest(stats.p95) };
}
