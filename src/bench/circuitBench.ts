/**
 * Bench rows for `circuit` designs (the circuit core): render speed at 8x and the fidelity of the
 * render's small-signal response against the analog circuit's (the largest |responseMeasured -
 * response| over 20 Hz-20 kHz, and below 10 kHz), as `measure` computes them.
 */
import { fileURLToPath } from 'node:url';
import { buildChain } from '../circuit/chain.js';
import { renderChannel } from '../circuit/renderChannel.js';
import { loadPartsLibrary } from '../design/parts.js';
import { readDesignFile } from '../design/parseDesign.js';
import { resolveDesign } from '../design/resolve.js';
import { measureResponse, predictResponse, responseFrequencies, responseProbeVolts } from '../analysis/response.js';
import { settleSeconds } from '../analysis/toneRun.js';

/** The two-op-amp drive and the two-transistor fuzz. */
export const CIRCUIT_BENCH_DESIGNS = ['harbor-lights', 'ember-twin'] as const;

const OVERSAMPLE = 8;
const RESPONSE_WINDOW = 8192;
const RESPONSE_POINTS = 31;

export interface CircuitBenchResult {
  design: string;
  oversample: number;
  realTime: number;
  nsPerOversampledSample: number;
  /** Largest |measured - predicted| response, dB, 20 Hz-10 kHz and 20 Hz-20 kHz. */
  responseErrorTo10kDb: number;
  responseErrorTo20kDb: number;
}

export async function benchCircuitDesign(name: string, take: Float64Array, sampleRate: number, runs: number): Promise<CircuitBenchResult> {
  const file = fileURLToPath(new URL(`../../fixtures/designs/${name}.json`, import.meta.url));
  const design = resolveDesign(await readDesignFile(file, loadPartsLibrary()));
  const chain = buildChain(design, { sampleRate, oversample: OVERSAMPLE });
  renderChannel(chain, take.subarray(0, Math.min(take.length, sampleRate)));
  let fastest = Infinity;
  for (let run = 0; run < runs; run++) {
    const start = process.hrtime.bigint();
    renderChannel(chain, take);
    fastest = Math.min(fastest, Number(process.hrtime.bigint() - start) / 1e9);
  }
  const frequencies = responseFrequencies(sampleRate, RESPONSE_WINDOW, RESPONSE_POINTS);
  const predicted = predictResponse(design, sampleRate, OVERSAMPLE, frequencies);
  const measured = measureResponse(chain, { sampleRate, windowLength: RESPONSE_WINDOW, amplitudeVolts: responseProbeVolts(predicted), settleSeconds: settleSeconds(design, sampleRate) }, frequencies);
  const difference = (a: number | null, b: number | null): number => (a === null || b === null ? (a === b ? 0 : Infinity) : Math.abs(a - b));
  const errorUpTo = (hz: number): number => Math.max(...frequencies.flatMap((f, i) => (f <= hz ? [difference(measured[i].db, predicted[i].db)] : [])));
  return {
    design: design.name,
    oversample: OVERSAMPLE,
    realTime: take.length / sampleRate / fastest,
    nsPerOversampledSample: (fastest * 1e9) / (take.length * OVERSAMPLE),
    responseErrorTo10kDb: errorUpTo(10000),
    responseErrorTo20kDb: errorUpTo(20000),
  };
}
