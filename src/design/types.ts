/**
 * Typed designs. A design file is parsed into `Design<Resistance>` (resistors may be pots driven by
 * knobs); `resolveDesign` turns it into `Design<number>` for a given set of knob positions, which is
 * what the stage models are built from. All values are SI base units: ohms, farads, volts, amperes.
 */

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

export type Stage<R = Resistance> =
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
}

/** What every stage model needs besides its own spec. */
export interface CircuitContext {
  sampleRate: number; // Hz, the rate this stage runs at (already oversampled where it applies)
  supplyVolts: number;
  temperatureC: number;
}
