/** `clipbench demo [-o dir]`: synthesise a DI-like take and render it through the bundled designs. */
import path from 'node:path';
import { readdir } from 'node:fs/promises';
import { fileURLToPath } from 'node:url';
import type { Command } from 'commander';
import { synthesizeDemoTake } from '../audio/demoTake.js';
import { writeWavFile } from '../audio/wavWrite.js';
import { createOutputFolder } from '../audio/atomicWrite.js';
import { runRenderJobs } from '../render/workerPool.js';
import type { RenderJob } from '../render/renderJob.js';
import { formatRows, formatValue } from '../report/table.js';
import { parseOversample } from './options.js';
import { createProgressBar } from './progress.js';

const bundledDesigns = fileURLToPath(new URL('../../fixtures/designs/', import.meta.url));

export function registerDemoCommand(program: Command): void {
  program
    .command('demo')
    .description('synthesise a DI-like take and render it through every bundled example design')
    .option('-o, --output <dir>', 'output folder', path.join('renders', 'demo'))
    .option('--oversample <N>', 'oversampling of the nonlinear stages: 1, 2, 4, 8 or 16', '8')
    .action(async (flags: { output: string; oversample: string }) => {
      const oversample = parseOversample(flags.oversample);
      createOutputFolder(flags.output);
      const take = synthesizeDemoTake();
      const takePath = path.join(flags.output, 'demo-take.wav');
      // The dry take is written at 1 V full scale, the render default, so it plays back calibrated.
      await writeWavFile(takePath, [take.volts], take.sampleRate, '24');

      const designFiles = (await readdir(bundledDesigns)).filter((name) => name.endsWith('.json')).sort();
      const jobs: RenderJob[] = designFiles.map((name) => ({
        designPath: path.join(bundledDesigns, name),
        overrides: [],
        inputPath: takePath,
        outputDir: flags.output,
        oversample,
        scale: { fullScaleVolts: 1 },
        bits: '24',
      }));
      const bar = createProgressBar('rendering demo');
      const outcomes = await runRenderJobs(jobs, { onProgress: (f) => bar.update(f) });
      bar.finish(outcomes.every((outcome) => outcome.ok));

      process.stdout.write(`Demo take: ${take.description}\nDry take written to ${takePath}\n\n`);
      const rows = outcomes.map((outcome, index) => {
        if (!outcome.ok) return [designFiles[index], 'failed', outcome.message, '', '', ''];
        const s = outcome.result.summary;
        const conducting = Object.values(s.conducting);
        return [
          s.design,
          path.basename(outcome.result.wavPath),
          s.input.peakVolts.toFixed(3),
          s.output.peakVolts.toFixed(3),
          formatValue(s.output.rmsDbfs, 1),
          conducting.length > 0 ? `${(Math.max(...conducting) * 100).toFixed(1)} %` : '-',
        ];
      });
      process.stdout.write(
        formatRows(['design', 'render', 'in peak V', 'out peak V', 'out RMS dBFS', 'diodes on'], rows),
      );
      process.stdout.write(
        '\nCaution: rendered drive can be loud. Start playback at a low volume and raise it slowly.\n',
      );
      if (outcomes.some((outcome) => !outcome.ok)) process.exitCode = 2;
    });
}
