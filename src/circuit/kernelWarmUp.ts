/**
 * JIT warm-up for the nonlinear kernels. V8 optimises a hot function with the type feedback it has
 * gathered so far; an operation not yet executed by then (a diode first conducting, the op-amp
 * first reaching a rail, a drive first leaving the diode table, the first exit of a block loop
 * compiled while running) has none, and its first execution deoptimises the kernel. V8 normally
 * re-optimises it, but measured on Node 20 (2 cores), in about one process in six the fused
 * gain-clipper kernel stayed unoptimised after two such deopts and the whole render ran 4-8 times
 * slower. So before a nonlinear processor sees audio, a throwaway copy of it (same code, hence the
 * same feedback) runs a short synthetic signal that takes every branch a real signal takes:
 * silence, then a Nyquist-rate square wave whose amplitude grows from 1 mV to 10 V (slew, both rails,
 * both diode directions), then silence, in blocks of several lengths. Drives beyond a diode table
 * (tens of volts: its range has a margin over the supply) and the input limit are left out: taking
 * those paths in the warm-up measurably slowed the fused kernel (about 15 %), and a render that
 * does reach them pays one deoptimisation.
 */
import type { Processor } from './processor.js';

const SILENCE_SAMPLES = 16;
const GROWTH_SAMPLES = 128;
const DECADES = 4; // 1 mV .. 10 V
const BLOCK_LENGTHS = [1, 2, 5, 2 * SILENCE_SAMPLES + GROWTH_SAMPLES];

function warmUpSignal(length: number): Float64Array {
  const signal = new Float64Array(length);
  for (let i = 0; i < length; i++) {
    const k = i - SILENCE_SAMPLES;
    if (k < 0 || k >= GROWTH_SAMPLES) continue;
    signal[i] = (k % 2 === 0 ? 1 : -1) * 1e-3 * 10 ** ((DECADES * k) / GROWTH_SAMPLES);
  }
  return signal;
}

/** Run the warm-up signal through a throwaway processor from `create`. */
export function warmUpKernel(create: () => Processor): void {
  const processor = create();
  const signal = warmUpSignal(BLOCK_LENGTHS[BLOCK_LENGTHS.length - 1]);
  for (const length of BLOCK_LENGTHS) processor.process(signal.slice(signal.length - length));
}
