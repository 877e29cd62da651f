/** `clipbench parts [--kind diode|opamp|bjt|jfet] [--json]`: the parts library with parameters and sources. */
import type { Command } from 'commander';
import { UserError } from '../errors.js';
import { loadPartsLibrary } from '../design/parts.js';
import { formatValue } from '../design/values.js';
import { formatRows } from '../report/table.js';

const KINDS = ['diode', 'opamp', 'bjt', 'jfet'] as const;

function formatEngineering(value: number, unit: string): string {
  return Number.isFinite(value) ? formatValue(value, unit) : 'unlimited';
}

export function registerPartsCommand(program: Command): void {
  program
    .command('parts')
    .description('list the parts library (diodes, op-amps, transistors, JFETs) with parameters and sources')
    .option('--kind <kind>', 'only diode, opamp, bjt or jfet')
    .option('--json', 'print JSON')
    .option('--parts <file>', 'extra parts library (JSON) to merge')
    .action((flags: { kind?: string; json?: boolean; parts?: string }) => {
      if (flags.kind !== undefined && !(KINDS as readonly string[]).includes(flags.kind)) {
        throw new UserError(`--kind: "${flags.kind}" is not one of ${KINDS.join(', ')}`);
      }
      const library = loadPartsLibrary(flags.parts);
      const wanted = (kind: (typeof KINDS)[number]): boolean => flags.kind === undefined || flags.kind === kind;
      const diodes = wanted('diode') ? [...library.diodes.values()] : [];
      const opamps = wanted('opamp') ? [...library.opamps.values()] : [];
      const bjts = wanted('bjt') ? [...library.bjts.values()] : [];
      const jfets = wanted('jfet') ? [...library.jfets.values()] : [];
      if (flags.json) {
        const finite = (value: number): number | null => (Number.isFinite(value) ? value : null);
        const json = {
          diodes,
          opamps: opamps.map((o) => ({ ...o, gbwHz: finite(o.gbwHz), slewRateVoltsPerSecond: finite(o.slewRateVoltsPerSecond), openLoopGain: finite(o.openLoopGain) })),
          bjts,
          jfets,
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
      const range = (r: { min: number; max: number } | undefined, unit: string): string => (r === undefined ? '-' : `${formatEngineering(r.min, unit)} to ${formatEngineering(r.max, unit)}`);
      if (bjts.length > 0) {
        process.stdout.write(`${diodes.length + opamps.length > 0 ? '\n' : ''}Bipolar transistors (Ebers-Moll)\n`);
        process.stdout.write(
          formatRows(
            ['name', 'type', 'Is', 'beta F', 'beta R', 'beta F range', 'source'],
            bjts.map((b) => [b.name, b.polarity, `${b.saturationCurrent.toExponential(3)} A`, String(b.betaForward), String(b.betaReverse), range(b.ranges.betaForward, ''), b.source]),
          ),
        );
      }
      if (jfets.length > 0) {
        process.stdout.write(`${diodes.length + opamps.length + bjts.length > 0 ? '\n' : ''}JFETs (square law)\n`);
        process.stdout.write(
          formatRows(
            ['name', 'channel', 'Idss', 'VGS(off)', 'lambda', 'Idss range', 'VGS(off) range', 'source'],
            jfets.map((j) => [j.name, j.polarity, formatEngineering(j.idss, 'A'), `${j.pinchOff} V`, `${j.lambda} /V`, range(j.ranges.idss, 'A'), j.ranges.pinchOff ? `${j.ranges.pinchOff.min} to ${j.ranges.pinchOff.max} V` : '-', j.source]),
          ),
        );
      }
    });
}
