/**
 * `clipbench check <design.json> [--json] [--input-peak V] [--set key=value] [--parts file]`: the design's electrical
 * facts and warnings before anyone builds it. Exits 0 even with warnings; only a design that cannot
 * be read is an error.
 */
import type { Command } from 'commander';
import { checkDesign, type CheckResult } from '../analysis/designCheck.js';
import { readDesignFile } from '../design/parseDesign.js';
import { loadPartsLibrary } from '../design/parts.js';
import { parseValue } from '../design/values.js';
import { formatRows } from '../report/table.js';
import { collect } from './options.js';

interface CheckFlags {
  json?: boolean;
  inputPeak: string;
  set?: string[];
  parts?: string;
}

/** The terminal form: a table of facts, then one line per warning. */
export function formatCheckReport(designName: string, result: CheckResult): string {
  const facts = result.facts.filter((fact) => fact.code !== 'caution');
  const cautions = result.facts.filter((fact) => fact.code === 'caution');
  const lines = [`Design check: ${designName}`, '', formatRows(['stage', 'fact', 'value'], facts.map((fact) => [fact.stage, fact.label, fact.text])).trimEnd(), ''];
  if (result.warnings.length === 0) lines.push('No warnings.');
  else {
    lines.push(`Warnings (${result.warnings.length}):`);
    for (const warning of result.warnings) lines.push(`  [${warning.code}] ${warning.stage}: ${warning.message}`);
  }
  lines.push('', 'Cautions:', ...cautions.map((caution) => `  - ${caution.text}`));
  return `${lines.join('\n')}\n`;
}

export function registerCheckCommand(program: Command): void {
  program
    .command('check')
    .description('print a design\'s electrical facts and warnings (impedance, corners, gain, headroom, diode currents, E-series)')
    .argument('<design>', 'design file (JSON)')
    .option('--json', 'print JSON: { "facts": [...], "warnings": [{ "code", "stage", "message" }], "operatingPoint": { "<stageId>": { "<node>": volts } } }')
    .option('--input-peak <volts>', 'worst input peak at the jack, volts', '1')
    .option('--set <key=value>', 'override a knob or stage field (as render --set); repeatable', collect)
    .option('--parts <file>', 'extra parts library (JSON) to merge')
    .action(async (designPath: string, flags: CheckFlags) => {
      const inputPeakVolts = parseValue(flags.inputPeak, '--input-peak', 'volt');
      const design = await readDesignFile(designPath, loadPartsLibrary(flags.parts), flags.set ?? []);
      const result = checkDesign(design, { inputPeakVolts });
      if (flags.json) process.stdout.write(`${JSON.stringify({ facts: result.facts, warnings: result.warnings, operatingPoint: result.operatingPoint }, null, 2)}\n`);
      else process.stdout.write(formatCheckReport(design.name, result));
    });
}
