/** Parsers for command-line option values; each failure names the flag, the value and what is expected. */
import type { Command } from 'commander';
import { UserError } from '../errors.js';
import { defaultThreadCount } from '../render/workerPool.js';
import { OVERSAMPLE_FACTORS, type OversampleFactor } from '../dsp/oversampler.js';
import type { CalibrationScale } from '../audio/calibration.js';
import type { WavOutputBits } from '../audio/wavWrite.js';
import { PICKUP_SOURCE, PICKUP_SOURCE_LABEL } from '../analysis/designNoise.js';
import { parseValue } from '../design/values.js';
import type { SourceImpedance } from '../solver/noise.js';

/** Commander reducer for repeatable options such as `--set a=1 --set b=2`. */
export function collect(value: string, previous: string[] = []): string[] {
  return [...previous, value];
}

export function parseOversample(text: string): OversampleFactor {
  const factor = Number(text);
  const match = OVERSAMPLE_FACTORS.find((allowed) => allowed === factor);
  if (match === undefined) throw new UserError(`--oversample: "${text}" is not one of ${OVERSAMPLE_FACTORS.join(', ')}`);
  return match;
}

export function parseBits(text: string): WavOutputBits {
  if (text === '16' || text === '24' || text === '32f') return text;
  throw new UserError(`--bits: "${text}" is not one of 16, 24, 32f`);
}

export function parsePositiveNumber(flag: string, text: string, unit: string): number {
  const trimmed = text.trim().replace(new RegExp(`${unit}$`, 'i'), '');
  const value = Number(trimmed);
  if (trimmed === '' || !Number.isFinite(value) || value <= 0) {
    throw new UserError(`${flag}: "${text}" is not a positive number (expected ${unit === 'V' ? 'volts' : unit}, e.g. 1 or 0.5)`);
  }
  return value;
}

/**
 * Calibration voltages outside this range make no sense for an instrument signal and push the
 * arithmetic towards underflow (silence) or overflow (NaN): 1 uV to 1 kV peak.
 */
const CALIBRATION_MIN_VOLTS = 1e-6;
const CALIBRATION_MAX_VOLTS = 1e3;

function parseCalibrationVolts(flag: string, text: string): number {
  const volts = parsePositiveNumber(flag, text, 'V');
  if (volts < CALIBRATION_MIN_VOLTS || volts > CALIBRATION_MAX_VOLTS) {
    throw new UserError(`${flag}: ${text} V is outside ${CALIBRATION_MIN_VOLTS} to ${CALIBRATION_MAX_VOLTS} volts peak`);
  }
  return volts;
}

export function parseCalibration(fullScale: string | undefined, inputPeak: string | undefined): CalibrationScale {
  if (fullScale !== undefined && inputPeak !== undefined) {
    throw new UserError('--full-scale and --input-peak cannot be used together (choose one calibration)');
  }
  if (inputPeak !== undefined) return { inputPeakVolts: parseCalibrationVolts('--input-peak', inputPeak) };
  return { fullScaleVolts: fullScale === undefined ? 1 : parseCalibrationVolts('--full-scale', fullScale) };
}

export function parseThreads(text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const threads = Number(text);
  if (!Number.isInteger(threads) || threads < 1) throw new UserError(`--threads: "${text}" is not a whole number of at least 1`);
  const cores = defaultThreadCount();
  if (threads > cores) {
    process.stderr.write(`clipbench: warning: --threads ${threads} is more than this machine's ${cores} cores; the threads will share them (no faster, more memory)\n`);
  }
  return threads;
}

/** The flags `render` and `compare` share, as commander hands them over. */
export interface RenderFlagValues {
  set?: string[];
  oversample: string;
  fullScale?: string;
  inputPeak?: string;
  bits: string;
  /** false with --no-dither. */
  dither: boolean;
  parts?: string;
  threads?: string;
}

/** Adds the options shared by every command that renders takes. */
export function addRenderOptions(command: Command, setHelp: string): Command {
  return command
    .option('--set <key=value>', setHelp, collect)
    .option('--oversample <N>', 'oversampling of the nonlinear stages: 1, 2, 4, 8 or 16', '8')
    .option('--full-scale <V>', 'volts peak at 0 dBFS, in and out (default 1)')
    .option('--input-peak <V>', 'instead: scale each take so its peak is V volts')
    .option('--bits <bits>', 'output WAV: 16, 24 or 32f (float)', '24')
    .option('--no-dither', '16-bit output rounded plainly, without TPDF dither')
    .option('--parts <file>', 'extra parts library (JSON)')
    .option('--threads <N>', 'render threads, this one and N - 1 workers (default: one per core)');
}

/**
 * `--source`: what terminates the input while noise is measured: `pickup` (the default, 10k + 3 H),
 * `0` (a short), a resistance (`47k`), or a resistance plus an inductance (`8k2+2.5H`).
 */
export function parseNoiseSource(text: string): { impedance: SourceImpedance | null; label: string } {
  const trimmed = text.trim();
  if (trimmed === 'pickup') return { impedance: PICKUP_SOURCE, label: PICKUP_SOURCE_LABEL };
  const [ohmsText, henriesText, extra] = trimmed.split('+');
  if (extra !== undefined || ohmsText === undefined) throw new UserError(`--source: "${text}" is not a source (expected pickup, 0, a resistance such as 47k, or resistance+inductance such as 10k+3H)`);
  const ohms = parseValue(ohmsText.trim(), '--source', 'ohm', { allowZero: true });
  const henries = henriesText === undefined ? 0 : parseValue(henriesText.trim(), '--source', 'henry', { allowZero: true });
  if (ohms === 0 && henries === 0) return { impedance: null, label: 'input shorted (0 ohm)' };
  return { impedance: { ohms, henries }, label: henries > 0 ? `${ohmsText.trim()} + ${henriesText?.trim()}` : `${ohmsText.trim()} ohm` };
}

/** A seed: a whole number from 0 to 2^32 - 1. */
export function parseSeed(flag: string, text: string): number {
  const seed = Number(text);
  if (text.trim() === '' || !Number.isInteger(seed) || seed < 0 || seed > 0xffffffff) throw new UserError(`${flag}: "${text}" is not a seed (expected a whole number from 0 to 4294967295)`);
  return seed;
}
