/**
 * Decibels with one silence convention: a ratio of zero (silence) or one that is not finite has no
 * level, and reads `null`, which JSON holds and tables print as "n/a". Never -999 or -Infinity.
 */

/** 20 log10(ratio) for an amplitude ratio (volts over volts, or over full scale); null for silence. */
export function amplitudeDb(ratio: number): number | null {
  return ratio > 0 && Number.isFinite(ratio) ? 20 * Math.log10(ratio) : null;
}

/** 10 log10(ratio) for a power ratio; null for silence. */
export function powerDb(ratio: number): number | null {
  return ratio > 0 && Number.isFinite(ratio) ? 10 * Math.log10(ratio) : null;
}
