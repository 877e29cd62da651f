/**
 * `npm run bench`: render speed and clipper fidelity.
 *
 * Renders a 60 s DI-like take (mono, 48 kHz) through the full example chain (fixtures/designs/
 * night-drive.json: input, TL072 gain stage with drive pot, RC diode clipper with a 1N4148 pair,
 * tone, volume) at every oversampling factor and prints x real time, ns per oversampled sample and
 * peak RSS. For the clipper it compares the fast solver against the plain per-sample Newton-Raphson
 * reference (same rate, tight tolerance): waveform error in dB and the largest harmonic level
 * difference on a 1 kHz tone, plus the speed ratio between the two.
 *
 * Memory: a separate process renders a long take (default 10 minutes, `--memory-minutes M`, 0 to
 * skip) through the same design as `render` does, and reports its peak RSS against the decoded audio.
 *
 * Timing: after a JIT warm-up, `--runs` rounds (default 7) each render the take once at every factor,
 * so each factor's runs are spread over the whole timing phase; the fastest run is reported (noise
 * only ever adds time: other processes, a virtual machine's host) and the median beside it.
 *
 * Circuit designs: the two-op-amp drive and the two-transistor fuzz (`circuit` stages), each at 8x on
 * a take of `--circuit-seconds` (default 10, 0 to skip): x real time, ns per oversampled sample, and
 * the largest disagreement of the rendered response with the analog circuit's (circuitBench.ts).
 *
 * Parallel: `clipbench render` of 8 takes of 30 s (`--parallel-seconds S`, 0 to skip) in a fresh
 * process with `--threads 1` and with one thread per core (the pool `compare` also uses).
 *
 * Options: see USAGE below (`npm run bench -- --help`); a bad option is one line on stderr, exit 2.
 */
import { spawnSync } from 'node:child_process';
import { parseArgs } from 'node:util';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { synthesizeDemoTake } from '../audio/demoTake.js';
import { writeFileAtomic } from '../audio/atomicWrite.js';
import { writeWavFile } from '../audio/wavWrite.js';
import { loadPartsLibrary } from '../design/parts.js';
import { readDesignFile } from '../design/parseDesign.js';
import { resolveDesign } from '../design/resolve.js';
import type { ClipperStage, Design } from '../design/types.js';
import { buildChain } from '../circuit/chain.js';
import { OVERSAMPLE_FACTORS, type OversampleFactor } from '../dsp/oversampler.js';
import { renderChannel } from '../circuit/renderChannel.js';
import { createClipper, designClipper } from '../circuit/clipper.js';
import type { DiodeSolverKind } from '../circuit/diodeNode.js';
import { coherentBin, createToneAnalyzer } from '../analysis/coherentTone.js';
import { formatRows } from '../report/table.js';
import { measureParallelRenders, type ParallelResult } from './parallelRenders.js';
import { benchCircuitDesign, CIRCUIT_BENCH_DESIGNS, type CircuitBenchResult } from './circuitBench.js';

const BASE_RATE = 48000;
const DESIGN_PATH = fileURLToPath(new URL('../../fixtures/designs/night-drive.json', import.meta.url));
/** Targets from the speed issue: full chain at 8x, clipper fidelity at 8x. */
const TARGET_REAL_TIME_AT_8X = 100;
const TARGET_WAVEFORM_ERROR_DB = -60;
const TARGET_HARMONIC_DELTA_DB = 0.05;

export interface FactorResult {
  oversample: OversampleFactor;
  /** From the fastest run. */
  realTime: number;
  realTimeMedian: number;
  nsPerOversampledSample: number;
  peakRssMiB: number;
  clipperWaveformErrorDb: number;
  clipperHarmonicDeltaDb: number;
  clipperSpeedupVsNewton: number;
}

const WARM_UP_SECONDS = 1;
const DEFAULT_RUNS = 7;
const DEFAULT_PARALLEL_SECONDS = 30;
const DEFAULT_CIRCUIT_SECONDS = 10;

interface BenchArgs {
  seconds: number;
  json?: string;
  factors: OversampleFactor[];
  memoryMinutes: number;
  parallelSeconds: number;
  circuitSeconds: number;
  runs: number;
}

const USAGE = `usage: npm run bench -- [options]
  --seconds S            take length in seconds (default 60)
  --factors 1,2,4,8,16   oversampling factors to time (default all)
  --runs N               timing rounds; each renders the take once per factor (default ${DEFAULT_RUNS})
  --memory-minutes M     length of the memory probe's take, 0 to skip (default 10)
  --parallel-seconds S   take length of the parallel case, 0 to skip (default ${DEFAULT_PARALLEL_SECONDS})
  --circuit-seconds S    take length of the circuit-design rows, 0 to skip (default ${DEFAULT_CIRCUIT_SECONDS})
  --json FILE            also write every figure as JSON
  --help                 this text`;

/** A bad option: one line, exit status 2. */
class BenchUsageError extends Error {}

function numberOption(value: string | undefined, flag: string, fallback: number, valid: (n: number) => boolean, expected: string): number {
  if (value === undefined) return fallback;
  const n = Number(value);
  if (value.trim() === '' || !valid(n)) throw new BenchUsageError(`${flag}: "${value}" is not ${expected}`);
  return n;
}

function parseBenchArgs(argv: string[]): BenchArgs | null {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      options: {
        seconds: { type: 'string' },
        factors: { type: 'string' },
        runs: { type: 'string' },
        'memory-minutes': { type: 'string' },
        'parallel-seconds': { type: 'string' },
        'circuit-seconds': { type: 'string' },
        json: { type: 'string' },
        help: { type: 'boolean' },
      },
      strict: true,
    }).values;
  } catch (error) {
    throw new BenchUsageError(error instanceof Error ? error.message : String(error));
  }
  if (parsed.help) return null;
  if (parsed.json !== undefined && !existsSync(path.dirname(path.resolve(parsed.json)))) {
    throw new BenchUsageError(`--json: the folder of "${parsed.json}" does not exist`);
  }
  const factors = (parsed.factors ?? OVERSAMPLE_FACTORS.join(',')).split(',').map((text) => {
    const factor = Number(text);
    if (!(OVERSAMPLE_FACTORS as readonly number[]).includes(factor)) {
      throw new BenchUsageError(`--factors: "${text}" is not an oversampling factor (${OVERSAMPLE_FACTORS.join(', ')})`);
    }
    return factor as OversampleFactor;
  });
  const positive = (n: number): boolean => Number.isFinite(n) && n > 0;
  const notNegative = (n: number): boolean => Number.isFinite(n) && n >= 0;
  return {
    seconds: numberOption(parsed.seconds, '--seconds', 60, positive, 'a positive number of seconds'),
    json: parsed.json,
    factors,
    memoryMinutes: numberOption(parsed['memory-minutes'], '--memory-minutes', 10, notNegative, 'a number of minutes (0 to skip)'),
    parallelSeconds: numberOption(parsed['parallel-seconds'], '--parallel-seconds', DEFAULT_PARALLEL_SECONDS, notNegative, 'a number of seconds (0 to skip)'),
    circuitSeconds: numberOption(parsed['circuit-seconds'], '--circuit-seconds', DEFAULT_CIRCUIT_SECONDS, notNegative, 'a number of seconds (0 to skip)'),
    runs: numberOption(parsed.runs, '--runs', DEFAULT_RUNS, (n) => Number.isInteger(n) && n >= 1, 'a whole number of at least 1'),
  };
}


function median(values: readonly number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}

function timeIt(run: () => void): number {
  const start = process.hrtime.bigint();
  run();
  return Number(process.hrtime.bigint() - start) / 1e9;
}

function clipperStage(design: Design<number>): ClipperStage<number> {
  const stage = design.stages.find((s): s is ClipperStage<number> => s.type === 'clipper');
  if (!stage) throw new Error('bench design has no clipper stage');
  return stage;
}

function runClipper(stage: ClipperStage<number>, design: Design<number>, rate: number, solver: DiodeSolverKind, input: Float64Array): { output: Float64Array; seconds: number } {
  const ctx = { sampleRate: rate, supplyVolts: design.supplyVolts, temperatureC: design.temperatureC };
  const clipper = createClipper(designClipper(stage, ctx, { solver }));
  const output = Float64Array.from(input);
  const seconds = timeIt(() => clipper.process(output));
  return { output, seconds };
}

/** Clipper alone at the oversampled rate: fast solver vs Newton reference on a hot 1 kHz tone. */
function clipperFidelity(design: Design<number>, factor: OversampleFactor): Pick<FactorResult, 'clipperWaveformErrorDb' | 'clipperHarmonicDeltaDb' | 'clipperSpeedupVsNewton'> {
  const rate = BASE_RATE * factor;
  const windowLength = 2 ** Math.ceil(Math.log2(rate / 4)); // >= 0.25 s
  const bin = coherentBin(1000, rate, windowLength);
  const settle = windowLength; // one window of settling, then one analysed
  const input = new Float64Array(settle + windowLength);
  for (let n = 0; n < input.length; n++) input[n] = 4 * Math.sin((2 * Math.PI * bin * (n % windowLength)) / windowLength);
  const stage = clipperStage(design);
  const fast = runClipper(stage, design, rate, 'table', input);
  const reference = runClipper(stage, design, rate, 'newton', input);
  let err = 0;
  let ref = 0;
  for (let i = 0; i < input.length; i++) {
    err += (fast.output[i] - reference.output[i]) ** 2;
    ref += reference.output[i] ** 2;
  }
  const analyzer = createToneAnalyzer(windowLength, rate);
  const a = analyzer.analyze(fast.output.subarray(settle), bin);
  const b = analyzer.analyze(reference.output.subarray(settle), bin);
  let delta = 0;
  a.harmonics.forEach((h, i) => {
    const fast = h.dbc;
    const exact = b.harmonics[i].dbc;
    if (exact !== null && exact > -100) delta = Math.max(delta, fast === null ? Infinity : Math.abs(fast - exact));
  });
  return {
    clipperWaveformErrorDb: err > 0 ? 10 * Math.log10(err / ref) : -300,
    clipperHarmonicDeltaDb: delta,
    clipperSpeedupVsNewton: reference.seconds / fast.seconds,
  };
}

export interface MemoryResult {
  minutes: number;
  peakRssMiB: number;
  baselineMiB: number;
  decodedMiB: number;
}

/** What `--json` writes. */
export interface BenchReport {
  seconds: number;
  sampleRate: number;
  design: string;
  results: FactorResult[];
  memory: MemoryResult | null;
  parallel: ParallelResult | null;
  circuits: CircuitBenchResult[];
}

/** Writes a long take to a temporary folder and renders it in a child process (its own peak RSS). */
async function measureMemory(minutes: number): Promise<MemoryResult> {
  const folder = mkdtempSync(path.join(tmpdir(), 'clipbench-bench-'));
  try {
    const take = synthesizeDemoTake({ sampleRate: BASE_RATE, seconds: minutes * 60 });
    const takePath = path.join(folder, 'long-take.wav');
    await writeWavFile(takePath, [take.volts], BASE_RATE, '24');
    const probe = fileURLToPath(new URL('./memoryProbe.js', import.meta.url));
    const child = spawnSync(process.execPath, [probe, DESIGN_PATH, takePath, folder], { encoding: 'utf8' });
    if (child.status !== 0) throw new Error(`memory probe failed: ${child.stderr}`);
    return { minutes, ...(JSON.parse(child.stdout) as Omit<MemoryResult, 'minutes'>) };
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}

async function main(): Promise<void> {
  const args = parseBenchArgs(process.argv.slice(2));
  if (args === null) {
    process.stdout.write(`${USAGE}\n`);
    return;
  }
  const design = resolveDesign(await readDesignFile(DESIGN_PATH, loadPartsLibrary()));
  const take = synthesizeDemoTake({ sampleRate: BASE_RATE, seconds: args.seconds });
  const decodedMiB = (take.volts.length * 4) / 2 ** 20; // as a decoded float32 WAV would hold it
  process.stdout.write(
    `Bench: ${args.seconds} s mono take at ${BASE_RATE} Hz through ${design.name} (decoded audio ${decodedMiB.toFixed(1)} MiB), fastest and median of ${args.runs} runs\n`,
  );

  // Every factor's chain is built and warmed up first; then each round renders the take once per
  // factor, so every factor's runs are spread over the whole timing phase (the machine's speed
  // drifts over seconds) and the fastest run of each factor is kept, with the median beside it.
  const chains = args.factors.map((oversample) => {
    const chain = buildChain(design, { sampleRate: BASE_RATE, oversample });
    renderChannel(chain, take.volts.subarray(0, WARM_UP_SECONDS * BASE_RATE));
    return chain;
  });
  const times = args.factors.map((): number[] => []);
  const peakRssMiB = args.factors.map(() => 0);
  for (let run = 0; run < args.runs; run++) {
    chains.forEach((chain, i) => {
      times[i].push(timeIt(() => renderChannel(chain, take.volts)));
      if (run === 0) peakRssMiB[i] = process.resourceUsage().maxRSS / 1024;
    });
  }
  const results: FactorResult[] = args.factors.map((oversample, i) => {
    const seconds = Math.min(...times[i]);
    return {
      oversample,
      realTime: args.seconds / seconds,
      realTimeMedian: args.seconds / median(times[i]),
      nsPerOversampledSample: (seconds * 1e9) / (take.volts.length * oversample),
      peakRssMiB: peakRssMiB[i],
      ...clipperFidelity(design, oversample),
    };
  });

  process.stdout.write(
    formatRows(
      ['oversample', 'x real time', 'median x real time', 'ns/oversampled sample', 'peak RSS MiB', 'clipper error dB', 'harmonic delta dB', 'clipper speed vs Newton'],
      results.map((r) => [
        `${r.oversample}x`,
        r.realTime.toFixed(1),
        r.realTimeMedian.toFixed(1),
        r.nsPerOversampledSample.toFixed(1),
        r.peakRssMiB.toFixed(0),
        r.clipperWaveformErrorDb.toFixed(1),
        r.clipperHarmonicDeltaDb.toFixed(4),
        `${r.clipperSpeedupVsNewton.toFixed(1)}x`,
      ]),
    ),
  );
  const at8 = results.find((r) => r.oversample === 8);
  if (at8) {
    const verdict = (ok: boolean): string => (ok ? 'met' : 'NOT met');
    process.stdout.write(
      `Targets at 8x: >= ${TARGET_REAL_TIME_AT_8X}x real time: ${verdict(at8.realTime >= TARGET_REAL_TIME_AT_8X)}; ` +
        `clipper error <= ${TARGET_WAVEFORM_ERROR_DB} dB: ${verdict(at8.clipperWaveformErrorDb <= TARGET_WAVEFORM_ERROR_DB)}; ` +
        `harmonics within ${TARGET_HARMONIC_DELTA_DB} dB: ${verdict(at8.clipperHarmonicDeltaDb <= TARGET_HARMONIC_DELTA_DB)}\n`,
    );
  }
  let memory: MemoryResult | null = null;
  if (args.memoryMinutes > 0) {
    memory = await measureMemory(args.memoryMinutes);
    const extra = memory.peakRssMiB - memory.baselineMiB - memory.decodedMiB;
    process.stdout.write(
      `Memory, ${memory.minutes} min take rendered at 8x: peak RSS ${memory.peakRssMiB.toFixed(0)} MiB = ` +
        `${memory.baselineMiB.toFixed(0)} MiB before reading + ${memory.decodedMiB.toFixed(0)} MiB decoded audio + ${extra.toFixed(0)} MiB more\n`,
    );
  }
  let parallel: ParallelResult | null = null;
  if (args.parallelSeconds > 0) {
    parallel = await measureParallelRenders(DESIGN_PATH, args.parallelSeconds, BASE_RATE);
    process.stdout.write(
      `Parallel, clipbench render of ${parallel.jobs} takes of ${args.parallelSeconds} s at 8x, fresh process: ${parallel.oneThreadSeconds.toFixed(2)} s with --threads 1, ` +
        `${parallel.allThreadsSeconds.toFixed(2)} s with ${parallel.threads} threads (${parallel.speedup.toFixed(2)}x)\n`,
    );
  }
  const circuits: CircuitBenchResult[] = [];
  if (args.circuitSeconds > 0) {
    const circuitTake = synthesizeDemoTake({ sampleRate: BASE_RATE, seconds: args.circuitSeconds }).volts;
    for (const name of CIRCUIT_BENCH_DESIGNS) circuits.push(await benchCircuitDesign(name, circuitTake, BASE_RATE, Math.min(args.runs, 3)));
    process.stdout.write(
      formatRows(
        ['circuit design', 'oversample', 'x real time', 'ns/oversampled sample', 'response error to 10 kHz dB', 'to 20 kHz dB'],
        circuits.map((c) => [c.design, `${c.oversample}x`, c.realTime.toFixed(1), c.nsPerOversampledSample.toFixed(0), c.responseErrorTo10kDb.toFixed(3), c.responseErrorTo20kDb.toFixed(3)]),
      ),
    );
    const verdicts = circuits.map((c) => `${c.design} ${c.realTime >= TARGET_REAL_TIME_AT_8X ? 'met' : 'NOT met'}`);
    process.stdout.write(`Circuit designs, goal >= ${TARGET_REAL_TIME_AT_8X}x real time at 8x: ${verdicts.join('; ')}\n`);
  }
  if (args.json) {
    const report: BenchReport = { seconds: args.seconds, sampleRate: BASE_RATE, design: design.name, results, memory, parallel, circuits };
    await writeFileAtomic(args.json, `${JSON.stringify(report, null, 2)}\n`);
  }
}

try {
  await main();
} catch (error) {
  if (!(error instanceof BenchUsageError)) throw error;
  process.stderr.write(`bench: ${error.message} (npm run bench -- --help for the options)\n`);
  process.exitCode = 2;
}
