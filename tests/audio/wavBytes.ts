/**
 * Hand-built RIFF/WAVE files for the reader tests, written straight from the container layout in
 * Microsoft/IBM "Multimedia Programming Interface and Data Specifications 1.0" (1991, from memory)
 * and the WAVEFORMATEXTENSIBLE layout (from memory), independently of src/audio/wavWrite.ts.
 */
export interface FmtFields {
  formatTag: number;
  channels: number;
  sampleRate: number;
  bitsPerSample: number;
  /** Defaults to channels * bitsPerSample / 8. */
  blockAlign?: number;
}

function ascii(text: string): number[] {
  return [...text].map((c) => c.charCodeAt(0));
}

function u16(value: number): number[] {
  return [value & 0xff, (value >> 8) & 0xff];
}

function u32(value: number): number[] {
  return [value & 0xff, (value >>> 8) & 0xff, (value >>> 16) & 0xff, (value >>> 24) & 0xff];
}

/** A chunk: id, size, body, pad byte when the body length is odd. */
export function chunk(id: string, body: ArrayLike<number>, declaredSize = body.length): number[] {
  const bytes = [...ascii(id), ...u32(declaredSize), ...Array.from(body)];
  if (body.length % 2 === 1) bytes.push(0);
  return bytes;
}

/** The 16-byte PCMWAVEFORMAT body. */
export function fmtBody(f: FmtFields): number[] {
  const blockAlign = f.blockAlign ?? (f.channels * f.bitsPerSample) / 8;
  return [
    ...u16(f.formatTag),
    ...u16(f.channels),
    ...u32(f.sampleRate),
    ...u32(f.sampleRate * blockAlign),
    ...u16(blockAlign),
    ...u16(f.bitsPerSample),
  ];
}

/** WAVEFORMATEXTENSIBLE body: tag 0xFFFE, cbSize 22, valid bits, channel mask, sub-format GUID. */
export function extensibleFmtBody(f: Omit<FmtFields, 'formatTag'>, subFormatTag: number, guidTail = KSDATAFORMAT_TAIL): number[] {
  const channelMask = f.channels === 1 ? 0x4 : 0x3; // front centre / front left + right
  return [
    ...fmtBody({ ...f, formatTag: 0xfffe }),
    ...u16(22),
    ...u16(f.bitsPerSample),
    ...u32(channelMask),
    ...u16(subFormatTag),
    ...guidTail,
  ];
}

/** {xxxxxxxx-0000-0010-8000-00AA00389B71} after the first two bytes, as stored. */
export const KSDATAFORMAT_TAIL = [0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71];

/** RIFF header around the given chunk bytes. */
export function riffWave(chunks: number[][], formType = 'WAVE'): Uint8Array {
  const body = [...ascii(formType), ...chunks.flat()];
  return Uint8Array.from([...ascii('RIFF'), ...u32(body.length), ...body]);
}

/** A complete file from fmt fields and raw interleaved sample bytes. */
export function simpleWav(f: FmtFields, data: ArrayLike<number>): Uint8Array {
  return riffWave([chunk('fmt ', fmtBody(f)), chunk('data', data)]);
}

export function float32Bytes(values: number[]): number[] {
  return Array.from(new Uint8Array(Float32Array.from(values).buffer));
}

export function float64Bytes(values: number[]): number[] {
  return Array.from(new Uint8Array(Float64Array.from(values).buffer));
}

export function int16Bytes(values: number[]): number[] {
  return Array.from(new Uint8Array(Int16Array.from(values).buffer));
}
