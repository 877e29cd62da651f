/** `clipbench analyze <file.wav> [--fundamental Hz] [--json file] [--html file]` */
import type { Command } from 'commander';
import { analyzeTake } from '../analysis/analyzeTake.js';
import { readWavFile } from '../audio/wavRead.js';
import { formatAnalyzeSummary, writeAnalyzeHtml, writeAnalyzeJson } from '../report/analyzeReport.js';
import { parsePositiveNumber } from './options.js';

interface AnalyzeFlags {
  fundamental?: string;
  json?: string;
  html?: string;
}

export function registerAnalyzeCommand(program: Command): void {
  program
    .command('analyze')
    .description('measure any WAV: peak, true peak, RMS, loudness (LUFS), spectrum, and THD where a steady tone is present')
    .argument('<file>', 'WAV file to analyse')
    .option('--fundamental <Hz>', 'measure the tone at this frequency instead of detecting one')
    .option('--json <file>', 'write the measurements as JSON')
    .option('--html <file>', 'write an HTML report; each plot is also saved as SVG beside it')
    .action(async function (this: Command, file: string, flags: AnalyzeFlags) {
      const fundamentalHz = flags.fundamental === undefined ? undefined : parsePositiveNumber('--fundamental', flags.fundamental, 'Hz');
      const report = analyzeTake(await readWavFile(file), { fundamentalHz });
      const writeOut = this.configureOutput().writeOut ?? ((text: string) => process.stdout.write(text));
      writeOut(formatAnalyzeSummary(report));
      if (flags.json) {
        await writeAnalyzeJson(flags.json, report);
        writeOut(`JSON written to ${flags.json}\n`);
      }
      if (flags.html) {
        const svgPaths = await writeAnalyzeHtml(flags.html, report);
        writeOut(`HTML report written to ${flags.html}${svgPaths.length ? ` (plots: ${svgPaths.join(', ')})` : ''}\n`);
      }
    });
}
