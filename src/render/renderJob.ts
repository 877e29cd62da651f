/**
 * One render job: a design file (plus overrides) and one take, rendered to a WAV and a JSON sidecar
 * in the output folder. A job is plain data so it can run in a worker thread.
 */
import path from 'node:path';
import { statSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { UserError } from '../errors.js';
import { readWavFile } from '../audio/wavRead.js';
import { wavLayout, writeWavFile, type WavOutputBits } from '../audio/wavWrite.js';
import { assertNotAnInput, writeFileAtomic } from '../audio/atomicWrite.js';
import { loadPartsLibrary } from '../design/parts.js';
import { readDesignFile } from '../design/parseDesign.js';
import { resolveDesign } from '../design/resolve.js';
import type { OversampleFactor } from '../dsp/oversampler.js';
import type { RenderProgress } from '../circuit/renderChannel.js';
import type { CalibrationScale } from '../audio/calibration.js';
import { renderTakeInPlace, type RenderSummary } from './renderTake.js';
import { voltsToDbfs } from '../audio/levels.js';
import { peakOf } from '../audio/calibration.js';
import { applyLoudnessMatch, type LoudnessMatchReport, type LoudnessMatchTarget } from './loudnessMatch.js';
import { measureWrittenTake, type TakeMetrics } from '../analysis/takeMetrics.js';
import { referenceThdPercent, thdAtLevelPercent } from '../analysis/referenceTone.js';
import { designNoise } from '../analysis/designNoise.js';
import { interpolatedDensity } from '../dsp/shapedNoise.js';

export interface RenderJob {
  designPath: string;
  partsPath?: string;
  overrides: string[];
  inputPath: string;
  outputDir: string;
  /** File name stem of the outputs; defaults to "<takeName>--<design>". */
  outputStem?: string;
  /** Every other input of the command (its other takes, a variants file): no output may overwrite one. */
  commandInputs?: string[];
  /** The take as the command first read it: a job refuses a take that changed since (compare reads takes once). */
  inputFingerprint?: TakeFingerprint;
  /** The take's name in output file names, unique within the run (`uniqueTakeNames`); defaults to the input's base name. */
  takeName?: string;
  oversample: OversampleFactor;
  scale: CalibrationScale;
  bits: WavOutputBits;
  /** TPDF dither for 16-bit output (wavWrite.ts). */
  dither?: boolean;
  /**
   * Loudness-match the written file (`compare`): gain to the target loudness, held under the
   * sample-peak ceiling. Without it the file keeps the circuit's calibrated level (`render`).
   */
  match?: LoudnessMatchTarget;
  /** Measure the written file (`compare`: loudness, peak, crest, centroid, spectrum). */
  measureWritten?: boolean;
  /** Also measure the design's THD on the reference tone (`compare`, once per variant). */
  referenceThd?: boolean;
  /** Also measure the design's THD on a 1 kHz tone at the take's own input peak (`compare`). */
  thdAtTakePeak?: boolean;
  /** Add the design's modelled output noise (`render --noise`), from this seed. */
  noiseSeed?: number;
}

export interface RenderJobResult {
  wavPath: string;
  sidecarPath: string;
  summary: RenderSummary;
  /** Present when the job asked for loudness matching. */
  match?: LoudnessMatchReport;
  /** Present when the job asked for `measureWritten`. */
  metrics?: TakeMetrics;
  /** Present when the job asked for `referenceThd`. */
  referenceThdPercent?: number | null;
  /** Present when the job asked for `thdAtTakePeak`. */
  thdAtTakePeakPercent?: number | null;
}

/** Keep letters and digits of any script, dot, dash and underscore; never a path separator or "..". */
export function sanitizeFileStem(text: string): string {
  const cleaned = text
    .normalize('NFC')
    .replace(/[^\p{L}\p{N}\p{M}._-]+/gu, '_')
    .replace(/\.{2,}/g, '.')
    .replace(/^[._]+/, '')
    .slice(0, 120);
  return cleaned === '' ? 'render' : cleaned;
}

/**
 * The peak of the file as written, dBFS: after any loudness-match gain, with PCM clipped at full scale
 * (a 32-bit float file keeps what lies beyond); null for silence.
 */
function writtenPeakDbfs(channels: readonly Float32Array[], bits: WavOutputBits): number | null {
  const peak = peakOf(channels);
  return voltsToDbfs(bits === '32f' ? peak : Math.min(1, peak), 1);
}

/** Size and modification time of a take, to notice it being replaced during a run. */
export interface TakeFingerprint {
  bytes: number;
  modifiedMs: number;
}

export function takeFingerprint(inputPath: string): TakeFingerprint {
  try {
    const stats = statSync(inputPath);
    return { bytes: stats.size, modifiedMs: stats.mtimeMs };
  } catch {
    return { bytes: -1, modifiedMs: -1 }; // unreadable: reading it reports why
  }
}

function sameFingerprint(a: TakeFingerprint, b: TakeFingerprint): boolean {
  return a.bytes === b.bytes && a.modifiedMs === b.modifiedMs;
}

/** Longest take name kept in an output stem. */
const TAKE_NAME_CHARS = 60;

/**
 * Readable file-name stems for the takes of one run, unique even when two inputs share a file name
 * (`day1/take1.wav`, `day2/take1.wav` -> `take1`, `take1-2`) or sanitise to the same text.
 */
export function uniqueTakeNames(inputPaths: readonly string[]): string[] {
  const used = new Set<string>();
  return inputPaths.map((inputPath) => {
    const base = sanitizeFileStem(path.basename(inputPath, path.extname(inputPath))).slice(0, TAKE_NAME_CHARS);
    let name = base;
    for (let n = 2; used.has(name.toLowerCase()); n++) name = `${base}-${n}`;
    // Case-insensitive file systems would merge names that differ only in case.
    used.add(name.toLowerCase());
    return name;
  });
}

export function defaultOutputStem(takeName: string, designName: string): string {
  return sanitizeFileStem(`${takeName}--${designName}`);
}

export async function runRenderJob(job: RenderJob, onProgress?: RenderProgress): Promise<RenderJobResult> {
  const parts = loadPartsLibrary(job.partsPath);
  const design = resolveDesign(await readDesignFile(job.designPath, parts, job.overrides));
  const wav = await readWavFile(job.inputPath);
  // Refused before rendering, not after: a render that cannot be written is wasted time.
  wavLayout(wav.channels.length, wav.frames, job.bits);
  if (job.inputFingerprint && !sameFingerprint(job.inputFingerprint, takeFingerprint(job.inputPath))) {
    throw new UserError(`${job.inputPath}: the take changed while the run was going on; run again once it is final`);
  }
  const stem = job.outputStem ?? defaultOutputStem(job.takeName ?? uniqueTakeNames([job.inputPath])[0], design.name);
  const wavPath = path.join(job.outputDir, `${stem}.wav`);
  const sidecarPath = path.join(job.outputDir, `${stem}.json`);
  const inputs = [job.inputPath, job.designPath, ...(job.partsPath ? [job.partsPath] : []), ...(job.commandInputs ?? [])];
  assertNotAnInput(wavPath, inputs);
  assertNotAnInput(sidecarPath, inputs);

  // The decoded samples are rendered in place: afterwards they hold the render, full scale = 1.
  // The take's own noise (pickup, interface) is in the recording: the added noise is the circuit's alone.
  const noise = job.noiseSeed === undefined ? undefined : designNoise(design, { source: null, sourceLabel: 'the take', referenceVolts: 0 });
  const summary = renderTakeInPlace(design, wav, {
    oversample: job.oversample,
    scale: job.scale,
    onProgress,
    ...(noise && job.noiseSeed !== undefined
      ? { noise: { seed: job.noiseSeed, density: interpolatedDensity(noise.densityPerHz.map((p) => ({ hz: p.hz, density: p.voltsPerRootHz ** 2 }))) } }
      : {}),
  });
  // `summary.output` stays the circuit's own level; `loudnessMatch` tells the gain the file got.
  const match = job.match ? applyLoudnessMatch(wav.channels, wav.sampleRate, job.match) : undefined;
  await writeWavFile(wavPath, wav.channels, wav.sampleRate, job.bits, job.dither ?? false);
  // peakVolts and the RMS figures stay the circuit's calibrated level; peakDbfs is the written file's own peak.
  summary.output.peakDbfs = writtenPeakDbfs(wav.channels, job.bits);
  const sidecar = {
    ...summary,
    output: { ...summary.output, file: path.basename(wavPath), bits: job.bits },
    overrides: job.overrides,
    ...(match ? { loudnessMatch: match } : {}),
    ...(noise && job.noiseSeed !== undefined ? { noise: { seed: job.noiseSeed, unweightedDbv: noise.unweightedDbv, aWeightedDbv: noise.aWeightedDbv } } : {}),
  };
  const written = [wavPath];
  let metrics: TakeMetrics | undefined;
  try {
    await writeFileAtomic(sidecarPath, `${JSON.stringify(sidecar, null, 2)}\n`);
    written.push(sidecarPath);
    // Measured here, on the job's own thread, so that compare's measurements run on every core too.
    if (job.measureWritten) metrics = await measureWrittenTake(wavPath);
  } catch (error) {
    // A failed job leaves none of its files (e.g. the disk filled between the WAV and its sidecar).
    await Promise.all(written.map((file) => rm(file, { force: true })));
    throw error;
  }
  const thdPercent = job.referenceThd ? referenceThdPercent(design, job.oversample) : undefined;
  const atPeak = job.thdAtTakePeak && summary.input.peakVolts > 0 ? thdAtLevelPercent(design, job.oversample, summary.input.peakVolts) : null;
  return {
    wavPath,
    sidecarPath,
    summary,
    ...(match ? { match } : {}),
    ...(metrics ? { metrics } : {}),
    ...(thdPercent !== undefined ? { referenceThdPercent: thdPercent } : {}),
    ...(job.thdAtTakePeak ? { thdAtTakePeakPercent: atPeak } : {}),
  };
}
