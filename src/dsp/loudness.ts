/**
 * Integrated loudness per ITU-R BS.1770-4: K-weighting (a high-shelf "pre-filter" then the RLB
 * high-pass), mean square over 400 ms blocks with 75 % overlap, absolute gate -70 LKFS and relative
 * gate -10 LU. Channel weights are 1.0 for every channel (the standard's weight for L, R and C;
 * WAV channel masks are not read, so surround channels are not told apart).
 */
import { analog, bilinearTransform, type DigitalTransferFunction } from './bilinear.js';
import { createIirFilter } from './iir.js';

/**
 * Analog prototypes of the two K-weighting biquads. The standard publishes only 48 kHz digital
 * coefficients (Tables 1-2); these centre frequencies, gain and Q are the commonly circulated
 * parameters that reproduce those tables when bilinear-transformed with pre-warping at f0 (recalled
 * from memory, verified against the 48 kHz tables in tests/dsp/loudness.test.ts).
 */
const SHELF_HZ = 1681.974450955533;
const SHELF_GAIN_DB = 3.999843853973347;
const SHELF_Q = 0.7071752369554196;
/** Exponent giving the mid-band numerator weight Vb = Vh^x of the shelf (same source as above). */
const SHELF_MID_EXPONENT = 0.4996667741545416;
const HIGHPASS_HZ = 38.13547087602444;
const HIGHPASS_Q = 0.5003270373238773;

/** BS.1770-4 eq. 2: L = -0.691 + 10 log10(sum G_i z_i). */
const LOUDNESS_OFFSET_DB = -0.691;
const BLOCK_SECONDS = 0.4;
const BLOCK_OVERLAP_STEPS = 4; // 75 % overlap: a block is four 100 ms steps
const ABSOLUTE_GATE_LKFS = -70;
const RELATIVE_GATE_LU = -10;

/**
 * High shelf H(s) = (Vh s^2 + Vb (w0/Q) s + w0^2) / (s^2 + (w0/Q) s + w0^2): unity at DC, Vh
 * (about +4 dB) at high frequencies.
 */
export function designKWeightingShelf(sampleRate: number): DigitalTransferFunction {
  const w0 = 2 * Math.PI * SHELF_HZ;
  const vh = 10 ** (SHELF_GAIN_DB / 20);
  const vb = vh ** SHELF_MID_EXPONENT;
  const tf = analog([w0 * w0, (vb * w0) / SHELF_Q, vh], [w0 * w0, w0 / SHELF_Q, 1]);
  return bilinearTransform(tf, sampleRate, SHELF_HZ);
}

/**
 * Second-order high-pass H(s) = s^2 / (s^2 + (w0/Q) s + w0^2). The standard's table keeps the
 * numerator at exactly 1, -2, 1 (a passband gain slightly above unity, absorbed by the -0.691 dB
 * offset), so the numerator is rescaled to that convention at every rate.
 */
export function designKWeightingHighpass(sampleRate: number): DigitalTransferFunction {
  const w0 = 2 * Math.PI * HIGHPASS_HZ;
  const tf = bilinearTransform(analog([0, 0, 1], [w0 * w0, w0 / HIGHPASS_Q, 1]), sampleRate, HIGHPASS_HZ);
  const b0 = tf.b[0];
  return { ...tf, b: tf.b.map((c) => c / b0) };
}

const PROCESS_BLOCK = 4096;

/**
 * Mean square of the K-weighted channel over consecutive 100 ms steps (the last partial step is
 * dropped). Summing four consecutive steps gives a 400 ms gating block.
 */
function kWeightedStepEnergies(channel: ArrayLike<number>, sampleRate: number, stepSamples: number): Float64Array {
  const shelf = createIirFilter(designKWeightingShelf(sampleRate));
  const highpass = createIirFilter(designKWeightingHighpass(sampleRate));
  const stepCount = Math.floor(channel.length / stepSamples);
  const sums = new Float64Array(stepCount);
  const block = new Float64Array(PROCESS_BLOCK);
  const usable = stepCount * stepSamples;
  for (let start = 0; start < usable; start += PROCESS_BLOCK) {
    const n = Math.min(PROCESS_BLOCK, usable - start);
    const view = n === PROCESS_BLOCK ? block : block.subarray(0, n);
    for (let i = 0; i < n; i++) view[i] = channel[start + i];
    shelf.process(view);
    highpass.process(view);
    for (let i = 0; i < n; i++) sums[Math.floor((start + i) / stepSamples)] += view[i] * view[i];
  }
  return sums;
}

/**
 * Integrated loudness in LUFS (= LKFS) of `channels` (each channel one array of samples, full scale
 * 1.0), ITU-R BS.1770-4. Returns -Infinity when no 400 ms block passes the gates (silence, or a
 * signal shorter than 400 ms).
 */
export function integratedLoudness(channels: readonly (Float64Array | Float32Array)[], sampleRate: number): number {
  if (channels.length === 0) throw new RangeError('integratedLoudness: no channels');
  const stepSamples = Math.round((BLOCK_SECONDS / BLOCK_OVERLAP_STEPS) * sampleRate);
  const blockSamples = BLOCK_OVERLAP_STEPS * stepSamples;
  const stepEnergy = new Float64Array(Math.floor(channels[0].length / stepSamples));
  for (const channel of channels) {
    const sums = kWeightedStepEnergies(channel, sampleRate, stepSamples);
    for (let s = 0; s < stepEnergy.length; s++) stepEnergy[s] += sums[s]; // G_i = 1.0
  }

  const blockCount = stepEnergy.length - BLOCK_OVERLAP_STEPS + 1;
  if (blockCount < 1) return -Infinity;
  // Weighted sum over channels of each block's mean square (BS.1770-4 eq. 4 inner sum).
  const blockPower = new Float64Array(blockCount);
  for (let j = 0; j < blockCount; j++) {
    let sum = 0;
    for (let s = 0; s < BLOCK_OVERLAP_STEPS; s++) sum += stepEnergy[j + s];
    blockPower[j] = sum / blockSamples;
  }

  const loudnessOf = (power: number): number => LOUDNESS_OFFSET_DB + 10 * Math.log10(power);
  const meanPowerAbove = (gateLkfs: number): number => {
    let sum = 0;
    let count = 0;
    for (const p of blockPower) {
      if (p > 0 && loudnessOf(p) > gateLkfs) {
        sum += p;
        count++;
      }
    }
    return count === 0 ? 0 : sum / count;
  };

  const absoluteGated = meanPowerAbove(ABSOLUTE_GATE_LKFS);
  if (absoluteGated === 0) return -Infinity;
  const relativeGate = loudnessOf(absoluteGated) + RELATIVE_GATE_LU;
  const gated = meanPowerAbove(Math.max(relativeGate, ABSOLUTE_GATE_LKFS));
  return gated === 0 ? -Infinity : loudnessOf(gated);
}
