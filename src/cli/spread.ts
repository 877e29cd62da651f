/**
 * `clipbench spread <design.json> [--runs 200] [--seed 1] [--json file] [--html file]`: how much the
 * parts' tolerances move the design's figures, and which parts move them most.
 */
import type { Command } from 'commander';
import { assertNotAnInput } from '../audio/atomicWrite.js';
import { runSpread } from '../analysis/spread.js';
import { readDesignFile } from '../design/parseDesign.js';
import { loadPartsLibrary } from '../design/parts.js';
import { UserError } from '../errors.js';
import { formatSpreadSummary, writeSpreadHtml, writeSpreadJson } from '../report/spreadReport.js';
import { collect, parseOversample, parseSeed } from './options.js';
import { createProgressBar } from './progress.js';

interface SpreadFlags {
  runs: string;
  seed: string;
  oversample: string;
  set?: string[];
  parts?: string;
  json?: string;
  html?: string;
}

/** More builds than this would run for hours on a circuit design; the statistics settle long before. */
const MAX_RUNS = 10000;

function parseRuns(text: string): number {
  const runs = Number(text);
  if (!Number.isInteger(runs) || runs < 3 || runs > MAX_RUNS) throw new UserError(`--runs: "${text}" is not a number of builds (expected a whole number from 3 to ${MAX_RUNS})`);
  return runs;
}

export function registerSpreadCommand(program: Command): void {
  program
    .command('spread')
    .description("draw builds of a design within its parts' tolerances: the spread of its figures and the parts that move them")
    .argument('<design>', 'design file (JSON)')
    .option('--runs <N>', 'builds to draw', '200')
    .option('--seed <n>', 'seed of the draws (same seed, same report)', '1')
    .option('--oversample <N>', 'oversampling of the nonlinear stages: 1, 2, 4, 8 or 16', '8')
    .option('--set <key=value>', 'override a knob or stage field (as render --set); repeatable', collect)
    .option('--parts <file>', 'extra parts library (JSON)')
    .option('--json <file>', 'write the figures, their statistics and every build as JSON')
    .option('--html <file>', 'write a self-contained HTML report with histograms and the response band')
    .action(async (designPath: string, flags: SpreadFlags) => {
      const inputs = [designPath, ...(flags.parts ? [flags.parts] : [])];
      for (const output of [flags.json, flags.html]) if (output) assertNotAnInput(output, inputs);
      const runs = parseRuns(flags.runs);
      const seed = parseSeed('--seed', flags.seed);
      const oversample = parseOversample(flags.oversample);
      const design = await readDesignFile(designPath, loadPartsLibrary(flags.parts), flags.set ?? []);
      const bar = createProgressBar('drawing builds');
      const report = runSpread(design, { runs, seed, oversample, onProgress: (f) => bar.update(f) });
      bar.finish(true);
      if (flags.json) await writeSpreadJson(flags.json, report);
      if (flags.html) await writeSpreadHtml(flags.html, report);
      process.stdout.write(formatSpreadSummary(report));
    });
}
