/** `clipbench compare <design.json> <input.wav...> --vary key=v1,v2 ... -o <dir>` */
import type { Command } from 'commander';
import { UserError } from '../errors.js';
import { runCompare } from '../compare/runCompare.js';
import { DEFAULT_LOUDNESS_MATCH } from '../render/loudnessMatch.js';
import { expandVaryMatrix, readVariantsFile, type Variant } from '../compare/variants.js';
import type { CompareSummary } from '../compare/summary.js';
import { formatTable, formatValue } from '../report/table.js';
import { addRenderOptions, collect, parseBits, parseCalibration, parseOversample, parseThreads, type RenderFlagValues } from './options.js';
import { createProgressBar, type ProgressBar } from './progress.js';

interface CompareFlags extends RenderFlagValues {
  output: string;
  vary?: string[];
  variants?: string;
  loudness: string;
  match: boolean;
}

/** Sample-peak ceiling after loudness matching, dBFS. */
const CEILING_DBFS = DEFAULT_LOUDNESS_MATCH.ceilingDbfs;
const LOUDNESS_MIN_LUFS = -60;
const LOUDNESS_MAX_LUFS = 0;

function parseLoudness(text: string): number {
  const value = Number(text.trim().replace(/\s*LUFS$/i, ''));
  if (text.trim() === '' || !Number.isFinite(value) || value < LOUDNESS_MIN_LUFS || value > LOUDNESS_MAX_LUFS) {
    throw new UserError(`--loudness: "${text}" is not a loudness from ${LOUDNESS_MIN_LUFS} to ${LOUDNESS_MAX_LUFS} LUFS (e.g. -18)`);
  }
  return value;
}

async function chooseVariants(flags: CompareFlags): Promise<Variant[]> {
  const vary = flags.vary ?? [];
  if (flags.variants !== undefined && vary.length > 0) throw new UserError('--vary and --variants cannot be used together (put every variant in the file)');
  if (flags.variants !== undefined) return readVariantsFile(flags.variants);
  if (vary.length === 0) throw new UserError('compare: give --vary key=v1,v2,... (e.g. --vary clip.diode=1n4148,1n34a) or --variants file.json');
  return expandVaryMatrix(vary);
}

export function printCompareSummary(summary: CompareSummary, pagePath: string): void {
  const rows = summary.takes.flatMap((take) =>
    take.entries.map((entry) => [
      take.name,
      entry.kind === 'dry' ? 'dry' : `${entry.variant}. ${entry.label}`,
      formatValue(entry.loudnessBeforeLufs, 1),
      entry.file === null ? 'failed' : formatValue(entry.gainDb, 1),
      formatValue(entry.loudnessLufs, 1),
      formatValue(entry.peakDbfs, 1),
      formatValue(entry.crestDb, 1),
      formatValue(entry.thdPercent, 2),
      formatValue(entry.thdAtTakePeakPercent, 2),
      formatValue(entry.centroidHz, 0),
      entry.ceilingLimited ? 'held' : entry.levelledToQuietest ? 'down to quietest' : '',
    ]),
  );
  process.stdout.write(
    formatTable({
      columns: [
        { title: 'take' },
        { title: 'player' },
        { title: 'LUFS before', align: 'right' },
        { title: 'gain dB', align: 'right' },
        { title: 'LUFS after', align: 'right' },
        { title: 'peak dBFS', align: 'right' },
        { title: 'crest dB', align: 'right' },
        { title: 'THD % 0.5 V', align: 'right' },
        { title: 'THD % take peak', align: 'right' },
        { title: 'centroid Hz', align: 'right' },
        { title: 'ceiling', align: 'left' },
      ],
      rows,
    }),
  );
  process.stdout.write(`Listening page: ${pagePath}\nCaution: rendered drive can be loud. Start playback at a low volume.\n`);
}

export function registerCompareCommand(program: Command): void {
  const command = program
    .command('compare')
    .description('render variants of a design for each take, loudness-matched, with a listening page (index.html) and summary.json')
    .argument('<design>', 'design file (JSON)')
    .argument('<inputs...>', 'dry DI takes (WAV)')
    .requiredOption('-o, --output <dir>', 'output folder (created if missing)')
    .option('--vary <key=v1,v2,...>', 'values to compare for a knob or stage field (same keys as render --set); several make the full matrix', collect)
    .option('--variants <file>', 'named variants instead: {"variants": [{"label": "...", "set": {"clip.diode": "1n34a"}}]}')
    .option('--loudness <LUFS>', 'loudness every player is matched to (BS.1770-4 integrated)', String(DEFAULT_LOUDNESS_MATCH.targetLufs))
    .option('--no-match', "keep each render's own level instead of matching loudness");
  addRenderOptions(command, 'override for every variant (like render --set); repeatable')
    .action(async (designPath: string, inputs: string[], flags: CompareFlags) => {
      const variants = await chooseVariants(flags);
      const match = flags.match ? { targetLufs: parseLoudness(flags.loudness), ceilingDbfs: CEILING_DBFS } : null;
      const bars: Partial<Record<'rendering' | 'measuring', ProgressBar>> = {};
      let shown: ProgressBar | undefined;
      const { summary, pagePath } = await runCompare({
        designPath,
        partsPath: flags.parts,
        variantsPath: flags.variants,
        inputPaths: inputs,
        outputDir: flags.output,
        variants,
        commonOverrides: flags.set ?? [],
        match,
        oversample: parseOversample(flags.oversample),
        scale: parseCalibration(flags.fullScale, flags.inputPeak),
        bits: parseBits(flags.bits),
        dither: flags.dither,
        threads: parseThreads(flags.threads),
        onProgress: (phase, fraction) => {
          const bar = (bars[phase] ??= createProgressBar(phase));
          if (shown !== bar) shown?.finish(true);
          shown = bar;
          bar.update(fraction);
        },
      });
      shown?.finish(true);
      printCompareSummary(summary, pagePath);
      for (const line of summary.ceilingLimited) process.stderr.write(`clipbench: ceiling: ${line}\n`);
      for (const line of summary.failures) process.stderr.write(`clipbench: failed: ${line}\n`);
      const rendered = summary.takes.some((take) => take.entries.some((entry) => entry.kind === 'variant' && entry.file !== null));
      if (!rendered) {
        process.stderr.write('clipbench: every variant failed; nothing to compare\n');
        process.exitCode = 2;
      }
    });
}
