/**
 * Reads a WAV file into per-channel Float32Array samples, digital full scale = 1.
 * Integer PCM code c reads as c / 2^(bits-1) (8-bit is offset binary, centre 128), so the writer's
 * encoding round-trips exactly; floats are taken as stored and must be finite.
 *
 * Decoding is our own rather than npm `wav-decoder`: that package refuses WAVE_FORMAT_EXTENSIBLE,
 * scales positive and negative codes differently, and misreads the 24-bit code -2^23; the tests use it
 * as an independent reference for the plain formats.
 */
import { readFile } from 'node:fs/promises';
import { UserError } from '../errors.js';
import { FLOAT32_MAX, pcmFullScale, type WavSampleFormat } from './wavFormat.js';
import { parseWavLayout, type WavLayout } from './wavHeader.js';

export type { WavSampleFormat } from './wavFormat.js';

export interface DecodedWav {
  path: string;
  sampleRate: number;
  /** One array per channel (1 = mono, 2 = stereo), digital full scale = 1. */
  channels: Float32Array[];
  format: WavSampleFormat;
  frames: number;
}

/** Reads and validates `path`; every bad input throws one UserError line naming the file and the problem. */
export async function readWavFile(path: string): Promise<DecodedWav> {
  const bytes = await readInputBytes(path);
  return decodeWav(bytes, path);
}

/** Decodes a whole WAV file held in memory; `fileLabel` names it in errors. */
export function decodeWav(bytes: Uint8Array, fileLabel: string): DecodedWav {
  const layout = parseWavLayout(bytes, fileLabel);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (layout.format === 'float32' || layout.format === 'float64') assertUsableFloats(view, layout, fileLabel);
  const channels: Float32Array[] = [];
  for (let channel = 0; channel < layout.channelCount; channel++) {
    const samples = new Float32Array(layout.frames);
    decodeChannel(view, layout, channel, samples);
    channels.push(samples);
  }
  return { path: fileLabel, sampleRate: layout.sampleRate, channels, format: layout.format, frames: layout.frames };
}

async function readInputBytes(path: string): Promise<Uint8Array> {
  try {
    return await readFile(path);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new UserError(`${path}: file not found`);
    if (code === 'EISDIR') throw new UserError(`${path}: is a folder, not a WAV file`);
    if (code === 'EACCES' || code === 'EPERM') throw new UserError(`${path}: permission denied, cannot read the file`);
    throw new UserError(`${path}: cannot read the file (${code ?? String(error)})`);
  }
}

/** Kernel: de-interleaves one channel; the layout has been validated. */
function decodeChannel(view: DataView, layout: WavLayout, channel: number, out: Float32Array): void {
  const stride = layout.blockAlign;
  let offset = layout.dataOffset + channel * layout.bytesPerSample;
  const frames = layout.frames;
  switch (layout.format) {
    case 'pcm8': {
      const scale = 1 / pcmFullScale(8);
      for (let i = 0; i < frames; i++, offset += stride) out[i] = (view.getUint8(offset) - 128) * scale;
      return;
    }
    case 'pcm16': {
      const scale = 1 / pcmFullScale(16);
      for (let i = 0; i < frames; i++, offset += stride) out[i] = view.getInt16(offset, true) * scale;
      return;
    }
    case 'pcm24': {
      const scale = 1 / pcmFullScale(24);
      for (let i = 0; i < frames; i++, offset += stride) {
        // Little-endian 3-byte two's complement; `<< 8 >> 8` sign-extends bit 23.
        const code = ((view.getUint8(offset) | (view.getUint8(offset + 1) << 8) | (view.getUint8(offset + 2) << 16)) << 8) >> 8;
        out[i] = code * scale;
      }
      return;
    }
    case 'pcm32': {
      const scale = 1 / pcmFullScale(32);
      for (let i = 0; i < frames; i++, offset += stride) out[i] = view.getInt32(offset, true) * scale;
      return;
    }
    case 'float32':
      for (let i = 0; i < frames; i++, offset += stride) out[i] = view.getFloat32(offset, true);
      return;
    case 'float64':
      // Values beyond the float32 range become +-Infinity here and are reported by the finite check.
      for (let i = 0; i < frames; i++, offset += stride) out[i] = view.getFloat64(offset, true);
      return;
  }
}

/**
 * Reports the first frame (0-based) holding NaN, +-Infinity, or (in a 64-bit file) a value beyond the
 * 32-bit float range the samples are kept in.
 */
function assertUsableFloats(view: DataView, layout: WavLayout, fileLabel: string): void {
  const isDouble = layout.format === 'float64';
  const sampleCount = layout.frames * layout.channelCount;
  for (let k = 0; k < sampleCount; k++) {
    const offset = layout.dataOffset + k * layout.bytesPerSample;
    const value = isDouble ? view.getFloat64(offset, true) : view.getFloat32(offset, true);
    if (!(Math.abs(value) <= FLOAT32_MAX)) {
      const frame = Math.floor(k / layout.channelCount);
      const channel = (k % layout.channelCount) + 1;
      throw new UserError(
        `${fileLabel}: invalid float sample (${value}) at frame index ${frame}, channel ${channel} of ${layout.channelCount}; ` +
          'samples must be finite and within the 32-bit float range',
      );
    }
  }
}
