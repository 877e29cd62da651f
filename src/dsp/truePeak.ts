/**
 * True-peak estimate after ITU-R BS.1770-4 Annex 2: interpolate the signal 4x with a low-pass
 * filter and take the largest absolute value of the interpolated samples. The interpolation is the
 * project's half-band oversampler (flat to 20 kHz, >= 100 dB image rejection), fed zeros after the
 * take to flush its delay line, so samples outside the take count as 0.
 */
import { createOversampler } from './oversampler.js';

const OVERSAMPLING = 4;
const BLOCK_SAMPLES = 4096;

/** Largest absolute value of the 4x-interpolated channel. */
export function truePeakLinear(channel: ArrayLike<number>, sampleRate: number): number {
  const oversampler = createOversampler(OVERSAMPLING, BLOCK_SAMPLES, sampleRate);
  const input = new Float64Array(BLOCK_SAMPLES);
  const output = new Float64Array(OVERSAMPLING * BLOCK_SAMPLES);
  // The interpolator alone delays by less than the up-down round trip; flushing that many zeros is enough.
  const total = channel.length + oversampler.latencyBaseSamples + 1;
  let peak = 0;
  for (let start = 0; start < total; start += BLOCK_SAMPLES) {
    const n = Math.min(BLOCK_SAMPLES, total - start);
    const block = n === BLOCK_SAMPLES ? input : input.subarray(0, n);
    for (let i = 0; i < n; i++) block[i] = start + i < channel.length ? channel[start + i] : 0;
    oversampler.upsample(block, output);
    for (let i = 0; i < OVERSAMPLING * n; i++) {
      const magnitude = Math.abs(output[i]);
      if (magnitude > peak) peak = magnitude;
    }
  }
  return peak;
}

/** True peak in dBTP (dB re full scale 1.0) over all channels; -Infinity for digital silence. */
export function truePeakDb(channels: readonly ArrayLike<number>[], sampleRate: number): number {
  let peak = 0;
  for (const channel of channels) peak = Math.max(peak, truePeakLinear(channel, sampleRate));
  return 20 * Math.log10(peak);
}
