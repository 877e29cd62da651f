/**
 * Pot tapers: the fraction of the track's resistance between the start and the wiper at a rotation
 * position p in 0..1 (0 fully counter-clockwise).
 */
import type { Taper } from './types.js';

/** Where a knob sits when a design gives no `knobs` at all: mid rotation. */
export const DEFAULT_KNOB_POSITION = 0.5;

/**
 * Audio (logarithmic) taper modelled as an exponential law through 10 % at mid rotation
 * (common practice: audio pots sit at about 10-15 % of their resistance at mid rotation):
 *   f(p) = (b^p - 1) / (b - 1) with b = 81, so f(0) = 0, f(0.5) = (9 - 1) / 80 = 0.1, f(1) = 1.
 */
const AUDIO_TAPER_BASE = 81;

export function taperFraction(taper: Taper, position: number): number {
  if (taper === 'linear') return position;
  return (Math.pow(AUDIO_TAPER_BASE, position) - 1) / (AUDIO_TAPER_BASE - 1);
}

/** The taper fraction a knob at `position` gives, for a pot that may be wired backwards. */
export function potFraction(taper: Taper, position: number, reverse: boolean): number {
  return taperFraction(taper, reverse ? 1 - position : position);
}
