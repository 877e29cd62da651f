/**
 * JIT warm-up for the nonlinear kernels. V8 optimises a hot function with the type feedback it has
 * gathered so far; an operation not yet executed by then (a diode first conducting, the op-amp
 * first reaching a rail, the first exit of a block loop compiled while running) has none, and its
 * first execution deoptimises the kernel. V8 normally re-optimises it, but measured on Node 20
 * (2 cores), in about one process in six the fused gain-clipper kernel stayed unoptimised after two
 * such deopts and the whole render ran 4-8 times slower. So before a nonlinear processor sees audio,
 * a throwaway copy of it (same code, hence the same feedback) runs a synthetic signal that takes
 * every branch a real signal takes, in blocks of several lengths:
 * - silence, then a Nyquist-rate square wave growing from 1 mV to `driveVolts` (slewing, diodes
 *   conducting both ways);
 * - `driveVolts` held for `settleSamples`, then -`driveVolts` as long (the op-amp slews all the way
 *   into each rail, however slow it is: the caller sizes `settleSamples` from the slew limit).
 * `driveVolts` should reach past the rails but stay inside the diode tables (the supply voltage
 * does both): drives beyond a table and the input limit are left out, because taking those paths in
 * the warm-up measurably slowed the fused kernel (about 15 %); a render that reaches them pays one
 * deoptimisation.
 */
import type { Processor } from '../dsp/processor.js';

export interface WarmUpSignal {
  /** Largest drive, volts. */
  driveVolts: number;
  /** Samples each polarity of the held drive lasts. */
  settleSamples: number;
}

const SILENCE_SAMPLES = 16;
const GROWTH_SAMPLES = 128;
const GROWTH_START_VOLTS = 1e-3;
/** The held drive never lasts longer than this (enough for any op-amp faster than about 0.002 V/us). */
const MAX_SETTLE_SAMPLES = 1 << 16;

function warmUpSignal({ driveVolts, settleSamples }: WarmUpSignal): Float64Array {
  const settle = Math.min(MAX_SETTLE_SAMPLES, Math.max(1, Math.ceil(settleSamples)));
  const signal = new Float64Array(3 * SILENCE_SAMPLES + GROWTH_SAMPLES + 2 * settle);
  const decades = Math.log10(driveVolts / GROWTH_START_VOLTS);
  let i = SILENCE_SAMPLES;
  for (let k = 0; k < GROWTH_SAMPLES; k++, i++) {
    signal[i] = (k % 2 === 0 ? 1 : -1) * GROWTH_START_VOLTS * 10 ** ((decades * k) / (GROWTH_SAMPLES - 1));
  }
  i += SILENCE_SAMPLES;
  signal.fill(driveVolts, i, i + settle);
  signal.fill(-driveVolts, i + settle, i + 2 * settle);
  return signal;
}

/** Run the warm-up signal through a throwaway processor from `create`: whole, then in short blocks. */
export function warmUpKernel(create: () => Processor, drive: WarmUpSignal): void {
  const processor = create();
  const signal = warmUpSignal(drive);
  for (const length of [1, 2, 5]) processor.process(signal.slice(signal.length - length));
  processor.process(signal);
}
