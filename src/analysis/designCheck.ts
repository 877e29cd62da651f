/**
 * `check`: a design's electrical facts and warnings, computed analytically (no rendering) from the
 * typed design, before anyone builds it. Every pot is taken over its whole rotation; levels are the
 * worst case (every knob at its maximum) for a sine of `inputPeakVolts` at the jack, mid-band.
 * Stages are treated as buffered from each other, as the renderer does.
 */
import { conductionThresholdSiemens } from '../dsp/conduction.js';
import { diodeString, forwardVoltage, stringConductance, voltageAtConductance } from '../circuit/diode.js';
import { nearestStandardValues, type ESeriesName } from '../design/eSeries.js';
import { isPot, resistanceRange } from '../design/resolve.js';
import type { ClipperStage, Design, DiodeParams, GainStage, OpampParams, Pot, Resistance, Stage } from '../design/types.js';
import { formatValue } from '../design/values.js';
import { checkCircuitStage, INPUT_IMPEDANCE_HZ } from './circuitCheck.js';
import { AUDIO_BAND_HIGH_HZ } from '../dsp/audioBand.js';

export interface Fact {
  code: string;
  /** Stage id, or "design" for facts about the whole design. */
  stage: string;
  label: string;
  /** The fact as a reader sees it, with units. */
  text: string;
  unit?: string;
  value?: number;
  min?: number;
  max?: number;
}

export interface CheckWarning {
  code: string;
  stage: string;
  message: string;
}

export interface CheckResult {
  facts: Fact[];
  warnings: CheckWarning[];
  /** Circuit stages at rest: stage id -> node -> volts. */
  operatingPoint: Record<string, Record<string, number>>;
}

export interface CheckOptions {
  /** Peak of the signal at the jack, volts (common practice: 0.1-1 V from a passive pickup). */
  inputPeakVolts: number;
}

/** Common practice: passive pickups lose treble into loads below about 250k (500k-1M is usual). */
export const MIN_INPUT_IMPEDANCE_OHMS = 250e3;
/** GBW-limited bandwidth under this at maximum gain audibly dulls the top end. */
export const MIN_GBW_BANDWIDTH_HZ = 10e3;
/** The audio band's upper edge, for the slew-rate check. */
/** Bisection steps for the diode operating point (the bracket shrinks 2^-60: far below any tolerance). */
const BISECTION_STEPS = 60;

export const CAUTIONS: readonly string[] = [
  'Rendered drive can be loud: renders keep the circuit\'s calibrated level, so start playback at low volume.',
  'Pedals run on low-voltage DC; anything mains-powered is for qualified people under local electrical codes.',
  'Soldering: fumes and lead. Ventilate the room and wash your hands afterwards.',
];

const ohmsText = (ohms: number): string => `${formatValue(ohms)} ohm`;
const hzText = (hz: number): string => `${formatValue(hz)}Hz`;
const voltsText = (volts: number): string => `${Number(volts.toPrecision(3))} V`;
const ampsText = (amps: number): string => `${formatValue(amps)}A`;
const dbText = (gain: number): string => `${(20 * Math.log10(gain)).toFixed(1)} dB`;

/** Corner frequency of a first-order RC section: fc = 1 / (2 pi R C). */
export function rcCornerHz(ohms: number, farads: number): number {
  return 1 / (2 * Math.PI * ohms * farads);
}

/** Peaks of the positive and negative half of the signal, volts (both as magnitudes). */
interface Peaks {
  up: number;
  down: number;
}

/** Which knob(s) move a value, for labels: " (drive knob)". */
function knobNote(...resistances: (Resistance | null)[]): string {
  const knobs = resistances.flatMap((r) => (r !== null && isPot(r) ? [r.knob] : []));
  return knobs.length === 0 ? '' : ` over the ${[...new Set(knobs)].join(' and ')} knob${knobs.length > 1 ? 's' : ''}`;
}

class CheckCollector {
  readonly facts: Fact[] = [];
  readonly warnings: CheckWarning[] = [];
  readonly operatingPoint: Record<string, Record<string, number>> = Object.create(null) as Record<string, Record<string, number>>;

  fact(fact: Fact): void {
    this.facts.push(fact);
  }

  warn(code: string, stage: string, message: string): void {
    this.warnings.push({ code, stage, message });
  }

  /** fc = 1/(2 pi R C) for R over its range; min/max are only set where a pot moves the corner. */
  corner(stage: string, code: string, label: string, r: Resistance, farads: number): void {
    const { minOhms, maxOhms } = resistanceRange(r);
    const lowHz = rcCornerHz(maxOhms, farads);
    if (minOhms === maxOhms) {
      this.fact({ code, stage, label, text: `${hzText(lowHz)} (1/(2 pi R C), R ${ohmsText(minOhms)}, C ${formatValue(farads)}F)`, unit: 'Hz', value: lowHz });
      return;
    }
    const highText = minOhms > 0 ? hzText(rcCornerHz(minOhms, farads)) : 'no corner (R = 0)';
    const fact: Fact = { code, stage, label: `${label}${knobNote(r)}`, text: `${hzText(lowHz)} to ${highText} (1/(2 pi R C), R ${ohmsText(minOhms)}-${ohmsText(maxOhms)}, C ${formatValue(farads)}F)`, unit: 'Hz', min: lowHz };
    if (minOhms > 0) fact.max = rcCornerHz(minOhms, farads);
    this.fact(fact);
  }
}

/** Output swing each side of the bias point (supply/2) before the op-amp's output saturates. */
export function opampSwingVolts(opamp: OpampParams, supplyVolts: number): Peaks {
  return { up: supplyVolts / 2 - opamp.headroomHighVolts, down: supplyVolts / 2 - opamp.headroomLowVolts };
}

/**
 * Operating point of a diode string fed through a resistor: the current I where
 * drive - I R = Vstring(I), Vstring(I) = m (n Vt ln(I/Is + 1) + I Rs) (Shockley, solved for the voltage).
 * The left side falls and the right side rises with I, so bisection on [0, drive/R] always converges.
 * `driveVolts` is the open-circuit voltage behind `ohms`.
 */
export function diodeStringCurrent(diode: DiodeParams, count: number, driveVolts: number, ohms: number, temperatureC: number): number {
  let low = 0;
  let high = driveVolts / ohms;
  for (let step = 0; step < BISECTION_STEPS; step++) {
    const mid = 0.5 * (low + high);
    if (driveVolts - mid * ohms > forwardVoltage(diode, count, mid, temperatureC)) low = mid;
    else high = mid;
  }
  return 0.5 * (low + high);
}

/** Does a string at `currentAmps` conduct, by the renderer's definition (see dsp/conduction.ts)? */
function conducts(diode: DiodeParams, count: number, currentAmps: number, againstOhms: number, temperatureC: number): boolean {
  const string = diodeString(diode, count, temperatureC);
  return string !== null && stringConductance(string, currentAmps) > conductionThresholdSiemens(stringConductance(string, 0), 1 / againstOhms);
}

/** Peak current and conduction of one polarity's string; returns the voltage it holds the node to. */
function checkDiodeString(
  out: CheckCollector,
  stageId: string,
  side: 'positive' | 'negative',
  diode: DiodeParams,
  count: number,
  driveVolts: number,
  ohms: number,
  temperatureC: number,
): number {
  if (count === 0) {
    out.fact({ code: 'diode-none', stage: stageId, label: `${side} half`, text: 'no diodes: this half is not clipped here' });
    return driveVolts;
  }
  const currentAmps = diodeStringCurrent(diode, count, driveVolts, ohms, temperatureC);
  const stringVolts = forwardVoltage(diode, count, currentAmps, temperatureC);
  const label = `${side} diodes (${count} x ${diode.name})`;
  out.fact({
    code: 'diode-peak-current',
    stage: stageId,
    label: `${label} peak current`,
    text: `${ampsText(currentAmps)} at ${voltsText(stringVolts)} across the string (rating ${Number.isFinite(diode.ratedCurrent) ? ampsText(diode.ratedCurrent) : 'not given'})`,
    unit: 'A',
    value: currentAmps,
  });
  if (currentAmps > diode.ratedCurrent) {
    out.warn('diode-overcurrent', stageId, `${label}: ${ampsText(currentAmps)} peak at the worst input exceeds the ${ampsText(diode.ratedCurrent)} rating; raise the series resistance`);
  }
  if (!conducts(diode, count, currentAmps, ohms, temperatureC)) {
    out.warn('diode-never-conducts', stageId, `${label}: never conduct at the worst input (${voltsText(driveVolts)} peak behind ${ohmsText(ohms)}); they would not clip`);
  }
  return stringVolts;
}

function firstStageInputOhms(stage: Stage, design: Design): { minOhms: number; maxOhms: number; note: string } {
  switch (stage.type) {
    case 'circuit': {
      const ohms = checkCircuitStage(stage, design).inputOhms;
      return { minOhms: ohms, maxOhms: ohms, note: `circuit at ${INPUT_IMPEDANCE_HZ} Hz, at the knob positions` };
    }
    case 'input': {
      const series = resistanceRange(stage.series);
      const pulldown = resistanceRange(stage.pulldown);
      return { minOhms: series.minOhms + pulldown.minOhms, maxOhms: series.maxOhms + pulldown.maxOhms, note: 'series + pull-down, mid-band' };
    }
    case 'gain':
      return { minOhms: Infinity, maxOhms: Infinity, note: 'op-amp input with no pull-down' };
    case 'clipper':
      return { ...resistanceRange(stage.series), note: 'series resistor, diodes conducting' };
    case 'tone':
    case 'lowpass':
    case 'highpass':
      return { ...resistanceRange(stage.r), note: 'resistor, at high frequencies' };
    case 'volume':
      return { minOhms: stage.potOhms, maxOhms: stage.potOhms, note: 'volume pot' };
  }
}

function checkInputImpedance(out: CheckCollector, stage: Stage, design: Design): void {
  const { minOhms, maxOhms, note } = firstStageInputOhms(stage, design);
  if (!Number.isFinite(minOhms)) {
    out.fact({ code: 'input-impedance', stage: stage.id, label: 'input impedance seen by the pickup', text: `very high (${note})` });
    out.warn('input-no-pulldown', stage.id, 'the op-amp input has no pull-down resistor: add an input stage (a DC path to the bias point and a defined load)');
    return;
  }
  const range = minOhms === maxOhms ? ohmsText(minOhms) : `${ohmsText(minOhms)} to ${ohmsText(maxOhms)}`;
  out.fact({ code: 'input-impedance', stage: stage.id, label: 'input impedance seen by the pickup', text: `${range} (${note})`, unit: 'ohm', min: minOhms, max: maxOhms });
  if (minOhms < MIN_INPUT_IMPEDANCE_OHMS) {
    out.warn('input-impedance-low', stage.id, `input impedance ${ohmsText(minOhms)} is below ${ohmsText(MIN_INPUT_IMPEDANCE_OHMS)}: a passive pickup loses treble into it (500k-1M is usual)`);
  }
}

/** Non-inverting gain 1 + Rf/Rg over every pot (mid-band: cg shorted, cf open). */
function gainRange(stage: GainStage): { min: number; max: number } {
  if (stage.rg === null) return { min: 1, max: 1 };
  const rf = resistanceRange(stage.rf);
  const rg = resistanceRange(stage.rg);
  return { min: 1 + rf.minOhms / rg.maxOhms, max: rg.minOhms > 0 ? 1 + rf.maxOhms / rg.minOhms : Infinity };
}

/**
 * Peak output of a non-inverting stage with diodes across Rf: the current Vin/Rg through the ground
 * leg flows through Rf || diodes, so Vout = Vin + Vd with Vd / Rf + Id(Vd) = Vin / Rg.
 */
function feedbackDiodeOutput(out: CheckCollector, stage: GainStage, diode: DiodeParams, inputPeak: Peaks, temperatureC: number): Peaks {
  const rfOhms = resistanceRange(stage.rf).maxOhms;
  const rgOhms = resistanceRange(stage.rg ?? 0).minOhms;
  // Thevenin view of the feedback node: current Vin/Rg into Rf || diodes is a drive of Vin Rf/Rg behind Rf.
  const sideVolts = (side: 'positive' | 'negative', vin: number, count: number): number =>
    vin + checkDiodeString(out, stage.id, side, diode, count, (vin * rfOhms) / rgOhms, rfOhms, temperatureC);
  return { up: sideVolts('positive', inputPeak.up, stage.feedbackUp), down: sideVolts('negative', inputPeak.down, stage.feedbackDown) };
}

function checkGainStage(out: CheckCollector, stage: GainStage, design: Design, inputPeak: Peaks, nextClipper: ClipperLevel | null): Peaks {
  const { opamp } = stage;
  const gain = gainRange(stage);
  const knobs = knobNote(stage.rf, stage.rg);
  if (gain.max === 1) {
    out.fact({ code: 'gain', stage: stage.id, label: 'gain', text: 'unity buffer (1 x, 0 dB)', value: 1 });
  } else {
    const maxText = Number.isFinite(gain.max) ? `${Number(gain.max.toPrecision(3))} x (${dbText(gain.max)})` : 'unbounded (rg reaches 0)';
    out.fact({ code: 'gain', stage: stage.id, label: `gain 1 + Rf/Rg${knobs}`, text: `${Number(gain.min.toPrecision(3))} x (${dbText(gain.min)}) to ${maxText}`, min: gain.min, ...(Number.isFinite(gain.max) ? { max: gain.max } : {}) });
    if (!Number.isFinite(gain.max)) out.warn('gain-unbounded', stage.id, 'rg can reach 0 ohm: the gain has no limit at that end of the pot');
  }
  if (stage.rg !== null && stage.cg !== null) out.corner(stage.id, 'corner-bass', 'bass corner of the gain (rg, cg)', stage.rg, stage.cg);
  if (stage.cf !== null && stage.rf !== 0) out.corner(stage.id, 'corner-treble', 'treble corner of the gain (rf, cf)', stage.rf, stage.cf);

  // Closed-loop bandwidth of a single-pole op-amp: f = GBW / (1 + Rf/Rg) (single-pole op-amp loop; e.g. Sedra & Smith, Microelectronic Circuits, ch. 2; docs/models.md).
  if (!Number.isFinite(opamp.gbwHz)) {
    out.fact({ code: 'gbw-bandwidth', stage: stage.id, label: 'GBW-limited bandwidth at maximum gain', text: `unlimited (${opamp.name})` });
  } else if (Number.isFinite(gain.max)) {
    const bandwidthHz = opamp.gbwHz / gain.max;
    out.fact({ code: 'gbw-bandwidth', stage: stage.id, label: 'GBW-limited bandwidth at maximum gain', text: `${hzText(bandwidthHz)} (GBW/(1+Rf/Rg), GBW ${hzText(opamp.gbwHz)})`, unit: 'Hz', value: bandwidthHz });
    if (bandwidthHz < MIN_GBW_BANDWIDTH_HZ) {
      out.warn('gbw-bandwidth-low', stage.id, `at maximum gain the ${opamp.name} leaves only ${hzText(bandwidthHz)} of bandwidth (under ${hzText(MIN_GBW_BANDWIDTH_HZ)}): lower the maximum gain or use a faster op-amp`);
    }
  }

  const swing = opampSwingVolts(opamp, design.supplyVolts);
  const symmetricSwing = Math.min(swing.up, swing.down);
  out.fact({ code: 'opamp-swing', stage: stage.id, label: `maximum undistorted swing (${opamp.name} on ${design.supplyVolts} V)`, text: `+${voltsText(swing.up)} / -${voltsText(swing.down)} around the bias point (${voltsText(design.supplyVolts / 2)})`, unit: 'V', min: -swing.down, max: swing.up });
  if (design.supplyVolts < opamp.supplyMinVolts || design.supplyVolts > opamp.supplyMaxVolts) {
    out.warn('supply-out-of-range', stage.id, `${design.supplyVolts} V is outside the ${opamp.name}'s rated supply range (${opamp.supplyMinVolts}-${opamp.supplyMaxVolts} V)`);
  }
  if (symmetricSwing <= 0) {
    out.warn('no-swing', stage.id, `the ${opamp.name} cannot swing at all on ${design.supplyVolts} V (headroom ${opamp.headroomLowVolts} + ${opamp.headroomHighVolts} V)`);
    return { up: 0, down: 0 };
  }

  // Full-power bandwidth: the highest frequency a sine of peak V passes without slew limiting, SR / (2 pi V).
  if (Number.isFinite(opamp.slewRateVoltsPerSecond)) {
    const fullPowerHz = opamp.slewRateVoltsPerSecond / (2 * Math.PI * symmetricSwing);
    out.fact({ code: 'slew-bandwidth', stage: stage.id, label: 'slew-limited full-power bandwidth', text: `${hzText(fullPowerHz)} at ${voltsText(symmetricSwing)} peak (SR/(2 pi Vpeak), SR ${Number((opamp.slewRateVoltsPerSecond / 1e6).toPrecision(3))} V/us)`, unit: 'Hz', value: fullPowerHz });
    if (fullPowerHz < AUDIO_BAND_HIGH_HZ) {
      out.warn('slew-limited', stage.id, `a full-swing sine slews above ${hzText(fullPowerHz)} (under ${hzText(AUDIO_BAND_HIGH_HZ)}): the ${opamp.name} adds slew distortion at full drive`);
    }
  }

  const demand =
    stage.feedbackDiode !== null && stage.rg !== null
      ? feedbackDiodeOutput(out, stage, stage.feedbackDiode, inputPeak, design.temperatureC)
      : { up: inputPeak.up * gain.max, down: inputPeak.down * gain.max };
  const reachesRail = { up: demand.up > swing.up, down: demand.down > swing.down };
  if (stage.railClipping !== true) {
    if (stage.feedbackDiode !== null && (reachesRail.up || reachesRail.down)) {
      // The output the feedback diodes would hold is beyond the swing: the rails limit it first.
      out.warn('rails-before-diodes', stage.id, `at ${voltsText(inputPeak.up)} into the stage and full gain its feedback diodes would hold the output at ${voltsText(Math.max(demand.up, demand.down))} peak, beyond the ${opamp.name}'s swing of +${voltsText(swing.up)}/-${voltsText(swing.down)}: it clips at its rails before its diodes do`);
    } else if (nextClipper !== null && ((reachesRail.up && swing.up < nextClipper.volts.up) || (reachesRail.down && swing.down < nextClipper.volts.down))) {
      // The diodes after it start clipping only above the swing: the rails are reached first.
      out.warn('rails-before-diodes', stage.id, `the ${opamp.name} swings only +${voltsText(swing.up)}/-${voltsText(swing.down)}, below the +${voltsText(nextClipper.volts.up)}/-${voltsText(nextClipper.volts.down)} at which the diodes of stage "${nextClipper.id}" start clipping: at ${voltsText(inputPeak.up)} into the stage and full gain it clips at its rails before they do`);
    }
  }
  return { up: Math.min(demand.up, swing.up), down: Math.min(demand.down, swing.down) };
}

function checkClipper(out: CheckCollector, stage: ClipperStage, design: Design, inputPeak: Peaks): Peaks {
  if (stage.cap !== null) out.corner(stage.id, 'corner-clipper', 'clipper low-pass corner, diodes off (series, cap)', stage.series, stage.cap);
  const seriesOhms = resistanceRange(stage.series).minOhms; // worst case: most current
  if (seriesOhms <= 0) {
    out.warn('clipper-no-series', stage.id, 'the series resistance can reach 0 ohm: nothing limits the diode current');
    return inputPeak;
  }
  const t = design.temperatureC;
  return {
    up: checkDiodeString(out, stage.id, 'positive', stage.diode, stage.up, inputPeak.up, seriesOhms, t),
    down: checkDiodeString(out, stage.id, 'negative', stage.downDiode, stage.down, inputPeak.down, seriesOhms, t),
  };
}

/** Fixed resistors and capacitors of a stage (pot tracks excluded: pots come in their own values). */
function fixedParts(stage: Stage): { field: string; value: number; kind: 'resistor' | 'capacitor' }[] {
  const resistor = (field: string, r: Resistance | null) => {
    const value = r === null ? 0 : isPot(r) ? r.fixedOhms : r;
    return value > 0 ? [{ field: r !== null && isPot(r) ? `${field}.fixed` : field, value, kind: 'resistor' as const }] : [];
  };
  const capacitor = (field: string, c: number | null) => (c !== null ? [{ field, value: c, kind: 'capacitor' as const }] : []);
  switch (stage.type) {
    case 'circuit':
      return stage.elements.flatMap((element): { field: string; value: number; kind: 'resistor' | 'capacitor' }[] =>
        element.type === 'resistor' ? resistor(`${element.id}.value`, element.ohms) : element.type === 'capacitor' ? capacitor(`${element.id}.value`, element.farads) : [],
      );
    case 'input':
      return [...resistor('series', stage.series), ...capacitor('coupling', stage.coupling), ...resistor('pulldown', stage.pulldown)];
    case 'gain':
      return [...resistor('rf', stage.rf), ...resistor('rg', stage.rg), ...capacitor('cg', stage.cg), ...capacitor('cf', stage.cf)];
    case 'clipper':
      return [...resistor('series', stage.series), ...capacitor('cap', stage.cap)];
    case 'tone':
      return [...resistor('fixed', stage.r), ...capacitor('cap', stage.cap)];
    case 'lowpass':
    case 'highpass':
      return [...resistor('r', stage.r), ...capacitor('c', stage.c)];
    case 'volume':
      return [];
  }
}

/** Common practice: resistors are stocked in E24 (1 %), capacitors in E12 or coarser. */
const STOCK_SERIES: Readonly<Record<'resistor' | 'capacitor', ESeriesName>> = { resistor: 'E24', capacitor: 'E12' };

/** Fixed resistors below this are almost always "1m" written for one megaohm (SI: m is milli). */
const SUSPICIOUS_OHMS = 1;

function checkStandardValues(out: CheckCollector, stage: Stage): void {
  for (const { field, value, kind } of fixedParts(stage)) {
    if (kind === 'resistor' && value < SUSPICIOUS_OHMS) {
      out.warn('resistance-milliohm', stage.id, `${field} is ${formatValue(value)} ohm, less than 1 ohm: "m" means milli; write "M" (e.g. 1M) for megaohms`);
      continue;
    }
    const series = STOCK_SERIES[kind];
    const standard = nearestStandardValues(value, series);
    if (standard.onSeries) continue;
    const unit = kind === 'resistor' ? ' ohm' : 'F';
    out.warn('off-series', stage.id, `${field} ${formatValue(value)}${unit} is not an ${series} value (IEC 60063); nearest ${formatValue(standard.below)}${unit} or ${formatValue(standard.above)}${unit}`);
  }
}

function checkStage(out: CheckCollector, stage: Stage, design: Design, peak: Peaks, nextClipper: ClipperLevel | null): Peaks {
  checkStandardValues(out, stage);
  switch (stage.type) {
    case 'circuit': {
      const result = checkCircuitStage(stage, design);
      result.facts.forEach((fact) => out.fact(fact));
      result.warnings.forEach((w) => out.warn(w.code, w.stage, w.message));
      out.operatingPoint[stage.id] = result.rest.nodes;
      return { up: peak.up * result.peakGain, down: peak.down * result.peakGain };
    }
    case 'input': {
      out.corner(stage.id, 'corner-input', 'input high-pass corner (series + pulldown, coupling)', addResistances(stage.series, stage.pulldown), stage.coupling);
      const series = resistanceRange(stage.series).minOhms;
      const pulldown = resistanceRange(stage.pulldown).maxOhms;
      const passband = pulldown / (series + pulldown); // H(s) = s Rp C / (1 + s (Rs + Rp) C) at high frequency
      return { up: peak.up * passband, down: peak.down * passband };
    }
    case 'gain':
      return checkGainStage(out, stage, design, peak, nextClipper);
    case 'clipper':
      return checkClipper(out, stage, design, peak);
    case 'tone':
      out.corner(stage.id, 'corner-tone', 'tone low-pass corner', stage.r, stage.cap);
      return peak;
    case 'lowpass':
    case 'highpass':
      out.corner(stage.id, `corner-${stage.type}`, `${stage.type} corner`, stage.r, stage.c);
      return peak;
    case 'volume':
      return peak;
  }
}

/** Series sum of two resistances, as a pot spanning the sum's range where either is a pot (for its range and knob name). */
function addResistances(a: Resistance, b: Resistance): Resistance {
  if (!isPot(a) && !isPot(b)) return a + b;
  const pot = isPot(a) ? a : (b as Pot);
  const minOhms = resistanceRange(a).minOhms + resistanceRange(b).minOhms;
  const maxOhms = resistanceRange(a).maxOhms + resistanceRange(b).maxOhms;
  return { ...pot, fixedOhms: minOhms, potOhms: maxOhms - minOhms };
}

function hasDiodes(stage: Stage): boolean {
  if (stage.type === 'circuit') return stage.elements.some((element) => element.type === 'diode');
  return (stage.type === 'clipper' && stage.up + stage.down > 0) || (stage.type === 'gain' && stage.feedbackDiode !== null);
}

/** A clipper stage and the node voltage each way at which its diodes start clipping. */
interface ClipperLevel {
  id: string;
  volts: Peaks;
}

/**
 * Where the next stage with diodes after `index` starts clipping, when it is a clipper fed through a
 * series resistor: the node voltage at which a string's conductance passes the renderer's conduction
 * threshold (dsp/conduction.ts) against that resistor, at its lowest value (the highest such voltage).
 * Null for any other next diode stage (its diodes sit behind gain of their own) or none.
 */
function nextClipperLevel(design: Design, index: number): ClipperLevel | null {
  const next = design.stages.slice(index + 1).find(hasDiodes);
  if (next === undefined || next.type !== 'clipper') return null;
  const seriesOhms = resistanceRange(next.series).minOhms;
  if (!(seriesOhms > 0)) return null;
  const level = (diode: DiodeParams, count: number): number => {
    const string = diodeString(diode, count, design.temperatureC);
    return string === null ? Infinity : voltageAtConductance(string, conductionThresholdSiemens(stringConductance(string, 0), 1 / seriesOhms));
  };
  return { id: next.id, volts: { up: level(next.diode, next.up), down: level(next.downDiode, next.down) } };
}

/** The design's facts and warnings; see the module comment for the assumptions. */
export function checkDesign(design: Design<Resistance>, options: CheckOptions): CheckResult {
  const out = new CheckCollector();
  out.fact({ code: 'input-peak', stage: 'design', label: 'worst input assumed', text: `${voltsText(options.inputPeakVolts)} peak at the jack, every knob at its maximum`, unit: 'V', value: options.inputPeakVolts });
  out.fact({ code: 'supply', stage: 'design', label: 'supply', text: `${voltsText(design.supplyVolts)} single supply, bias at ${voltsText(design.supplyVolts / 2)}`, unit: 'V', value: design.supplyVolts });
  const [first] = design.stages;
  if (first !== undefined) checkInputImpedance(out, first, design);
  let peak: Peaks = { up: options.inputPeakVolts, down: options.inputPeakVolts };
  design.stages.forEach((stage, index) => {
    peak = checkStage(out, stage, design, peak, nextClipperLevel(design, index));
  });
  for (const caution of CAUTIONS) out.fact({ code: 'caution', stage: 'design', label: 'caution', text: caution });
  return { facts: out.facts, warnings: out.warnings, operatingPoint: out.operatingPoint };
}
