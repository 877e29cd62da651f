/**
 * What a comparison produced, as written to `<dir>/summary.json` and shown on the listening page.
 * Numbers that do not exist (loudness of silence, THD of the dry take, a failed variant's figures)
 * are null, never NaN or infinities.
 */
import type { CalibrationScale } from '../audio/calibration.js';
import type { WavOutputBits } from '../audio/wavWrite.js';
import type { OversampleFactor } from '../dsp/oversampler.js';

/** One player on the page: the dry take or one variant's render of one take. */
export interface CompareEntry {
  /** `recording`: a recording of the built circuit (`fit`'s page), beside the dry take and the renders. */
  kind: 'dry' | 'variant' | 'recording';
  /** Variant number (1-based, as on the page's number keys); 0 for the dry take. */
  variant: number;
  label: string;
  overrides: string[];
  /** File name inside the output folder; null when the render failed. */
  file: string | null;
  /** Integrated loudness (BS.1770-4) before matching, LUFS; null for silence or a failure. */
  loudnessBeforeLufs: number | null;
  /** Gain applied by loudness matching, dB (0 with --no-match). */
  gainDb: number;
  /** The -1 dBFS ceiling kept this file quieter than the target. */
  ceilingLimited: boolean;
  /** Turned down to the take's quietest player, because the ceiling held another player below the target. */
  levelledToQuietest?: boolean;
  /** Loudness of the written file, LUFS. */
  loudnessLufs: number | null;
  /** Sample peak of the written file, dBFS. */
  peakDbfs: number | null;
  /** Peak over RMS of the written file, dB. */
  crestDb: number | null;
  /** THD at the measure reference tone (1 kHz, 0.5 V peak), percent; null for the dry take. */
  thdPercent: number | null;
  /** THD of a 1 kHz tone at this take's own input peak (how hard the take drives it), percent; null for the dry take or silence. */
  thdAtTakePeakPercent: number | null;
  /** Spectral centroid of the written file, Hz. */
  centroidHz: number | null;
  /** Present when this render failed: why. */
  error?: string;
}

export interface CompareTake {
  /** The input file as given. */
  take: string;
  /** File-name stem used for this take's outputs. */
  name: string;
  sampleRate: number;
  channels: number;
  seconds: number;
  /** Dry take first, then the variants in order. */
  entries: CompareEntry[];
  /**
   * The loudness every sounding player of this take was matched to, LUFS: the target, or the quietest
   * player's loudness when the peak ceiling held one below it; null without matching.
   */
  matchedLufs: number | null;
}

export interface CompareVariantInfo {
  variant: number;
  label: string;
  overrides: string[];
  thdPercent: number | null;
  error?: string;
}

export interface CompareSummary {
  design: string;
  designFile: string;
  /** Overrides applied to every variant (`--set`). */
  commonOverrides: string[];
  loudnessMatch: { targetLufs: number; ceilingDbfs: number } | null;
  referenceTone: { freqHz: number; levelVolts: number; sampleRate: number };
  oversample: OversampleFactor;
  bits: WavOutputBits;
  calibration: CalibrationScale;
  variants: CompareVariantInfo[];
  takes: CompareTake[];
  /** One line per file the ceiling held quieter than the target. */
  ceilingLimited: string[];
  /** One line per failed render or variant. */
  failures: string[];
}
