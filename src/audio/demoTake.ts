/**
 * A DI-like guitar take of our own: a plucked-string model plays a short phrase through a magnetic
 * pickup model, giving volts as a passive pickup would (about 0.1-1 V peak, common
 * practice). Deterministic: a seeded mulberry32 generator, no Math.random.
 *
 * Scenario (our own): a slow phrase in D minor at 96 bpm. Single notes D3 F3 A3 C4, a held D4, a
 * strummed D minor chord (D3 A3 D4 F4), a walk down G3 F3 E3, and an A5 power chord (A2 E3 A3) left
 * to ring and muted just before the end. Small seeded timing and dynamics variations.
 *
 * Models (sources from memory):
 * - String: Karplus-Strong loop with the extensions of Jaffe & Smith, "Extensions of the
 *   Karplus-Strong plucked-string algorithm", Computer Music Journal 7(2), 1983: two-point average
 *   loss filter (half a sample of delay) scaled for a chosen 60 dB decay time, first-order allpass
 *   for the fractional part of the period; the loop starts from the shape of an ideal pluck.
 * - Pickup position: the pickup at a fraction p of the scale length from the bridge hears the
 *   direct and bridge-reflected (inverted) waves p periods apart: comb 1 - z^-(p N).
 * - Magnetic pickup: output voltage follows string velocity (Faraday's law), so a first difference;
 *   then the coil inductance against cable capacitance gives a second-order resonant low-pass,
 *   around 3-5 kHz with Q about 2-3 for passive pickups (common practice), here from the biquad of
 *   R. Bristow-Johnson's "Audio EQ Cookbook".
 */
import { mulberry32 } from '../dsp/random.js';

export interface DemoTakeOptions {
  sampleRate?: number;
  seconds?: number;
  seed?: number;
}

export interface DemoTake {
  sampleRate: number;
  /** Pickup output, volts. */
  volts: Float64Array;
  description: string;
}

const DEFAULT_SAMPLE_RATE_HZ = 48_000;
const DEFAULT_SECONDS = 10;
const DEFAULT_SEED = 20_240_611;

const TEMPO_BPM = 96;
const PHRASE_START_SECONDS = 0.15;
const STRUM_SPACING_SECONDS = 0.014;
const TIMING_JITTER_SECONDS = 0.008;
const VELOCITY_JITTER = 0.1;

const PEAK_VOLTS = 0.45;
const PICKUP_POSITION = 0.17; // fraction of the scale length from the bridge (between bridge and neck pickups)
const PICKUP_RESONANCE_HZ = 4_000;
const PICKUP_RESONANCE_Q = 2.5;
const PLUCK_POSITION = 0.2; // picking hand, fraction of the scale length from the bridge
const RELEASE_T60_SECONDS = 0.1; // fretting hand lifts: strings damp fast
const RELEASE_TAIL_SECONDS = 0.4; // after release the voice is below -100 dB

/** One event of the phrase: MIDI note numbers (12-TET, A4 = 69 = 440 Hz), times in beats. */
interface PhraseEvent {
  notes: readonly number[];
  startBeat: number;
  lengthBeats: number;
  velocity: number;
}

const PHRASE: readonly PhraseEvent[] = [
  { notes: [50], startBeat: 0, lengthBeats: 1, velocity: 0.8 },
  { notes: [53], startBeat: 1, lengthBeats: 1, velocity: 0.7 },
  { notes: [57], startBeat: 2, lengthBeats: 1, velocity: 0.75 },
  { notes: [60], startBeat: 3, lengthBeats: 1, velocity: 0.7 },
  { notes: [62], startBeat: 4, lengthBeats: 2, velocity: 0.9 },
  { notes: [50, 57, 62, 65], startBeat: 6, lengthBeats: 3, velocity: 1 },
  { notes: [55], startBeat: 9, lengthBeats: 1, velocity: 0.75 },
  { notes: [53], startBeat: 10, lengthBeats: 0.5, velocity: 0.65 },
  { notes: [52], startBeat: 10.5, lengthBeats: 1.5, velocity: 0.8 },
  { notes: [45, 52, 57], startBeat: 12, lengthBeats: 3.6, velocity: 1 },
];

interface PluckedNote {
  frequencyHz: number;
  startSeconds: number;
  releaseSeconds: number;
  velocity: number;
}

/** Uniform deviates in [-1, 1) from a seeded generator (dsp/random.ts). */
type SignedRandom = () => number;

function signedRandom(seed: number): SignedRandom {
  const uniform = mulberry32(seed);
  return () => 2 * uniform() - 1;
}

/** 12-tone equal temperament, A4 = 440 Hz (ISO 16). */
export function midiNoteToHz(note: number): number {
  return 440 * 2 ** ((note - 69) / 12);
}

/** 60 dB decay time of a string, longer for low notes (a plausible guitar sustain, our choice). */
function sustainT60Seconds(frequencyHz: number): number {
  return 6 * Math.sqrt(110 / frequencyHz);
}

function scheduleNotes(random: SignedRandom): PluckedNote[] {
  const secondsPerBeat = 60 / TEMPO_BPM;
  const notes: PluckedNote[] = [];
  for (const event of PHRASE) {
    const eventStart = PHRASE_START_SECONDS + event.startBeat * secondsPerBeat + TIMING_JITTER_SECONDS * random();
    const releaseSeconds = PHRASE_START_SECONDS + (event.startBeat + event.lengthBeats) * secondsPerBeat;
    event.notes.forEach((note, stringIndex) => {
      notes.push({
        frequencyHz: midiNoteToHz(note),
        startSeconds: eventStart + stringIndex * STRUM_SPACING_SECONDS,
        releaseSeconds,
        // a downstroke loses a little force across the strings
        velocity: event.velocity * (1 - 0.06 * stringIndex) * (1 + VELOCITY_JITTER * random()),
      });
    });
  }
  return notes;
}

/**
 * Initial string shape over one loop period: an ideal pluck at PLUCK_POSITION is a triangle on the
 * string, which over the round trip becomes the triangle and its inverted mirror image; its
 * harmonics fall as sin(k pi beta) / k^2 (Fletcher & Rossing, "The Physics of Musical Instruments",
 * plucked string, from memory). A one-pole low-pass rounds the corner like a pick of finite width
 * (harder picking is brighter) and a little noise adds the pick's scrape.
 */
function fillPluckShape(line: Float64Array, velocity: number, random: SignedRandom): void {
  const length = line.length;
  const clampedVelocity = Math.min(1, velocity);
  const smoothing = 0.85 - 0.35 * clampedVelocity;
  const noiseLevel = 0.03 * clampedVelocity;
  let smoothed = 0;
  let mean = 0;
  for (let i = 0; i < length; i++) {
    const x = (2 * i) / length; // position along the round trip, in string lengths
    const onString = x < 1 ? x : 2 - x;
    const triangle = onString < PLUCK_POSITION ? onString / PLUCK_POSITION : (1 - onString) / (1 - PLUCK_POSITION);
    const shape = (x < 1 ? triangle : -triangle) + noiseLevel * random();
    smoothed += (1 - smoothing) * (shape - smoothed);
    line[i] = smoothed;
    mean += smoothed;
  }
  mean /= length;
  for (let i = 0; i < length; i++) line[i] = (line[i] - mean) * velocity;
}

/**
 * Adds one plucked note, as string displacement seen at the pickup, into `out`.
 * The delay line doubles as the output history for the pickup-position comb.
 */
function addPluckedNote(out: Float64Array, note: PluckedNote, sampleRate: number, random: SignedRandom): void {
  const startIndex = Math.round(note.startSeconds * sampleRate);
  if (startIndex >= out.length) return;
  const releaseIndex = Math.round(note.releaseSeconds * sampleRate);
  const endIndex = Math.min(out.length, releaseIndex + Math.round(RELEASE_TAIL_SECONDS * sampleRate));

  // Loop delay = integer line + 0.5 (loss filter) + d (allpass), d in [0.1, 1.1) keeps the allpass well behaved.
  const periodSamples = sampleRate / note.frequencyHz;
  const lineLength = Math.floor(periodSamples - 0.6);
  const fraction = periodSamples - 0.5 - lineLength;
  const allpassCoefficient = (1 - fraction) / (1 + fraction);
  const sustainGain = 10 ** (-3 / (note.frequencyHz * sustainT60Seconds(note.frequencyHz)));
  const releaseGain = 10 ** (-3 / (note.frequencyHz * RELEASE_T60_SECONDS));

  const line = new Float64Array(lineLength);
  fillPluckShape(line, note.velocity, random);

  // Pickup-position comb delay, split into integer and linear-interpolation parts.
  const pickupDelay = PICKUP_POSITION * periodSamples;
  const pickupWhole = Math.floor(pickupDelay);
  const pickupFraction = pickupDelay - pickupWhole;

  let index = 0;
  let previousDelayed = 0;
  let previousLoss = 0;
  let previousAllpass = 0;
  let gain = sustainGain;
  for (let n = startIndex; n < endIndex; n++) {
    if (n === releaseIndex) gain = releaseGain;
    const delayed = line[index];
    const loss = gain * 0.5 * (delayed + previousDelayed);
    const allpass = allpassCoefficient * (loss - previousAllpass) + previousLoss;
    previousDelayed = delayed;
    previousLoss = loss;
    previousAllpass = allpass;
    line[index] = allpass;
    // line[index - k] holds the output of k samples ago
    let back = index - pickupWhole;
    if (back < 0) back += lineLength;
    let backOne = back - 1;
    if (backOne < 0) backOne += lineLength;
    const reflected = (1 - pickupFraction) * line[back] + pickupFraction * line[backOne];
    out[n] += allpass - reflected;
    index = index + 1 === lineLength ? 0 : index + 1;
  }
}

/** Magnetic pickup: velocity (first difference) then the coil-cable resonance, in place. */
function applyPickupElectrics(signal: Float64Array, sampleRate: number): void {
  // Audio EQ Cookbook low-pass biquad, normalised by a0.
  const omega = (2 * Math.PI * PICKUP_RESONANCE_HZ) / sampleRate;
  const alpha = Math.sin(omega) / (2 * PICKUP_RESONANCE_Q);
  const cosOmega = Math.cos(omega);
  const a0 = 1 + alpha;
  const b0 = (1 - cosOmega) / 2 / a0;
  const b1 = (1 - cosOmega) / a0;
  const a1 = (-2 * cosOmega) / a0;
  const a2 = (1 - alpha) / a0;
  let previousInput = 0;
  let x1 = 0;
  let x2 = 0;
  let y1 = 0;
  let y2 = 0;
  for (let n = 0; n < signal.length; n++) {
    const velocity = signal[n] - previousInput;
    previousInput = signal[n];
    const y = b0 * velocity + b1 * x1 + b0 * x2 - a1 * y1 - a2 * y2;
    x2 = x1;
    x1 = velocity;
    y2 = y1;
    y1 = y;
    signal[n] = y;
  }
}

function validateOptions(sampleRate: number, seconds: number, seed: number): void {
  if (!Number.isInteger(sampleRate) || sampleRate < 2 * 2 * PICKUP_RESONANCE_HZ) {
    throw new RangeError(`demo take: sample rate must be an integer of at least ${4 * PICKUP_RESONANCE_HZ} Hz (got ${sampleRate})`);
  }
  if (!Number.isFinite(seconds) || seconds <= 0 || seconds > 600) {
    throw new RangeError(`demo take: length must be between 0 and 600 s (got ${seconds})`);
  }
  if (!Number.isInteger(seed)) throw new RangeError(`demo take: seed must be an integer (got ${seed})`);
}

export function synthesizeDemoTake(options: DemoTakeOptions = {}): DemoTake {
  const sampleRate = options.sampleRate ?? DEFAULT_SAMPLE_RATE_HZ;
  const seconds = options.seconds ?? DEFAULT_SECONDS;
  const seed = options.seed ?? DEFAULT_SEED;
  validateOptions(sampleRate, seconds, seed);

  const random = signedRandom(seed);
  const volts = new Float64Array(Math.round(seconds * sampleRate));
  for (const note of scheduleNotes(random)) addPluckedNote(volts, note, sampleRate, random);
  applyPickupElectrics(volts, sampleRate);

  let peak = 0;
  for (let n = 0; n < volts.length; n++) peak = Math.max(peak, Math.abs(volts[n]));
  if (peak > 0) {
    const scale = PEAK_VOLTS / peak;
    for (let n = 0; n < volts.length; n++) volts[n] *= scale;
  }
  const description =
    `synthetic DI take, ${seconds} s at ${sampleRate} Hz (seed ${seed}): a plucked-string model plays a slow ` +
    `D minor phrase at ${TEMPO_BPM} bpm (single notes, a D minor chord, an A5 power chord) through a magnetic ` +
    `pickup at ${Math.round(PICKUP_POSITION * 100)} % of the scale length with a ${PICKUP_RESONANCE_HZ / 1000} kHz ` +
    `Q ${PICKUP_RESONANCE_Q} resonance; ${PEAK_VOLTS} V peak`;
  return { sampleRate, volts, description };
}
