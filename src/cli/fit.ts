/**
 * `clipbench fit <design.json> --dry dry.wav --wet recorded.wav --free key[,key...] [-o dir] [--json file]`:
 * which values make the model sound like the built circuit (analysis/fitDesign.ts).
 */
import path from 'node:path';
import type { Command } from 'commander';
import { assertNotAnInput, createOutputFolder, writeFileAtomic } from '../audio/atomicWrite.js';
import { calibrate } from '../audio/calibration.js';
import { readWavFile } from '../audio/wavRead.js';
import { advance } from '../analysis/alignTakes.js';
import { fitDesign, type FitReport } from '../analysis/fitDesign.js';
import { writeFitListeningPage } from '../compare/fitPage.js';
import { applyOverrides } from '../design/overrides.js';
import { parseJsonText } from '../design/jsonText.js';
import { loadPartsLibrary } from '../design/parts.js';
import { readDesignText } from '../design/parseDesign.js';
import { UserError } from '../errors.js';
import { runRenderJob } from '../render/renderJob.js';
import { formatRows, formatValue } from '../report/table.js';
import { toJsonText, writeJsonReport } from '../report/writeReports.js';
import { collect, parseOversample } from './options.js';
import { createProgressBar } from './progress.js';

interface FitFlags {
  dry: string;
  wet: string;
  free: string[];
  output?: string;
  json?: string;
  latency?: string;
  gainDb?: string;
  oversample: string;
  set?: string[];
  parts?: string;
}

/** The first channel of a take, in full-scale units (a mono fit; stereo takes use their left channel). */
async function readMono(file: string): Promise<{ samples: Float64Array; sampleRate: number }> {
  const wav = await readWavFile(file);
  calibrate(wav.channels, { fullScaleVolts: 1 }, file);
  return { samples: Float64Array.from(wav.channels[0]), sampleRate: wav.sampleRate };
}

function parseNumber(flag: string, text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const value = Number(text);
  if (text.trim() === '' || !Number.isFinite(value)) throw new UserError(`${flag}: "${text}" is not a number`);
  return value;
}

function summary(report: FitReport): string {
  const percent = (p: number): string => `${p.toPrecision(3)} %`;
  const lines = [
    `Aligned: latency ${report.latencySamples.toFixed(2)} samples (${report.latencyMs.toFixed(3)} ms), interface gain ${report.gainDb.toFixed(2)} dB`,
    `Error-to-signal ratio (pre-emphasised): ${percent(report.esrBeforePercent)} (${formatValue(report.esrBeforeDb, 1, 'dB')}) before, ${percent(report.esrAfterPercent)} (${formatValue(report.esrAfterDb, 1, 'dB')}) after`,
    formatRows(
      ['key', 'initial', 'fitted', 'uncertainty', 'identifiable'],
      report.fitted.map((f) => [f.key, f.initial.toPrecision(5), f.value.toPrecision(5), f.uncertainty === null ? 'n/a' : f.uncertainty.toPrecision(2), f.identifiable ? 'yes' : 'no: held (it moves the output only together with another key)']),
    ).trimEnd(),
    `Residual by octave (dB re the recording): ${report.residualByOctave.map((o) => `${o.hz} Hz ${formatValue(o.db, 1)}`).join(', ')}`,
  ];
  return `${lines.join('\n')}\n`;
}

export function registerFitCommand(program: Command): void {
  program
    .command('fit')
    .description('fit part values so the model matches a recording of the built circuit played with the same dry take')
    .argument('<design>', 'design file (JSON)')
    .requiredOption('--dry <wav>', 'the dry DI take that was played through the built circuit')
    .requiredOption('--wet <wav>', 'the recording of the built circuit')
    .requiredOption('--free <keys>', 'keys to fit (as --set keys: knobs, stage.field, stage.element.value, stage.diode.saturationCurrent...), comma-separated, each optionally key=min..max', collect)
    .option('-o, --output <dir>', 'write the fitted design file and its render of the dry take here')
    .option('--json <file>', 'write the fit as JSON')
    .option('--latency <samples>', 'fix the latency instead of estimating it (samples, may be fractional)')
    .option('--gain-db <dB>', "fix the interface's gain instead of estimating it")
    .option('--oversample <N>', 'oversampling of the nonlinear stages while fitting: 1, 2, 4, 8 or 16', '8')
    .option('--set <key=value>', 'override a knob or stage field before fitting; repeatable', collect)
    .option('--parts <file>', 'extra parts library (JSON)')
    .action(async (designPath: string, flags: FitFlags) => {
      const inputs = [designPath, flags.dry, flags.wet, ...(flags.parts ? [flags.parts] : [])];
      if (flags.json) assertNotAnInput(flags.json, inputs);
      const free = flags.free.flatMap((text) => text.split(',')).map((key) => key.trim()).filter((key) => key !== '');
      if (free.length === 0) throw new UserError('--free: give at least one key to fit, e.g. --free clip.series');
      const designText = await readDesignText(designPath);
      const dry = await readMono(flags.dry);
      const wet = await readMono(flags.wet);
      if (dry.sampleRate !== wet.sampleRate) throw new UserError(`${flags.wet}: ${wet.sampleRate} Hz, but the dry take is ${dry.sampleRate} Hz; record at the dry take's rate`);
      const length = Math.min(dry.samples.length, wet.samples.length);
      const wetSamples = wet.samples.subarray(0, length);
      const bar = createProgressBar('fitting');
      const report = fitDesign({
        designText,
        designFile: designPath,
        parts: loadPartsLibrary(flags.parts),
        overrides: flags.set ?? [],
        free,
        dry: dry.samples.subarray(0, length),
        wet: wetSamples,
        sampleRate: dry.sampleRate,
        wetName: flags.wet,
        oversample: parseOversample(flags.oversample),
        latencySamples: parseNumber('--latency', flags.latency),
        gainDb: parseNumber('--gain-db', flags.gainDb),
        onProgress: (f) => bar.update(f),
      });
      bar.finish(true);
      if (flags.json) await writeJsonReport(flags.json, report);
      if (flags.output) {
        createOutputFolder(flags.output);
        const fittedName = `${path.basename(designPath, '.json')}--fit`;
        const fittedPath = path.join(flags.output, `${fittedName}.json`);
        assertNotAnInput(fittedPath, inputs);
        const fittedDesign = applyOverrides(parseJsonText(designText, designPath), [...(flags.set ?? []), ...report.overrides, `name=${fittedName}`], designPath);
        await writeFileAtomic(fittedPath, toJsonText(fittedDesign));
        const rendered = await runRenderJob({ designPath: fittedPath, partsPath: flags.parts, overrides: [], inputPath: flags.dry, outputDir: flags.output, oversample: parseOversample(flags.oversample), scale: { fullScaleVolts: 1 }, bits: '24', commandInputs: inputs });
        const pagePath = await writeFitListeningPage({
          outputDir: flags.output,
          designPath,
          designName: path.basename(designPath, '.json'),
          partsPath: flags.parts,
          commonOverrides: flags.set ?? [],
          fittedOverrides: report.overrides,
          dry: await readWavFile(flags.dry),
          alignedRecording: advance(wetSamples, report.latencySamples),
          oversample: parseOversample(flags.oversample),
          commandInputs: inputs,
        });
        process.stdout.write(`Fitted design: ${fittedPath}\nIts render of the dry take: ${rendered.wavPath}\nListening page (recording, initial and fitted model, loudness-matched): ${pagePath}\nCaution: renders can be loud. Start playback at a low volume.\n`);
      }
      process.stdout.write(summary(report));
    });
}
