/**
 * `fit`'s listening page: the dry take, the recording of the built circuit (aligned to the dry take),
 * the initial model's and the fitted model's renders, all loudness-matched as `compare` matches its
 * players (and levelled to the quietest when the peak ceiling holds one back), with the blind test
 * preset to the recording against the fitted model.
 */
import path from 'node:path';
import { writeFileAtomic } from '../audio/atomicWrite.js';
import type { DecodedWav } from '../audio/wavRead.js';
import { measureWrittenTake } from '../analysis/takeMetrics.js';
import { REFERENCE_TONE } from '../analysis/referenceTone.js';
import type { SpectrumPoint } from '../analysis/analyzeTake.js';
import type { OversampleFactor } from '../dsp/oversampler.js';
import { DEFAULT_LOUDNESS_MATCH, type LoudnessMatchReport } from '../render/loudnessMatch.js';
import { runRenderJob, uniqueTakeNames } from '../render/renderJob.js';
import { writeDryTake } from './dryTake.js';
import { levelToQuietest } from './levelToQuietest.js';
import { buildListeningPage } from './listeningPage.js';
import type { CompareEntry, CompareSummary } from './summary.js';

export interface FitPageOptions {
  outputDir: string;
  designPath: string;
  designName: string;
  partsPath?: string;
  /** The run's own `--set` overrides, and the fitted values as overrides. */
  commonOverrides: string[];
  fittedOverrides: string[];
  dry: DecodedWav;
  /** The recording, aligned to the dry take, mono, full scale = 1. */
  alignedRecording: Float64Array;
  oversample: OversampleFactor;
  /** Every input of the command: no output may overwrite one. */
  commandInputs: string[];
}

const BITS = '24';

/** Writes the players and `index.html` into `outputDir`; returns the page's path. */
export async function writeFitListeningPage(options: FitPageOptions): Promise<string> {
  const match = DEFAULT_LOUDNESS_MATCH;
  const [takeName] = uniqueTakeNames([options.dry.path]);
  const entry = (kind: CompareEntry['kind'], variant: number, label: string, overrides: string[], file: string, report: LoudnessMatchReport | null | undefined): CompareEntry => ({
    kind,
    variant,
    label,
    overrides,
    file,
    loudnessBeforeLufs: report?.loudnessBeforeLufs ?? null,
    gainDb: report?.gainDb ?? 0,
    ceilingLimited: report?.ceilingLimited ?? false,
    loudnessLufs: null,
    peakDbfs: null,
    crestDb: null,
    thdPercent: null,
    thdAtTakePeakPercent: null,
    centroidHz: null,
  });
  const dryFile = `${takeName}--dry.wav`;
  const dryMatch = await writeDryTake(options.dry, path.join(options.outputDir, dryFile), match, BITS, true);
  const recordingFile = `${takeName}--recording.wav`;
  const recording: DecodedWav = { ...options.dry, path: recordingFile, channels: [Float32Array.from(options.alignedRecording)] };
  const recordingMatch = await writeDryTake(recording, path.join(options.outputDir, recordingFile), match, BITS, true);
  const render = async (stem: string, overrides: string[]) =>
    runRenderJob({
      designPath: options.designPath,
      partsPath: options.partsPath,
      overrides,
      inputPath: options.dry.path,
      outputDir: options.outputDir,
      outputStem: `${takeName}--${stem}`,
      oversample: options.oversample,
      scale: { fullScaleVolts: 1 },
      bits: BITS,
      dither: true,
      match,
      commandInputs: options.commandInputs,
    });
  const initial = await render('initial-model', options.commonOverrides);
  const fitted = await render('fitted-model', [...options.commonOverrides, ...options.fittedOverrides]);
  const entries: CompareEntry[] = [
    entry('dry', 0, 'dry', [], dryFile, dryMatch),
    entry('recording', 1, 'recording of the build (aligned)', [], recordingFile, recordingMatch),
    entry('variant', 2, 'initial model', options.commonOverrides, path.basename(initial.wavPath), initial.match),
    entry('variant', 3, 'fitted model', [...options.commonOverrides, ...options.fittedOverrides], path.basename(fitted.wavPath), fitted.match),
  ];
  const spectra = new Map<string, readonly SpectrumPoint[]>();
  for (const e of entries) {
    const { spectrum, ...figures } = await measureWrittenTake(path.join(options.outputDir, e.file as string));
    Object.assign(e, figures);
    spectra.set(e.file as string, spectrum);
  }
  const levelled = await levelToQuietest(entries, options.outputDir, BITS, true);
  for (const [file, metrics] of levelled.remeasured) spectra.set(file, metrics.spectrum);
  const summary: CompareSummary = {
    design: options.designName,
    designFile: options.designPath,
    commonOverrides: options.commonOverrides,
    loudnessMatch: match,
    referenceTone: { ...REFERENCE_TONE },
    oversample: options.oversample,
    bits: BITS,
    calibration: { fullScaleVolts: 1 },
    variants: entries.filter((e) => e.kind === 'variant').map((e) => ({ variant: e.variant, label: e.label, overrides: e.overrides, thdPercent: null })),
    takes: [
      {
        take: options.dry.path,
        name: takeName,
        sampleRate: options.dry.sampleRate,
        channels: 1,
        seconds: options.dry.frames / options.dry.sampleRate,
        entries,
        matchedLufs: levelled.sharedLufs ?? match.targetLufs,
      },
    ],
    ceilingLimited: [],
    failures: [],
  };
  const pagePath = path.join(options.outputDir, 'index.html');
  await writeFileAtomic(pagePath, await buildListeningPage(summary, spectra));
  return pagePath;
}
