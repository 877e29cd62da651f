/** `clipbench measure <design.json>`: THD, level sweep, responses, transfer curve, aliasing. */
import type { Command } from 'commander';
import { UserError } from '../errors.js';
import { assertNotAnInput } from '../audio/atomicWrite.js';
import { loadPartsLibrary } from '../design/parts.js';
import { readDesignFile } from '../design/parseDesign.js';
import { resolveDesign } from '../design/resolve.js';
import { DEFAULT_MEASURE_OPTIONS, measureDesign, type MeasureReport } from '../analysis/measureDesign.js';
import { PREDICTION_BASIS } from '../analysis/response.js';
import { formatRows, formatSignificant, formatValue } from '../report/table.js';
import { writeMeasureHtml, writeMeasureJson } from '../report/measureReport.js';
import { collect, parseNoiseSource, parseOversample, parsePositiveNumber } from './options.js';
import { AUDIO_BAND_HIGH_HZ, AUDIO_BAND_LOW_HZ } from '../dsp/audioBand.js';

interface MeasureFlags {
  freq: string;
  level: string;
  set?: string[];
  oversample: string;
  aliasSweep?: boolean;
  source: string;
  json?: string;
  html?: string;
  parts?: string;
}

function formatVolts(volts: number | null): string {
  if (volts === null) return 'not reached';
  return volts < 0.1 ? `${(volts * 1000).toFixed(1)} mV` : `${volts.toFixed(3)} V`;
}

function formatNoiseVolts(volts: number): string {
  return volts < 1e-3 ? `${(volts * 1e6).toFixed(2)} uV` : `${(volts * 1e3).toFixed(2)} mV`;
}

export function summarizeMeasurement(report: MeasureReport): string {
  const lines: string[] = [];
  lines.push(`${report.design}: ${report.freqHz.toFixed(1)} Hz at ${report.levelVolts} V peak in, oversampling ${report.oversample}x`);
  lines.push(
    formatRows(
      ['figure', 'value'],
      [
        ['THD', formatSignificant(report.thdPercent, 4, '%')],
        ['THD+N', formatSignificant(report.thdnPercent, 4, '%')],
        ['even / odd harmonic energy', `${(report.evenShare * 100).toFixed(1)} % / ${(report.oddShare * 100).toFixed(1)} %`],
        ['small-signal gain', formatValue(report.gainDb, 2, 'dB')],
        ['output peak at this level', formatVolts(report.outputPeakVolts)],
        ['maximum output swing', formatVolts(report.maxOutputVolts)],
        ['THD 1 % at input', formatVolts(report.onset['1'])],
        ['THD 3 % at input', formatVolts(report.onset['3'])],
        ['THD 10 % at input', formatVolts(report.onset['10'])],
        ['strongest alias', report.aliasDbc === null ? 'n/a (silent output)' : `${report.aliasDbc.toFixed(1)} dBc at ${report.aliasHz.toFixed(0)} Hz`],
        [`output noise, 20 Hz-20 kHz (input: ${report.noise.source})`, `${formatValue(report.noise.unweightedDbv, 1, 'dBV')} (${formatNoiseVolts(report.noise.unweightedVolts)})`],
        ['output noise, A-weighted', `${formatValue(report.noise.aWeightedDbv, 1, 'dBV')} (${formatNoiseVolts(report.noise.aWeightedVolts)})`],
        ['signal to noise (A-weighted)', formatValue(report.noise.snrDb, 1, 'dB')],
        ['largest noise sources', report.noise.contributors.slice(0, 3).map((c) => `${c.part} ${(c.share * 100).toFixed(0)} %`).join(', ') || 'n/a'],
      ],
    ),
  );
  lines.push('Harmonics');
  lines.push(
    formatRows(
      ['order', 'Hz', 'dBc', 'volts'],
      report.harmonics.slice(0, 10).map((h) => [String(h.order), h.hz.toFixed(1), formatValue(h.dbc, 1), h.volts.toExponential(3)]),
    ),
  );
  if (report.aliasByOversample.length > 1) {
    lines.push('Aliasing by oversampling factor');
    lines.push(
      formatRows(
        ['factor', 'alias dBc', 'at Hz'],
        report.aliasByOversample.map((a) => [String(a.oversample), formatValue(a.aliasDbc, 1), a.aliasHz.toFixed(0)]),
      ),
    );
  }
  if (report.responseDisagreement.length > 0) {
    const where = report.responseDisagreement.map((d) => `${d.hz.toFixed(0)} Hz`).join(', ');
    lines.push(`Predicted and measured response differ by more than 0.1 dB at: ${where} (the chain is not linear there at the test level)`);
  } else {
    lines.push(`Predicted and measured small-signal response agree within 0.1 dB from 20 Hz to 20 kHz (${PREDICTION_BASIS}).`);
  }
  return `${lines.join('\n')}\n`;
}

export function registerMeasureCommand(program: Command): void {
  program
    .command('measure')
    .description('measure a design with test signals: THD, onset, responses, transfer curve, aliasing')
    .argument('<design>', 'design file (JSON)')
    .option('--freq <Hz>', 'test tone frequency', String(DEFAULT_MEASURE_OPTIONS.freqHz))
    .option('--level <V>', 'test tone level, volts peak at the input', String(DEFAULT_MEASURE_OPTIONS.levelVolts))
    .option('--set <key=value>', 'override a knob or stage field; repeatable', collect)
    .option('--oversample <N>', 'oversampling of the nonlinear stages: 1, 2, 4, 8 or 16', String(DEFAULT_MEASURE_OPTIONS.oversample))
    .option('--alias-sweep', 'measure aliasing at every oversampling factor 1..16')
    .option('--source <impedance>', 'what terminates the input for the noise figures: pickup (10k + 3 H), 0 (short), a resistance (47k) or resistance+inductance (8k2+2.5H)', 'pickup')
    .option('--json <file>', 'write the measurements as JSON')
    .option('--html <file>', 'write a self-contained HTML report (plots also saved as SVG beside it)')
    .option('--parts <file>', 'extra parts library (JSON)')
    .action(async (designPath: string, flags: MeasureFlags) => {
      const inputs = [designPath, ...(flags.parts ? [flags.parts] : [])];
      for (const output of [flags.json, flags.html]) if (output) assertNotAnInput(output, inputs);
      const parts = loadPartsLibrary(flags.parts);
      const design = resolveDesign(await readDesignFile(designPath, parts, flags.set ?? []));
      const freqHz = parsePositiveNumber('--freq', flags.freq, 'Hz');
      if (freqHz < AUDIO_BAND_LOW_HZ || freqHz > AUDIO_BAND_HIGH_HZ) throw new UserError(`--freq: ${freqHz} Hz is outside the audio band (expected ${AUDIO_BAND_LOW_HZ} to ${AUDIO_BAND_HIGH_HZ} Hz)`);
      const report = measureDesign(design, {
        ...DEFAULT_MEASURE_OPTIONS,
        freqHz,
        levelVolts: parsePositiveNumber('--level', flags.level, 'V'),
        oversample: parseOversample(flags.oversample),
        aliasSweep: flags.aliasSweep === true,
        noiseSource: parseNoiseSource(flags.source),
      });
      if (flags.json) await writeMeasureJson(flags.json, report);
      if (flags.html) await writeMeasureHtml(flags.html, report);
      process.stdout.write(summarizeMeasurement(report));
    });
}
