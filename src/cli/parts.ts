/** `clipbench parts [--kind diode|opamp] [--json]`: the parts library with parameters and sources. */
import type { Command } from 'commander';
import { UserError } from '../errors.js';
import { loadPartsLibrary } from '../design/parts.js';
import { formatValue } from '../design/values.js';
import { formatRows } from '../report/table.js';

function formatEngineering(value: number, unit: string): string {
  return Number.isFinite(value) ? formatValue(value, unit) : 'unlimited';
}

export function registerPartsCommand(program: Command): void {
  program
    .command('parts')
    .description('list the parts library (diodes and op-amps) with parameters and sources')
    .option('--kind <kind>', 'only diode or opamp')
    .option('--json', 'print JSON')
    .option('--parts <file>', 'extra parts library (JSON) to merge')
    .action((flags: { kind?: string; json?: boolean; parts?: string }) => {
      if (flags.kind !== undefined && flags.kind !== 'diode' && flags.kind !== 'opamp') {
        throw new UserError(`--kind: "${flags.kind}" is not one of diode, opamp`);
      }
      const library = loadPartsLibrary(flags.parts);
      const diodes = flags.kind === 'opamp' ? [] : [...library.diodes.values()];
      const opamps = flags.kind === 'diode' ? [] : [...library.opamps.values()];
      if (flags.json) {
        const finite = (value: number): number | null => (Number.isFinite(value) ? value : null);
        const json = {
          diodes,
          opamps: opamps.map((o) => ({ ...o, gbwHz: finite(o.gbwHz), slewRateVoltsPerSecond: finite(o.slewRateVoltsPerSecond) })),
        };
        process.stdout.write(`${JSON.stringify(json, null, 2)}\n`);
        return;
      }
      if (diodes.length > 0) {
        process.stdout.write('Diodes (Shockley model with series resistance)\n');
        process.stdout.write(
          formatRows(
            ['name', 'Is', 'n', 'Rs', 'rated', 'source'],
            diodes.map((d) => [d.name, formatEngineering(d.saturationCurrent, 'A'), d.ideality.toFixed(3), formatEngineering(d.seriesResistance, 'ohm'), formatEngineering(d.ratedCurrent, 'A'), d.source]),
          ),
        );
      }
      if (opamps.length > 0) {
        process.stdout.write(`${diodes.length > 0 ? '\n' : ''}Op-amps\n`);
        process.stdout.write(
          formatRows(
            ['name', 'GBW', 'slew', 'headroom -/+', 'supply', 'source'],
            opamps.map((o) => [
              o.name,
              formatEngineering(o.gbwHz, 'Hz'),
              Number.isFinite(o.slewRateVoltsPerSecond) ? `${(o.slewRateVoltsPerSecond / 1e6).toPrecision(3)} V/us` : 'unlimited',
              `${o.headroomLowVolts} / ${o.headroomHighVolts} V`,
              Number.isFinite(o.supplyMaxVolts) ? `${o.supplyMinVolts}-${o.supplyMaxVolts} V` : 'any',
              o.source,
            ]),
          ),
        );
      }
    });
}
