/**
 * Encodes samples (digital full scale = 1) as a canonical 44-byte-header WAV: WAVE_FORMAT_PCM for
 * 16/24-bit, WAVE_FORMAT_IEEE_FLOAT for 32-bit float (container facts: see `wavFormat.ts`).
 * PCM: code = round(x * 2^(bits-1) + d) (Math.round: nearest, halves up), clipped to
 * [-2^(bits-1), 2^(bits-1) - 1]. d = 0, or with `dither` (16-bit) TPDF dither of +-1 LSB: the
 * difference of two uniform values, which decorrelates the quantisation error from the signal (common
 * practice; e.g. Vanderkooy & Lipshitz, "Dither in digital audio", JAES 35(12), 1987). The dither
 * comes from a fixed-seed generator per channel, so the same samples still give the same bytes.
 */
import { UserError } from '../errors.js';
import { writeFileAtomicWith } from './atomicWrite.js';
import { FLOAT32_MAX, pcmFullScale, WAVE_FORMAT_IEEE_FLOAT, WAVE_FORMAT_PCM } from './wavFormat.js';

export type WavOutputBits = '16' | '24' | '32f';

const HEADER_BYTES = 44;
/** Frames encoded per write when streaming a file, so a render needs no second copy of itself. */
const STREAM_CHUNK_FRAMES = 65536;

export interface WavShape {
  channelCount: number;
  frames: number;
  bytesPerSample: number;
  blockAlign: number;
  dataBytes: number;
  padBytes: number;
}

/** The layout of a WAV of this size; a UserError when it would pass the 4 GiB RIFF limit (call it before rendering). */
export function wavLayout(channelCount: number, frames: number, bits: WavOutputBits): WavShape {
  const bytesPerSample = bits === '16' ? 2 : bits === '24' ? 3 : 4;
  const blockAlign = channelCount * bytesPerSample;
  const dataBytes = frames * blockAlign;
  const padBytes = dataBytes & 1; // RIFF chunks are padded to even length
  if (HEADER_BYTES - 8 + dataBytes + padBytes > 0xffffffff) {
    throw new UserError(`render too long for a WAV file: ${dataBytes} bytes of ${bits}-bit audio exceed the 4 GiB RIFF limit; render shorter takes or use fewer bits`);
  }
  return { channelCount, frames, bytesPerSample, blockAlign, dataBytes, padBytes };
}

function wavShape(channels: Float32Array[] | Float64Array[], sampleRate: number, bits: WavOutputBits): WavShape {
  validateEncodeArguments(channels, sampleRate, bits);
  return wavLayout(channels.length, channels[0].length, bits);
}

function writeHeader(bytes: Uint8Array, shape: WavShape, sampleRate: number, bits: WavOutputBits): void {
  const view = new DataView(bytes.buffer, bytes.byteOffset, HEADER_BYTES);
  writeAscii(bytes, 0, 'RIFF');
  view.setUint32(4, HEADER_BYTES - 8 + shape.dataBytes + shape.padBytes, true);
  writeAscii(bytes, 8, 'WAVE');
  writeAscii(bytes, 12, 'fmt ');
  view.setUint32(16, 16, true);
  view.setUint16(20, bits === '32f' ? WAVE_FORMAT_IEEE_FLOAT : WAVE_FORMAT_PCM, true);
  view.setUint16(22, shape.channelCount, true);
  view.setUint32(24, sampleRate, true);
  view.setUint32(28, sampleRate * shape.blockAlign, true);
  view.setUint16(32, shape.blockAlign, true);
  view.setUint16(34, shape.bytesPerSample * 8, true);
  writeAscii(bytes, 36, 'data');
  view.setUint32(40, shape.dataBytes, true);
}

/** Deterministic TPDF dither in LSB (xorshift32, Marsaglia, J. Stat. Softw. 8(14), 2003): u1 - u2, in (-1, 1). */
class TpdfDither {
  private state: number;

  constructor(channel: number) {
    this.state = (0x9e3779b9 ^ Math.imul(channel + 1, 0x85ebca6b)) >>> 0 || 1;
  }

  private uniform(): number {
    let x = this.state;
    x ^= x << 13;
    x ^= x >>> 17;
    x ^= x << 5;
    this.state = x >>> 0;
    return this.state / 4294967296;
  }

  next(): number {
    return this.uniform() - this.uniform();
  }
}

/** One dither generator per channel, or null for plain rounding. */
type DitherSet = TpdfDither[] | null;

function ditherFor(channelCount: number, bits: WavOutputBits, dither: boolean): DitherSet {
  return dither && bits === '16' ? Array.from({ length: channelCount }, (_, channel) => new TpdfDither(channel)) : null;
}

/** Interleaves frames [start, end) of every channel into `bytes` from byte `offset` on. */
function encodeFrames(
  channels: Float32Array[] | Float64Array[],
  start: number,
  end: number,
  bits: WavOutputBits,
  shape: WavShape,
  bytes: Uint8Array,
  offset: number,
  dither: DitherSet,
): void {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  for (let channel = 0; channel < shape.channelCount; channel++) {
    const samples = channels[channel].subarray(start, end);
    const first = offset + channel * shape.bytesPerSample;
    if (bits === '16') encodePcm16(view, samples, first, shape.blockAlign, dither?.[channel] ?? null);
    else if (bits === '24') encodePcm24(bytes, samples, first, shape.blockAlign);
    else encodeFloat32(view, samples, first, shape.blockAlign);
  }
}

export function encodeWav(channels: Float32Array[] | Float64Array[], sampleRate: number, bits: WavOutputBits, dither = false): Uint8Array {
  const shape = wavShape(channels, sampleRate, bits);
  const bytes = new Uint8Array(HEADER_BYTES + shape.dataBytes + shape.padBytes);
  writeHeader(bytes, shape, sampleRate, bits);
  encodeFrames(channels, 0, shape.frames, bits, shape, bytes, HEADER_BYTES, ditherFor(shape.channelCount, bits, dither));
  return bytes;
}

/**
 * Encodes and writes atomically (temporary name, then rename), a chunk of frames at a time, so the
 * file's bytes are never all in memory: the same bytes as `encodeWav`.
 */
export async function writeWavFile(
  path: string,
  channels: Float32Array[] | Float64Array[],
  sampleRate: number,
  bits: WavOutputBits,
  dither = false,
): Promise<void> {
  const shape = wavShape(channels, sampleRate, bits);
  const ditherSet = ditherFor(shape.channelCount, bits, dither);
  const header = new Uint8Array(HEADER_BYTES);
  writeHeader(header, shape, sampleRate, bits);
  const chunk = new Uint8Array(Math.min(shape.frames, STREAM_CHUNK_FRAMES) * shape.blockAlign + shape.padBytes);
  await writeFileAtomicWith(path, async (handle) => {
    await handle.write(header);
    for (let start = 0; start < shape.frames; start += STREAM_CHUNK_FRAMES) {
      const end = Math.min(shape.frames, start + STREAM_CHUNK_FRAMES);
      encodeFrames(channels, start, end, bits, shape, chunk, 0, ditherSet);
      await handle.write(chunk, 0, (end - start) * shape.blockAlign);
    }
    if (shape.padBytes > 0) await handle.write(new Uint8Array(shape.padBytes));
  });
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

function quantize(value: number, fullScale: number, ditherLsb = 0): number {
  const code = Math.round(value * fullScale + ditherLsb);
  return code < -fullScale ? -fullScale : code > fullScale - 1 ? fullScale - 1 : code;
}

function encodePcm16(view: DataView, samples: Float32Array | Float64Array, offset: number, stride: number, dither: TpdfDither | null): void {
  const fullScale = pcmFullScale(16);
  for (let i = 0; i < samples.length; i++, offset += stride) {
    view.setInt16(offset, quantize(samples[i], fullScale, dither === null ? 0 : dither.next()), true);
  }
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
