/**
 * Walks the RIFF/WAVE chunk list and validates the header before any sample is read, so every
 * malformed file fails with one clear line naming the file and the problem.
 * Container facts: see `wavFormat.ts`.
 */
import { UserError } from '../errors.js';
import {
  MAX_CHANNELS,
  MAX_SAMPLE_RATE_HZ,
  MIN_SAMPLE_RATE_HZ,
  SUBFORMAT_GUID_TAIL,
  UNSUPPORTED_FORMAT_NAMES,
  WAVE_FORMAT_EXTENSIBLE,
  WAVE_FORMAT_IEEE_FLOAT,
  WAVE_FORMAT_PCM,
  type WavSampleFormat,
} from './wavFormat.js';

/** Where the samples are and how to read them. */
export interface WavLayout {
  format: WavSampleFormat;
  channelCount: number;
  sampleRate: number;
  bytesPerSample: number;
  /** Bytes per interleaved frame (all channels). */
  blockAlign: number;
  dataOffset: number;
  frames: number;
}

interface FmtFields {
  formatTag: number;
  channelCount: number;
  sampleRate: number;
  blockAlign: number;
  bitsPerSample: number;
}

const RIFF_HEADER_BYTES = 12;
const CHUNK_HEADER_BYTES = 8;
const FMT_MIN_BYTES = 16;
const FMT_EXTENSIBLE_MIN_BYTES = 40;
const SUPPORTED_TEXT = 'clipbench reads 8/16/24/32-bit PCM and 32/64-bit float WAV';

function fourCc(bytes: Uint8Array, offset: number): string {
  return String.fromCharCode(bytes[offset], bytes[offset + 1], bytes[offset + 2], bytes[offset + 3]);
}

function printable(id: string): string {
  return JSON.stringify(id);
}

/** Random access to a file's bytes: a whole file in memory, or reads from an open file. */
export interface ByteSource {
  readonly size: number;
  /** `length` bytes from `offset` (the caller stays inside `size`). */
  read(offset: number, length: number): Uint8Array;
}

export function memorySource(bytes: Uint8Array): ByteSource {
  return { size: bytes.length, read: (offset, length) => bytes.subarray(offset, offset + length) };
}

function viewOf(bytes: Uint8Array): DataView {
  return new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

/**
 * Parses and validates the header of a WAV file, reading only chunk headers and the "fmt " body
 * from `source`. `fileLabel` names the file in errors.
 */
export function parseWavLayout(source: ByteSource, fileLabel: string): WavLayout {
  const fail = (problem: string): never => {
    throw new UserError(`${fileLabel}: ${problem}`);
  };
  const size = source.size;
  if (size === 0) fail('file is empty (0 bytes), not a WAV file');
  if (size < RIFF_HEADER_BYTES) {
    fail(`file is truncated: ${size} bytes, shorter than a RIFF/WAVE header (${RIFF_HEADER_BYTES} bytes)`);
  }
  const bytes = source.read(0, RIFF_HEADER_BYTES);
  const riffId = fourCc(bytes, 0);
  if (riffId === 'RIFX') fail('big-endian RIFX WAV is not supported; save it as a standard little-endian WAV');
  if (riffId === 'RF64') fail('RF64 (64-bit WAV) is not supported; save it as a standard WAV under 4 GB');
  if (riffId !== 'RIFF' || fourCc(bytes, 8) !== 'WAVE') {
    fail('not a RIFF/WAVE file (the header does not start with "RIFF" ... "WAVE")');
  }

  let fmt: FmtFields | undefined;
  let dataOffset = -1;
  let dataBytes = 0;
  let position = RIFF_HEADER_BYTES;
  while ((fmt === undefined || dataOffset < 0) && position + CHUNK_HEADER_BYTES <= size) {
    const header = source.read(position, CHUNK_HEADER_BYTES);
    const chunkId = fourCc(header, 0);
    const chunkBytes = viewOf(header).getUint32(4, true);
    const bodyOffset = position + CHUNK_HEADER_BYTES;
    const availableBytes = size - bodyOffset;
    if (chunkBytes > availableBytes) {
      fail(
        `file is truncated: the ${printable(chunkId)} chunk at byte ${position} declares ${chunkBytes} bytes ` +
          `but only ${availableBytes} remain`,
      );
    }
    if (chunkId === 'fmt ') {
      fmt = readFmt(viewOf(source.read(bodyOffset, Math.min(chunkBytes, FMT_EXTENSIBLE_MIN_BYTES))), 0, chunkBytes, fail);
    }
    if (chunkId === 'data') {
      dataOffset = bodyOffset;
      dataBytes = chunkBytes;
    }
    position = bodyOffset + chunkBytes + (chunkBytes & 1); // chunks are padded to even length
  }
  if (fmt === undefined) {
    return fail(
      dataOffset < 0 && position < size
        ? `file is truncated: ${size - position} stray bytes where a chunk header was expected, and no "fmt " chunk`
        : 'no "fmt " chunk (the format description is missing)',
    );
  }
  if (dataOffset < 0) return fail('no "data" chunk (the file holds no audio samples)');

  const format = sampleFormatOf(fmt, fail);
  const { channelCount, sampleRate } = fmt;
  if (channelCount === 0) fail('header declares 0 channels');
  if (channelCount > MAX_CHANNELS) {
    fail(`has ${channelCount} channels; clipbench reads mono or stereo (1 or 2 channels)`);
  }
  if (sampleRate < MIN_SAMPLE_RATE_HZ || sampleRate > MAX_SAMPLE_RATE_HZ) {
    fail(`sample rate ${sampleRate} Hz is outside the accepted range ${MIN_SAMPLE_RATE_HZ}..${MAX_SAMPLE_RATE_HZ} Hz`);
  }
  const bytesPerSample = fmt.bitsPerSample / 8;
  const expectedBlockAlign = channelCount * bytesPerSample;
  if (fmt.blockAlign !== expectedBlockAlign) {
    fail(
      `inconsistent header: block align is ${fmt.blockAlign} bytes, expected ${expectedBlockAlign} ` +
        `for ${channelCount} channel(s) of ${fmt.bitsPerSample} bits`,
    );
  }
  const frames = Math.floor(dataBytes / expectedBlockAlign);
  if (frames === 0) fail('has no audio: the "data" chunk holds 0 frames');
  if (dataBytes % expectedBlockAlign !== 0) {
    fail(
      `"data" chunk ends inside a frame (${dataBytes} bytes is not a multiple of the ${expectedBlockAlign}-byte frame); ` +
        'the file is truncated or corrupt',
    );
  }
  return { format, channelCount, sampleRate, bytesPerSample, blockAlign: expectedBlockAlign, dataOffset, frames };
}

function readFmt(view: DataView, offset: number, chunkBytes: number, fail: (problem: string) => never): FmtFields {
  if (chunkBytes < FMT_MIN_BYTES) fail(`"fmt " chunk is too short (${chunkBytes} bytes, need at least ${FMT_MIN_BYTES})`);
  const fields: FmtFields = {
    formatTag: view.getUint16(offset, true),
    channelCount: view.getUint16(offset + 2, true),
    sampleRate: view.getUint32(offset + 4, true),
    blockAlign: view.getUint16(offset + 12, true),
    bitsPerSample: view.getUint16(offset + 14, true),
  };
  if (fields.formatTag !== WAVE_FORMAT_EXTENSIBLE) return fields;
  if (chunkBytes < FMT_EXTENSIBLE_MIN_BYTES) {
    fail(`"fmt " chunk of a WAVE_FORMAT_EXTENSIBLE file is too short (${chunkBytes} bytes, need ${FMT_EXTENSIBLE_MIN_BYTES})`);
  }
  const guidOffset = offset + 24;
  for (let i = 0; i < SUBFORMAT_GUID_TAIL.length; i++) {
    if (view.getUint8(guidOffset + 2 + i) !== SUBFORMAT_GUID_TAIL[i]) {
      fail(`unsupported encoding: WAVE_FORMAT_EXTENSIBLE with a non-standard sub-format GUID; ${SUPPORTED_TEXT}`);
    }
  }
  return { ...fields, formatTag: view.getUint16(guidOffset, true) };
}

function sampleFormatOf(fmt: FmtFields, fail: (problem: string) => never): WavSampleFormat {
  const bits = fmt.bitsPerSample;
  if (fmt.formatTag === WAVE_FORMAT_PCM) {
    if (bits === 8) return 'pcm8';
    if (bits === 16) return 'pcm16';
    if (bits === 24) return 'pcm24';
    if (bits === 32) return 'pcm32';
    return fail(`unsupported encoding: ${bits}-bit PCM; ${SUPPORTED_TEXT}`);
  }
  if (fmt.formatTag === WAVE_FORMAT_IEEE_FLOAT) {
    if (bits === 32) return 'float32';
    if (bits === 64) return 'float64';
    return fail(`unsupported encoding: ${bits}-bit float; ${SUPPORTED_TEXT}`);
  }
  const tagHex = `0x${fmt.formatTag.toString(16).padStart(4, '0')}`;
  const name = UNSUPPORTED_FORMAT_NAMES.get(fmt.formatTag);
  const encoding = name === undefined ? `format tag ${tagHex}` : `${name} (format tag ${tagHex})`;
  return fail(`unsupported encoding: ${encoding}; ${SUPPORTED_TEXT}`);
}
