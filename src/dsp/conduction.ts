/**
 * How often a stage's diodes conduct, for the render sidecar and reports.
 *
 * Definition: a sample counts as conducting when the forward-biased diode string's incremental
 * conductance exceeds its conductance at zero bias by CONDUCTION_FRACTION of the linear conductance
 * it works against (1/R of the clipper's series resistor, 1/Rf of a gain stage's feedback resistor).
 * At that point the diodes take at least that share more of any small change of the current arriving
 * at their node than they do at rest, i.e. the node's small-signal gain has fallen by about 0.8 dB or
 * more below its gain at rest: the diodes have started to clip. Measured from the zero-bias
 * conductance, so a leaky (germanium) string, which shunts some signal even at rest, counts only when
 * it clips, not all the time. The test is a comparison of the node voltage against a threshold
 * precomputed from the Shockley model, so it costs nothing per sample.
 */
export const CONDUCTION_FRACTION = 0.1;

/** Counts since the processor's last reset (or creation). */
export interface ConductionMeter {
  readonly conductingSamples: number;
  readonly countedSamples: number;
}

/** The incremental conductance above which a string counts as conducting (see above), siemens. */
export function conductionThresholdSiemens(zeroBiasSiemens: number, againstSiemens: number): number {
  return zeroBiasSiemens + CONDUCTION_FRACTION * againstSiemens;
}
