/**
 * `clipbench spread <design.json> [--runs 200] [--seed 1] [--json file] [--html file]`: how much the
 * parts' tolerances move the design's figures, and which parts move them most.
 */
import type { Command } from 'commander';
import { assertNotAnInput } from '../audio/atomicWrite.js';
import { mostSpreadFigure, percentileBuilds, runSpread, SPREAD_FIGURES, type SpreadReport } from '../analysis/spread.js';
import { runCompare } from '../compare/runCompare.js';
import type { Variant } from '../compare/variants.js';
import { suggestionText } from '../design/suggest.js';
import type { OversampleFactor } from '../dsp/oversampler.js';
import { printCompareSummary } from './compare.js';
import { DEFAULT_LOUDNESS_MATCH } from '../render/loudnessMatch.js';
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
  take?: string;
  output?: string;
  by?: string;
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
    .option('--take <wav>', 'with -o: render the nominal build and the builds at the 5th and 95th percentile of a figure, loudness-matched, with a listening page')
    .option('-o, --output <dir>', 'output folder of the --take renders and their listening page')
    .option('--by <figure>', 'the figure whose percentiles pick the extreme builds (default: the one that spreads most)')
    .action(async (designPath: string, flags: SpreadFlags) => {
      if ((flags.take === undefined) !== (flags.output === undefined)) throw new UserError('--take and -o go together: the take to render and the folder for its renders and listening page');
      const inputs = [designPath, ...(flags.parts ? [flags.parts] : []), ...(flags.take ? [flags.take] : [])];
      for (const output of [flags.json, flags.html]) if (output) assertNotAnInput(output, inputs);
      if (flags.by !== undefined && !SPREAD_FIGURES.includes(flags.by) && !flags.by.startsWith('operatingPoint.')) {
        throw new UserError(`--by: "${flags.by}" is not a figure ${suggestionText(flags.by, SPREAD_FIGURES)}`);
      }
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
      if (flags.take !== undefined && flags.output !== undefined) await listenToExtremes(designPath, flags, report, oversample);
    });
}

/** "Would I hear my tolerances?": nominal and the two extreme builds of one figure, rendered and compared blind. */
async function listenToExtremes(designPath: string, flags: SpreadFlags, report: SpreadReport, oversample: OversampleFactor): Promise<void> {
  const figure = flags.by ?? mostSpreadFigure(report);
  if (figure === null || !(figure in report.figures)) {
    throw new UserError(`--by: "${flags.by}" is not a figure of this spread ${suggestionText(flags.by ?? '', Object.keys(report.figures))}`);
  }
  const extremes = percentileBuilds(report, figure);
  if (extremes === null) throw new UserError(`--by: figure "${figure}" has no value in any build (e.g. an onset never reached)`);
  const format = (value: number | null | undefined): string => (value === null || value === undefined ? 'n/a' : Number(value.toPrecision(4)).toString());
  const variants: Variant[] = [
    { label: 'nominal', overrides: [] },
    { label: `5th percentile of ${figure} (${format(extremes.low.figures[figure])})`, overrides: extremes.low.overrides },
    { label: `95th percentile of ${figure} (${format(extremes.high.figures[figure])})`, overrides: extremes.high.overrides },
  ];
  const bar = createProgressBar('rendering the extremes');
  const { summary, pagePath } = await runCompare({
    designPath,
    partsPath: flags.parts,
    inputPaths: [flags.take as string],
    outputDir: flags.output as string,
    variants,
    commonOverrides: flags.set ?? [],
    match: DEFAULT_LOUDNESS_MATCH,
    oversample,
    scale: { fullScaleVolts: 1 },
    bits: '24',
    dither: true,
    onProgress: (_phase, fraction) => bar.update(fraction),
  });
  bar.finish(true);
  printCompareSummary(summary, pagePath);
}
