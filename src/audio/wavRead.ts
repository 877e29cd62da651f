/**
 * Reads a WAV file into per-channel Float32Array samples, digital full scale = 1.
 * Integer PCM code c reads as c / 2^(bits-1) (8-bit is offset binary, centre 128), so the writer's
 * encoding round-trips exactly; floats are taken as stored and must be finite.
 *
 * Decoding is our own rather than npm `wav-decoder`: that package refuses WAVE_FORMAT_EXTENSIBLE,
 * scales positive and negative codes differently, and misreads the 24-bit code -2^23; the tests use it
 * as an independent reference for the plain formats.
 */
import { closeSync, fstatSync, openSync, readSync } from 'node:fs';
import { UserError } from '../errors.js';
import { FLOAT32_MAX, pcmFullScale, type WavSampleFormat } from './wavFormat.js';
import { memorySource, parseWavLayout, type ByteSource, type WavLayout } from './wavHeader.js';

export type { WavSampleFormat } from './wavFormat.js';

export interface DecodedWav {
  path: string;
  sampleRate: number;
  /** One array per channel (1 = mono, 2 = stereo), digital full scale = 1. */
  channels: Float32Array[];
  format: WavSampleFormat;
  frames: number;
}

/** Bytes of sample data read and decoded at a time, so a file is never held whole in memory. */
const READ_CHUNK_BYTES = 1 << 20;

/**
 * Reads and validates `path`; every bad input throws one UserError line naming the file and the
 * problem. The samples are read in chunks straight into the channel arrays, so reading a take needs
 * the decoded audio plus a constant.
 */
export async function readWavFile(path: string): Promise<DecodedWav> {
  const fd = openInput(path);
  try {
    const size = fstatSync(fd).size;
    const source: ByteSource = {
      size,
      read(offset, length) {
        const buffer = new Uint8Array(length);
        readExactly(fd, buffer, offset, path);
        return buffer;
      },
    };
    const layout = parseWavLayout(source, path);
    const channels = Array.from({ length: layout.channelCount }, () => new Float32Array(layout.frames));
    const chunkFrames = Math.max(1, Math.floor(READ_CHUNK_BYTES / layout.blockAlign));
    const chunk = new Uint8Array(Math.min(layout.frames, chunkFrames) * layout.blockAlign);
    for (let start = 0; start < layout.frames; start += chunkFrames) {
      const frames = Math.min(chunkFrames, layout.frames - start);
      const bytes = chunk.subarray(0, frames * layout.blockAlign);
      readExactly(fd, bytes, layout.dataOffset + start * layout.blockAlign, path);
      decodeFrames(bytes, { ...layout, dataOffset: 0, frames }, channels, start, path);
    }
    return { path, sampleRate: layout.sampleRate, channels, format: layout.format, frames: layout.frames };
  } finally {
    closeSync(fd);
  }
}

/** Decodes a whole WAV file held in memory; `fileLabel` names it in errors. */
export function decodeWav(bytes: Uint8Array, fileLabel: string): DecodedWav {
  const layout = parseWavLayout(memorySource(bytes), fileLabel);
  const channels = Array.from({ length: layout.channelCount }, () => new Float32Array(layout.frames));
  decodeFrames(bytes, layout, channels, 0, fileLabel);
  return { path: fileLabel, sampleRate: layout.sampleRate, channels, format: layout.format, frames: layout.frames };
}

/** Checks and de-interleaves `layout.frames` frames from `bytes` into `channels` from frame `firstFrame` on. */
function decodeFrames(bytes: Uint8Array, layout: WavLayout, channels: Float32Array[], firstFrame: number, fileLabel: string): void {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (layout.format === 'float32' || layout.format === 'float64') assertUsableFloats(view, layout, firstFrame, fileLabel);
  channels.forEach((samples, channel) => decodeChannel(view, layout, channel, samples.subarray(firstFrame)));
}

function describeReadError(error: unknown, path: string): UserError {
  const code = (error as NodeJS.ErrnoException).code;
  if (code === 'ENOENT') return new UserError(`${path}: file not found`);
  if (code === 'EISDIR') return new UserError(`${path}: is a folder, not a WAV file`);
  if (code === 'EACCES' || code === 'EPERM') return new UserError(`${path}: permission denied, cannot read the file`);
  return new UserError(`${path}: cannot read the file (${code ?? String(error)})`);
}

function openInput(path: string): number {
  let fd: number;
  try {
    fd = openSync(path, 'r');
  } catch (error) {
    throw describeReadError(error, path);
  }
  if (fstatSync(fd).isDirectory()) {
    closeSync(fd);
    throw describeReadError(Object.assign(new Error('folder'), { code: 'EISDIR' }), path);
  }
  return fd;
}

function readExactly(fd: number, buffer: Uint8Array, position: number, path: string): void {
  let done = 0;
  try {
    while (done < buffer.length) {
      const count = readSync(fd, buffer, done, buffer.length - done, position + done);
      if (count === 0) throw new UserError(`${path}: file is truncated (it ended while being read)`);
      done += count;
    }
  } catch (error) {
    throw error instanceof UserError ? error : describeReadError(error, path);
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
function assertUsableFloats(view: DataView, layout: WavLayout, firstFrame: number, fileLabel: string): void {
  const isDouble = layout.format === 'float64';
  const sampleCount = layout.frames * layout.channelCount;
  for (let k = 0; k < sampleCount; k++) {
    const offset = layout.dataOffset + k * layout.bytesPerSample;
    const value = isDouble ? view.getFloat64(offset, true) : view.getFloat32(offset, true);
    if (!(Math.abs(value) <= FLOAT32_MAX)) {
      const frame = firstFrame + Math.floor(k / layout.channelCount);
      const channel = (k % layout.channelCount) + 1;
      throw new UserError(
        `${fileLabel}: invalid float sample (${value}) at frame index ${frame}, channel ${channel} of ${layout.channelCount}; ` +
          'samples must be finite and within the 32-bit float range',
      );
    }
  }
}
