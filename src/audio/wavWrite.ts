/**
 * Encodes samples (digital full scale = 1) as a canonical 44-byte-header WAV: WAVE_FORMAT_PCM for
 * 16/24-bit, WAVE_FORMAT_IEEE_FLOAT for 32-bit float (container facts: see `wavFormat.ts`).
 * PCM: code = round(x * 2^(bits-1)) (Math.round: nearest, halves up), clipped to
 * [-2^(bits-1), 2^(bits-1) - 1]; no dither, so the same samples always give the same bytes.
 */
import { UserError } from '../errors.js';
import { writeFileAtomic } from './atomicWrite.js';
import { FLOAT32_MAX, pcmFullScale, WAVE_FORMAT_IEEE_FLOAT, WAVE_FORMAT_PCM } from './wavFormat.js';

export type WavOutputBits = '16' | '24' | '32f';

const HEADER_BYTES = 44;

export function encodeWav(channels: Float32Array[] | Float64Array[], sampleRate: number, bits: WavOutputBits): Uint8Array {
  validateEncodeArguments(channels, sampleRate, bits);
  const channelCount = channels.length;
  const frames = channels[0].length;
  const bytesPerSample = bits === '16' ? 2 : bits === '24' ? 3 : 4;
  const blockAlign = channelCount * bytesPerSample;
  const dataBytes = frames * blockAlign;
  const padBytes = dataBytes & 1; // RIFF chunks are padded to even length
  if (HEADER_BYTES - 8 + dataBytes + padBytes > 0xffffffff) {
    throw new UserError(`render too long for a WAV file: ${dataBytes} bytes of audio exceed the 4 GiB RIFF limit; render shorter takes`);
  }
  const bytes = new Uint8Array(HEADER_BYTES + dataBytes + padBytes);
  const view = new DataView(bytes.buffer);
  writeAscii(bytes, 0, 'RIFF');
  view.setUint32(4, HEADER_BYTES - 8 + dataBytes + padBytes, true);
  writeAscii(bytes, 8, 'WAVE');
  writeAscii(bytes, 12, 'fmt ');
  view.setUint32(16, 16, true);
  view.setUint16(20, bits === '32f' ? WAVE_FORMAT_IEEE_FLOAT : WAVE_FORMAT_PCM, true);
  view.setUint16(22, channelCount, true);
  view.setUint32(24, sampleRate, true);
  view.setUint32(28, sampleRate * blockAlign, true);
  view.setUint16(32, blockAlign, true);
  view.setUint16(34, bytesPerSample * 8, true);
  writeAscii(bytes, 36, 'data');
  view.setUint32(40, dataBytes, true);
  for (let channel = 0; channel < channelCount; channel++) {
    const offset = HEADER_BYTES + channel * bytesPerSample;
    const samples = channels[channel];
    if (bits === '16') encodePcm16(view, samples, offset, blockAlign);
    else if (bits === '24') encodePcm24(bytes, samples, offset, blockAlign);
    else encodeFloat32(view, samples, offset, blockAlign);
  }
  return bytes;
}

/** Encodes and writes atomically (temporary name, then rename). */
export async function writeWavFile(
  path: string,
  channels: Float32Array[] | Float64Array[],
  sampleRate: number,
  bits: WavOutputBits,
): Promise<void> {
  await writeFileAtomic(path, encodeWav(channels, sampleRate, bits));
}

/** Programming errors, not user errors: the caller's samples come from our own stages. */
function validateEncodeArguments(channels: Float32Array[] | Float64Array[], sampleRate: number, bits: WavOutputBits): void {
  if (channels.length === 0 || channels.length > 0xffff) throw new RangeError(`encodeWav: ${channels.length} channels`);
  if (!Number.isInteger(sampleRate) || sampleRate <= 0) throw new RangeError(`encodeWav: sample rate ${sampleRate} Hz`);
  const frames = channels[0].length;
  // PCM clips any finite value at full scale; a 32-bit float file holds finite values up to FLOAT32_MAX.
  const largestMagnitude = bits === '32f' ? FLOAT32_MAX : Number.MAX_VALUE;
  for (let channel = 0; channel < channels.length; channel++) {
    const samples = channels[channel];
    if (samples.length !== frames) throw new RangeError(`encodeWav: channel ${channel + 1} has ${samples.length} frames, expected ${frames}`);
    for (let i = 0; i < frames; i++) {
      if (!(Math.abs(samples[i]) <= largestMagnitude)) {
        throw new RangeError(`encodeWav: sample ${samples[i]} at frame ${i}, channel ${channel + 1} cannot be written as ${bits}-bit`);
      }
    }
  }
}

function writeAscii(bytes: Uint8Array, offset: number, text: string): void {
  for (let i = 0; i < text.length; i++) bytes[offset + i] = text.charCodeAt(i);
}

function quantize(value: number, fullScale: number): number {
  const code = Math.round(value * fullScale);
  return code < -fullScale ? -fullScale : code > fullScale - 1 ? fullScale - 1 : code;
}

function encodePcm16(view: DataView, samples: Float32Array | Float64Array, offset: number, stride: number): void {
  const fullScale = pcmFullScale(16);
  for (let i = 0; i < samples.length; i++, offset += stride) view.setInt16(offset, quantize(samples[i], fullScale), true);
}

function encodePcm24(bytes: Uint8Array, samples: Float32Array | Float64Array, offset: number, stride: number): void {
  const fullScale = pcmFullScale(24);
  for (let i = 0; i < samples.length; i++, offset += stride) {
    const code = quantize(samples[i], fullScale);
    bytes[offset] = code & 0xff;
    bytes[offset + 1] = (code >> 8) & 0xff;
    bytes[offset + 2] = (code >> 16) & 0xff;
  }
}

function encodeFloat32(view: DataView, samples: Float32Array | Float64Array, offset: number, stride: number): void {
  for (let i = 0; i < samples.length; i++, offset += stride) view.setFloat32(offset, samples[i], true);
}
