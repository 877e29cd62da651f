/** `clipbench render <design.json> <input.wav...> -o <dir>` */
import { createOutputFolder, noteOutputFolder } from '../audio/atomicWrite.js';
import type { Command } from 'commander';
import { runRenderJobs } from '../render/workerPool.js';
import { uniqueTakeNames, type RenderJob } from '../render/renderJob.js';
import { formatRows, formatValue } from '../report/table.js';
import { addRenderOptions, parseBits, parseCalibration, parseOversample, parseSeed, parseThreads, type RenderFlagValues } from './options.js';
import { createProgressBar } from './progress.js';

interface RenderFlags extends RenderFlagValues {
  output: string;
  noise?: boolean;
  noiseSeed: string;
}

export function registerRenderCommand(program: Command): void {
  const command = program
    .command('render')
    .description('render dry DI takes through a design; writes one WAV and one JSON sidecar per take')
    .argument('<design>', 'design file (JSON)')
    .argument('<inputs...>', 'dry DI takes (WAV)')
    .requiredOption('-o, --output <dir>', 'output folder (created if missing)')
    .option('--noise', "add the circuit's modelled output noise (as measure computes it, input driven by the take), seeded")
    .option('--noise-seed <n>', 'seed of the added noise (a whole number; same seed, same bits)', '1');
  addRenderOptions(command, 'override a knob (drive=0.8) or a stage field (clip.diode=1n34a); repeatable')
    .action(async (designPath: string, inputs: string[], flags: RenderFlags) => {
      const scale = parseCalibration(flags.fullScale, flags.inputPeak);
      const takeNames = uniqueTakeNames(inputs);
      const jobs: RenderJob[] = inputs.map((inputPath, index) => ({
        designPath,
        partsPath: flags.parts,
        overrides: flags.set ?? [],
        inputPath,
        takeName: takeNames[index],
        commandInputs: inputs,
        outputDir: flags.output,
        oversample: parseOversample(flags.oversample),
        scale,
        bits: parseBits(flags.bits),
        dither: flags.dither,
        ...(flags.noise ? { noiseSeed: parseSeed('--noise-seed', flags.noiseSeed) } : {}),
      }));
      createOutputFolder(flags.output);
      noteOutputFolder(flags.output);
      const bar = createProgressBar('rendering');
      const threads = parseThreads(flags.threads);
      const outcomes = await runRenderJobs(jobs, { threads, onProgress: (f) => bar.update(f) });
      bar.finish(outcomes.every((outcome) => outcome.ok));

      const rows: string[][] = [];
      const problems: string[] = [];
      outcomes.forEach((outcome, index) => {
        if (!outcome.ok) {
          // User errors already name their file; others get the take's name in front.
          problems.push(outcome.userError ? outcome.message : `${inputs[index]}: ${outcome.message}`);
          return;
        }
        const s = outcome.result.summary;
        const conducting = Object.values(s.conducting);
        rows.push([
          outcome.result.wavPath,
          s.input.peakVolts.toFixed(3),
          s.output.peakVolts.toFixed(3),
          formatValue(s.output.peakDbfs, 1),
          formatValue(s.output.crestDb, 1),
          conducting.length > 0 ? `${(Math.max(...conducting) * 100).toFixed(1)} %` : '-',
          String(s.overs.count),
        ]);
        for (const warning of s.warnings) problems.push(`warning: ${outcome.result.wavPath}: ${warning}`);
      });
      if (rows.length > 0) {
        process.stdout.write(
          formatRows(['output', 'in peak V', 'out peak V', 'out peak dBFS', 'crest dB', 'diodes on', 'overs'], rows),
        );
        // The hearing caution where it applies: a render louder (RMS) than its take.
        const hotter = outcomes.some((o) => o.ok && o.result.summary.output.rmsDbfs !== null && (o.result.summary.input.rmsDbfs === null || o.result.summary.output.rmsDbfs > o.result.summary.input.rmsDbfs));
        if (hotter) process.stdout.write('Caution: a render is louder than its take. Start playback at a low volume.\n');
      }
      for (const line of problems) process.stderr.write(`clipbench: ${line}\n`);
      if (outcomes.some((outcome) => !outcome.ok)) process.exitCode = 2;
    });
}
