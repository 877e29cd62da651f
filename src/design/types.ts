/**
 * Typed designs. A design file is parsed into `Design<Resistance>` (resistors may be pots driven by
 * knobs); `resolveDesign` turns it into `Design<number>` for a given set of knob positions, which is
 * what the stage models are built from. All values are SI base units: ohms, farads, volts, amperes.
 */
import type { DesignTolerances } from './tolerances.js';

export type Taper = 'linear' | 'audio';

/** A resistor that is (partly) a potentiometer: R = fixed + pot * taper(position). */
export interface Pot {
  fixedOhms: number;
  potOhms: number;
  knob: string;
  taper: Taper;
  /** Wired backwards: the knob's position p acts as 1 - p. */
  reverse: boolean;
}

export type Resistance = number | Pot;

/** Shockley diode with ohmic series resistance, plus the datasheet rating used by `check`. */
export interface DiodeParams {
  name: string;
  saturationCurrent: number; // A
  ideality: number; // n, dimensionless
  seriesResistance: number; // ohm
  ratedCurrent: number; // A, continuous forward current rating
  /** Datasheet ranges of Is and n (e.g. the Is that keep VF within its datasheet limits), for tolerance runs. */
  ranges?: Partial<Record<'saturationCurrent' | 'ideality', ParamRange>>;
  source: string;
}

export interface OpampParams {
  name: string;
  gbwHz: number; // Infinity for the ideal part
  slewRateVoltsPerSecond: number; // Infinity for the ideal part
  headroomLowVolts: number; // output swing limit above the negative rail
  headroomHighVolts: number; // output swing limit below the positive rail
  supplyMinVolts: number;
  supplyMaxVolts: number;
  /** DC open-loop voltage gain A0, V/V (datasheet "large-signal voltage gain"); Infinity for the ideal part. */
  openLoopGain: number;
  /** Input common-mode range: how close to the negative / positive rail the inputs may go, volts; null = not stated. */
  commonModeLowVolts: number | null;
  commonModeHighVolts: number | null;
  /** Input voltage noise density at 1 kHz, V/sqrt(Hz) (datasheet e_n); null = not stated. */
  noiseVoltage: number | null;
  /** Input current noise density at 1 kHz, A/sqrt(Hz) (datasheet i_n); null = not stated. */
  noiseCurrent: number | null;
  /** Datasheet ranges (typically min to typ) of GBW and slew rate, for tolerance runs. */
  ranges: Partial<Record<'gbwHz' | 'slewRateVoltsPerSecond', ParamRange>>;
  source: string;
}

/** A datasheet range (min..max) of one part parameter, for tolerance runs and `check`. */
export interface ParamRange {
  min: number;
  max: number;
}

/** Ebers-Moll transport model of a bipolar transistor (parameters for the NPN sense; PNP mirrors them). */
export interface BjtParams {
  name: string;
  polarity: 'npn' | 'pnp';
  saturationCurrent: number; // A, transport saturation current Is
  betaForward: number; // forward common-emitter current gain
  betaReverse: number; // reverse common-emitter current gain
  ideality: number; // emission coefficient n (1 unless stated)
  ranges: Partial<Record<'saturationCurrent' | 'betaForward', ParamRange>>;
  source: string;
}

/** Square-law (Shichman-Hodges) junction FET. */
export interface JfetParams {
  name: string;
  polarity: 'n' | 'p';
  idss: number; // A, drain current at VGS = 0 in saturation
  pinchOff: number; // V, VGS(off): negative for n-channel, positive for p-channel
  lambda: number; // 1/V, channel-length modulation
  ranges: Partial<Record<'idss' | 'pinchOff', ParamRange>>;
  source: string;
}

export interface InputStage<R = Resistance> {
  id: string;
  type: 'input';
  series: R; // 0 when absent
  coupling: number; // F
  pulldown: R;
}

export interface GainStage<R = Resistance> {
  id: string;
  type: 'gain';
  opamp: OpampParams;
  rf: R; // 0 = unity buffer
  rg: R | null; // null = no ground leg (unity buffer)
  cg: number | null; // F in series with rg, null when absent
  cf: number | null; // F across rf, null when absent
  feedbackDiode: DiodeParams | null;
  feedbackUp: number;
  feedbackDown: number;
  /** Clipping at the rails is intended (no `rails-before-diodes` warning from check); absent = false. */
  railClipping?: boolean;
}

export interface ClipperStage<R = Resistance> {
  id: string;
  type: 'clipper';
  series: R;
  cap: number | null; // F across the diodes, null = memoryless
  diode: DiodeParams; // diodes conducting for positive node voltage
  downDiode: DiodeParams; // diodes conducting for negative node voltage (same as diode unless set)
  up: number;
  down: number;
}

/** First-order passive low-pass: R (fixed + pot on its knob) into C to the bias point. */
export interface ToneStage<R = Resistance> {
  id: string;
  type: 'tone';
  r: R;
  cap: number;
}

export interface RcStage<R = Resistance> {
  id: string;
  type: 'lowpass' | 'highpass';
  r: R;
  c: number;
}

export interface VolumeStage {
  id: string;
  type: 'volume';
  potOhms: number;
  knob: string;
  taper: Taper;
  reverse: boolean;
}

/** Node names with a fixed meaning in every circuit stage. */
export const GROUND_NODE = 'gnd';
export const SUPPLY_NODE = 'vcc';
export const REFERENCE_NODE = 'vref';
export const RESERVED_NODES: readonly string[] = [GROUND_NODE, SUPPLY_NODE, REFERENCE_NODE];

interface ElementHead {
  id: string;
}

export interface ResistorElement extends ElementHead {
  type: 'resistor';
  nodes: [string, string];
  ohms: number;
}

export interface CapacitorElement extends ElementHead {
  type: 'capacitor';
  nodes: [string, string];
  farads: number;
}

/** Pot: nodes [lug 1, wiper, lug 3]; resistance lug 1 to wiper = taper(position) x ohms. */
export interface PotElement extends ElementHead {
  type: 'pot';
  nodes: [string, string, string];
  ohms: number;
  knob: string;
  taper: Taper;
  reverse: boolean;
}

/** `count` equal diodes in series, nodes [anode, cathode]. */
export interface DiodeElement extends ElementHead {
  type: 'diode';
  nodes: [string, string];
  diode: DiodeParams;
  count: number;
}

/** Op-amp, nodes [non-inverting input, inverting input, output], powered from gnd and vcc. */
export interface OpampElement extends ElementHead {
  type: 'opamp';
  nodes: [string, string, string];
  opamp: OpampParams;
}

/** Bipolar transistor, nodes [collector, base, emitter]. */
export interface BjtElement extends ElementHead {
  type: 'npn' | 'pnp';
  nodes: [string, string, string];
  bjt: BjtParams;
}

/** Junction FET, nodes [drain, gate, source]. */
export interface JfetElement extends ElementHead {
  type: 'njfet' | 'pjfet';
  nodes: [string, string, string];
  jfet: JfetParams;
}

export type CircuitElement =
  | ResistorElement
  | CapacitorElement
  | PotElement
  | DiodeElement
  | OpampElement
  | BjtElement
  | JfetElement;

export type ElementType = CircuitElement['type'];

/**
 * Any schematic as data. `input` is driven by the previous stage (or the take) as an ideal voltage
 * source at 0 V DC; the stage's output is `output`'s voltage minus its DC operating point.
 * Pots keep their knob: the netlist builder reads the position from the design's knobs.
 */
export interface CircuitStage {
  id: string;
  type: 'circuit';
  input: string;
  output: string;
  elements: CircuitElement[];
}

export type Stage<R = Resistance> =
  | CircuitStage
  | InputStage<R>
  | GainStage<R>
  | ClipperStage<R>
  | ToneStage<R>
  | RcStage<R>
  | VolumeStage;

export type StageType = Stage['type'];

export interface Design<R = Resistance> {
  name: string;
  supplyVolts: number;
  temperatureC: number;
  knobs: Record<string, number>; // positions 0..1
  stages: Stage<R>[];
  /** Part tolerances for `spread` (absent: the defaults of tolerances.ts). */
  tolerances?: DesignTolerances;
}

/** What every stage model needs besides its own spec. */
export interface CircuitContext {
  sampleRate: number; // Hz, the rate this stage runs at (already oversampled where it applies)
  supplyVolts: number;
  temperatureC: number;
}
