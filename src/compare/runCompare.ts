/**
 * `compare`: render every variant of a design for every take (on every core), loudness-match the
 * renders and the dry take, measure what was written, and write `summary.json` and the listening
 * page `index.html` into the output folder. A failed variant is recorded and the rest go on.
 */
import { rm } from 'node:fs/promises';
import path from 'node:path';
import { UserError } from '../errors.js';
import { readWavFile, type DecodedWav } from '../audio/wavRead.js';
import type { CalibrationScale } from '../audio/calibration.js';
import type { WavOutputBits } from '../audio/wavWrite.js';
import { assertNotAnInput, createOutputFolder, noteOutputFolder, writeFileAtomic } from '../audio/atomicWrite.js';
import { loadPartsLibrary, type PartsLibrary } from '../design/parts.js';
import { readDesignFile } from '../design/parseDesign.js';
import { resolveDesign } from '../design/resolve.js';
import type { Design } from '../design/types.js';
import type { OversampleFactor } from '../dsp/oversampler.js';
import { referenceThdPercent } from '../analysis/referenceTone.js';
import { DEFAULT_MEASURE_OPTIONS } from '../analysis/measureDesign.js';
import type { SpectrumPoint } from '../analysis/analyzeTake.js';
import { toJsonText } from '../report/writeReports.js';
import { sanitizeFileStem, takeFingerprint, uniqueTakeNames, type RenderJob, type TakeFingerprint } from '../render/renderJob.js';
import { lockOutputFolder } from '../audio/folderLock.js';
import { runRenderJobs, type JobOutcome } from '../render/workerPool.js';
import type { LoudnessMatchReport, LoudnessMatchTarget } from '../render/loudnessMatch.js';
import { writeDryTake } from './dryTake.js';
import { levelToQuietest } from './levelToQuietest.js';
import { measureWrittenTake, type TakeMetrics } from '../analysis/takeMetrics.js';
import { buildListeningPage } from './listeningPage.js';
import type { CompareEntry, CompareSummary, CompareTake, CompareVariantInfo } from './summary.js';
import type { Variant } from './variants.js';

export interface CompareOptions {
  designPath: string;
  partsPath?: string;
  /** The `--variants` file, if any: an input no output may overwrite. */
  variantsPath?: string;
  inputPaths: string[];
  outputDir: string;
  variants: Variant[];
  /** Overrides for every variant (`--set`), applied before each variant's own. */
  commonOverrides: string[];
  /** Null keeps each render's own level (`--no-match`). */
  match: LoudnessMatchTarget | null;
  oversample: OversampleFactor;
  scale: CalibrationScale;
  bits: WavOutputBits;
  dither: boolean;
  threads?: number;
  onProgress?: (phase: 'rendering' | 'measuring', fraction: number) => void;
}

export interface CompareResult {
  summary: CompareSummary;
  summaryPath: string;
  pagePath: string;
}

interface CheckedVariant {
  variant: Variant;
  number: number;
  overrides: string[];
  design: Design<number> | null;
  error?: string;
}

function variantStem(takeName: string, number: number, label: string): string {
  return sanitizeFileStem(`${takeName}--v${String(number).padStart(2, '0')}-${label}`);
}

async function checkVariant(options: CompareOptions, parts: PartsLibrary, variant: Variant, number: number): Promise<CheckedVariant> {
  const overrides = [...options.commonOverrides, ...variant.overrides];
  const located = [...options.commonOverrides, ...variant.overrides.map((text, k) => (variant.origins ? { text, origin: variant.origins[k] } : text))];
  try {
    const design = resolveDesign(await readDesignFile(options.designPath, parts, located));
    return { variant, number, overrides, design };
  } catch (error) {
    if (!(error instanceof UserError)) throw error;
    return { variant, number, overrides, design: null, error: error.message };
  }
}

function entryFromMatch(match: LoudnessMatchReport | null | undefined): Pick<CompareEntry, 'loudnessBeforeLufs' | 'gainDb' | 'ceilingLimited'> {
  return { loudnessBeforeLufs: match?.loudnessBeforeLufs ?? null, gainDb: match?.gainDb ?? 0, ceilingLimited: match?.ceilingLimited ?? false };
}

export async function runCompare(options: CompareOptions): Promise<CompareResult> {
  if (options.variants.length === 0) throw new UserError('compare: nothing to compare; give --vary key=v1,v2,... or --variants file.json');
  if (options.inputPaths.length === 0) throw new UserError('compare: no input takes given');
  const parts = loadPartsLibrary(options.partsPath);
  // The design as written (plus --set) must be valid: otherwise every variant would fail alike.
  const base = resolveDesign(await readDesignFile(options.designPath, parts, options.commonOverrides));
  const takes: DecodedWav[] = [];
  const fingerprints: TakeFingerprint[] = [];
  for (const inputPath of options.inputPaths) {
    fingerprints.push(takeFingerprint(inputPath));
    takes.push(await readWavFile(inputPath));
  }
  const names = uniqueTakeNames(options.inputPaths);
  const inputs = [options.designPath, ...options.inputPaths, ...[options.partsPath, options.variantsPath].filter((p): p is string => p !== undefined)];
  const summaryPath = path.join(options.outputDir, 'summary.json');
  const pagePath = path.join(options.outputDir, 'index.html');
  for (const output of [summaryPath, pagePath]) assertNotAnInput(output, inputs);
  createOutputFolder(options.outputDir);
  noteOutputFolder(options.outputDir);
  const release = lockOutputFolder(options.outputDir);
  try {
    return await compareInto(options, { parts, base, takes, fingerprints, names, inputs, summaryPath, pagePath });
  } finally {
    release();
  }
}

interface CompareInputs {
  parts: PartsLibrary;
  base: Design<number>;
  takes: DecodedWav[];
  fingerprints: TakeFingerprint[];
  names: string[];
  inputs: string[];
  summaryPath: string;
  pagePath: string;
}

/** The run itself, with the output folder locked and every take read once. */
async function compareInto(options: CompareOptions, { parts, base, takes, fingerprints, names, inputs, summaryPath, pagePath }: CompareInputs): Promise<CompareResult> {

  const checked: CheckedVariant[] = [];
  for (const [index, variant] of options.variants.entries()) checked.push(await checkVariant(options, parts, variant, index + 1));
  const runnable = checked.filter((c) => c.design !== null);
  const jobs: RenderJob[] = [];
  const jobIndex = new Map<string, number>();
  names.forEach((takeName, takeIndex) => {
    for (const c of runnable) {
      jobIndex.set(`${takeIndex}:${c.number}`, jobs.length);
      jobs.push({
        designPath: options.designPath,
        partsPath: options.partsPath,
        overrides: c.overrides,
        inputPath: options.inputPaths[takeIndex],
        outputDir: options.outputDir,
        outputStem: variantStem(takeName, c.number, c.variant.label),
        oversample: options.oversample,
        scale: options.scale,
        bits: options.bits,
        dither: options.dither,
        ...(options.match ? { match: options.match } : {}),
        // Measured in the job, on whichever thread renders it; the THD once per variant.
        measureWritten: true,
        commandInputs: inputs,
        inputFingerprint: fingerprints[takeIndex],
        referenceThd: takeIndex === 0,
        thdAtTakePeak: true,
      });
    }
  });
  const outcomes: JobOutcome[] = jobs.length
    ? await runRenderJobs(jobs, { threads: options.threads, onProgress: (f) => options.onProgress?.('rendering', f) })
    : [];
  // Every file this run wrote: on any failure from here on, none of them stays (no page over half the renders).
  const written = outcomes.flatMap((outcome) => (outcome.ok ? [outcome.result.wavPath, outcome.result.sidecarPath] : []));
  try {
    const diskFull = outcomes.find((outcome) => !outcome.ok && outcome.diskFull);
    if (diskFull && !diskFull.ok) throw new UserError(diskFull.message);
    return await measureAndWritePage(options, { takes, names, inputs, summaryPath, pagePath, base }, { checked, runnable, jobIndex, outcomes, written });
  } catch (error) {
    await Promise.all(written.map((file) => rm(file, { force: true })));
    throw error;
  }
}

interface RenderedRun {
  checked: CheckedVariant[];
  runnable: CheckedVariant[];
  jobIndex: Map<string, number>;
  outcomes: JobOutcome[];
  /** Files written so far; this stage adds its own as it writes them. */
  written: string[];
}

/** Measure the renders, write the dry takes, level the players, and write summary.json and the page. */
async function measureAndWritePage(
  options: CompareOptions,
  { takes, names, inputs, summaryPath, pagePath, base }: Pick<CompareInputs, 'takes' | 'names' | 'inputs' | 'summaryPath' | 'pagePath' | 'base'>,
  { checked, runnable, jobIndex, outcomes, written }: RenderedRun,
): Promise<CompareResult> {

  const steps = runnable.length + takes.length * (checked.length + 1);
  let stepsDone = 0;
  const step = (): void => options.onProgress?.('measuring', ++stepsDone / steps);
  const thdByVariant = new Map<number, number | null>();
  for (const c of runnable) {
    const first = outcomes[jobIndex.get(`0:${c.number}`) ?? -1];
    // A job that failed (an unreadable first take, say) measured nothing: measure here.
    const thd = first?.ok ? first.result.referenceThdPercent : undefined;
    if (c.design) thdByVariant.set(c.number, thd !== undefined ? thd : referenceThdPercent(c.design, options.oversample));
    step();
  }

  const failures: string[] = [];
  const ceilingLimited: string[] = [];
  const variantInfo: CompareVariantInfo[] = checked.map((c) => ({
    variant: c.number,
    label: c.variant.label,
    overrides: c.variant.overrides,
    thdPercent: thdByVariant.get(c.number) ?? null,
    ...(c.error !== undefined ? { error: c.error } : {}),
  }));
  for (const c of checked) if (c.error !== undefined) failures.push(`variant ${c.number} "${c.variant.label}": ${c.error}`);

  const spectra = new Map<string, SpectrumPoint[]>();
  const measured = async (
    entry: Omit<CompareEntry, 'loudnessLufs' | 'peakDbfs' | 'crestDb' | 'centroidHz'>,
    fromJob?: TakeMetrics,
  ): Promise<CompareEntry> => {
    if (entry.file === null) return { ...entry, loudnessLufs: null, peakDbfs: null, crestDb: null, centroidHz: null };
    const metrics = fromJob ?? (await measureWrittenTake(path.join(options.outputDir, entry.file)));
    spectra.set(entry.file, metrics.spectrum);
    const { spectrum: _spectrum, ...figures } = metrics;
    const loudnessBeforeLufs = options.match ? entry.loudnessBeforeLufs : figures.loudnessLufs;
    if (entry.ceilingLimited) {
      ceilingLimited.push(
        `${entry.file}: held by the ${options.match?.ceilingDbfs} dBFS peak ceiling at ${figures.loudnessLufs?.toFixed(1)} LUFS, quieter than the ${options.match?.targetLufs} LUFS target`,
      );
    }
    return { ...entry, loudnessBeforeLufs, ...figures };
  };

  const compareTakes: CompareTake[] = [];
  for (const [takeIndex, wav] of takes.entries()) {
    const takeName = names[takeIndex];
    const dryFile = `${takeName}--dry.wav`;
    assertNotAnInput(path.join(options.outputDir, dryFile), inputs);
    const dryMatch = await writeDryTake(wav, path.join(options.outputDir, dryFile), options.match, options.bits, options.dither);
    written.push(path.join(options.outputDir, dryFile));
    const entries: CompareEntry[] = [
      await measured({ kind: 'dry', variant: 0, label: 'dry', overrides: [], file: dryFile, thdPercent: null, thdAtTakePeakPercent: null, ...entryFromMatch(dryMatch) }),
    ];
    step();
    for (const c of checked) {
      const common = { kind: 'variant' as const, variant: c.number, label: c.variant.label, overrides: c.variant.overrides, thdPercent: thdByVariant.get(c.number) ?? null };
      const index = jobIndex.get(`${takeIndex}:${c.number}`);
      const outcome = index === undefined ? undefined : outcomes[index];
      if (outcome === undefined || !outcome.ok) {
        const error = outcome && !outcome.ok ? outcome.message : (c.error ?? 'not rendered');
        if (outcome && !outcome.ok) failures.push(`variant ${c.number} "${c.variant.label}" on ${options.inputPaths[takeIndex]}: ${error}`);
        entries.push({ ...common, file: null, thdAtTakePeakPercent: null, ...entryFromMatch(null), loudnessLufs: null, peakDbfs: null, crestDb: null, centroidHz: null, error });
      } else {
        entries.push(
          await measured({ ...common, file: path.basename(outcome.result.wavPath), thdAtTakePeakPercent: outcome.result.thdAtTakePeakPercent ?? null, ...entryFromMatch(outcome.result.match) }, outcome.result.metrics),
        );
      }
      step();
    }
    let matchedLufs: number | null = null;
    if (options.match) {
      const levelled = await levelToQuietest(entries, options.outputDir, options.bits, options.dither);
      for (const [file, metrics] of levelled.remeasured) spectra.set(file, metrics.spectrum);
      matchedLufs = levelled.sharedLufs ?? options.match.targetLufs;
      if (levelled.sharedLufs !== null) {
        ceilingLimited.push(`${takeName}: every player matched to ${levelled.sharedLufs.toFixed(1)} LUFS, the quietest the ${options.match.ceilingDbfs} dBFS ceiling allowed, so the blind test stays fair`);
      }
    }
    compareTakes.push({ take: options.inputPaths[takeIndex], name: takeName, sampleRate: wav.sampleRate, channels: wav.channels.length, seconds: wav.frames / wav.sampleRate, entries, matchedLufs });
  }

  const { freqHz, levelVolts, sampleRate } = DEFAULT_MEASURE_OPTIONS;
  const summary: CompareSummary = {
    design: base.name,
    designFile: options.designPath,
    commonOverrides: options.commonOverrides,
    loudnessMatch: options.match,
    referenceTone: { freqHz, levelVolts, sampleRate },
    oversample: options.oversample,
    bits: options.bits,
    calibration: options.scale,
    variants: variantInfo,
    takes: compareTakes,
    ceilingLimited,
    failures,
  };
  await writeFileAtomic(summaryPath, toJsonText(summary));
  written.push(summaryPath);
  await writeFileAtomic(pagePath, await buildListeningPage(summary, spectra));
  return { summary, summaryPath, pagePath };
}
