import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, test } from 'vitest';
import { decodeWav, readWavFile } from '../../src/audio/wavRead.js';
import { encodeWav, writeWavFile, type WavOutputBits } from '../../src/audio/wavWrite.js';
import { referenceDecode, referenceEncode } from './referenceCodecs.js';
import { chunk, extensibleFmtBody, float64Bytes, fmtBody, riffWave, simpleWav } from './wavBytes.js';

const folder = mkdtempSync(join(tmpdir(), 'clipbench-wav-'));
afterAll(() => rmSync(folder, { recursive: true, force: true }));

/** Deterministic test signal in [-1, 1): a sine plus seeded noise, with both full-scale extremes. */
function testSignal(frames: number, seed: number): Float64Array {
  const out = new Float64Array(frames);
  let state = seed >>> 0;
  for (let i = 0; i < frames; i++) {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0; // Numerical Recipes LCG, fixed seed
    out[i] = 0.6 * Math.sin(0.01 * i * (seed + 1)) + 0.39 * (state / 2 ** 32 - 0.5) * 2;
  }
  out[0] = -1;
  out[1] = 32767 / 32768; // largest 16-bit code, inside every format tested
  return out;
}

const BITS: WavOutputBits[] = ['16', '24', '32f'];
const RATES = [44_100, 48_000, 96_000];

describe('WAV write then read', () => {
  for (const bits of BITS) {
    for (const sampleRate of RATES) {
      for (const channelCount of [1, 2]) {
        test(`${bits} bit, ${sampleRate} Hz, ${channelCount} channel(s)`, async () => {
          const channels = Array.from({ length: channelCount }, (_, c) => testSignal(1001, c + 7));
          const path = join(folder, `rt-${bits}-${sampleRate}-${channelCount}.wav`);
          await writeWavFile(path, channels, sampleRate, bits);
          const wav = await readWavFile(path);
          expect(wav.sampleRate).toBe(sampleRate);
          expect(wav.frames).toBe(1001);
          expect(wav.channels.length).toBe(channelCount);
          expect(wav.format).toBe(bits === '16' ? 'pcm16' : bits === '24' ? 'pcm24' : 'float32');
          // Uniform quantiser: rounding to nearest errs by at most half a step, 2^-(bits-1) / 2.
          const allowed = bits === '32f' ? 0 : 0.5 / 2 ** (Number(bits) - 1);
          for (let c = 0; c < channelCount; c++) {
            let worst = 0;
            for (let i = 0; i < 1001; i++) {
              // 32-bit float stores exactly what Math.fround gives (IEEE 754 binary32).
              const expected = bits === '32f' ? Math.fround(channels[c][i]) : channels[c][i];
              worst = Math.max(worst, Math.abs(wav.channels[c][i] - expected));
            }
            expect(worst).toBeLessThanOrEqual(allowed);
          }
        });
      }
    }
  }

  test('the output is written atomically: no temporary file is left', () => {
    expect(readdirSync(folder).filter((name) => name.endsWith('.tmp'))).toEqual([]);
  });
});

describe('bytes against the npm reference codecs', () => {
  for (const bits of BITS) {
    test(`${bits}: encodeWav gives the same bytes as wav-encoder (symmetric scaling)`, () => {
      const channels = [0, 1].map((c) => Float32Array.from(testSignal(1000, c + 3)));
      channels[0][5] = 1.7; // over full scale: clipped to the largest code
      channels[1][5] = -3;
      const ours = encodeWav(channels, 48_000, bits);
      expect(Buffer.from(ours).equals(Buffer.from(referenceEncode(channels, 48_000, bits)))).toBe(true);
    });

    test(`${bits}: our decoder agrees with wav-decoder`, () => {
      const channels = [0, 1].map((c) => testSignal(1000, c + 11));
      for (const channel of channels) channel[0] = -0.999; // wav-decoder misreads the 24-bit code -2^23: keep clear of it
      const bytes = encodeWav(channels, 44_100, bits);
      const ours = decodeWav(bytes, 'memory.wav');
      const reference = referenceDecode(bytes);
      expect(reference.sampleRate).toBe(44_100);
      for (let c = 0; c < 2; c++) expect(Array.from(ours.channels[c])).toEqual(Array.from(reference.channelData[c]));
    });
  }
});

describe('full-scale clipping and determinism', () => {
  test('PCM clips at full scale: +1 and above give the largest positive code, -1 and below the smallest', () => {
    const bytes = encodeWav([Float64Array.from([1, 2, -1, -2, 0.5 / 32768, -0.5 / 32768])], 48_000, '16');
    const codes = new Int16Array(bytes.buffer.slice(44));
    // Two's complement 16-bit range is -32768..32767; Math.round rounds halves up (ECMA-262).
    expect(Array.from(codes)).toEqual([32767, 32767, -32768, -32768, 1, 0]);
  });

  test('same samples give identical bytes', () => {
    const signal = [testSignal(777, 5)];
    expect(Buffer.from(encodeWav(signal, 48_000, '24')).equals(Buffer.from(encodeWav(signal, 48_000, '24')))).toBe(true);
  });

  test('an odd-length data chunk gets its RIFF pad byte and still reads back', () => {
    const bytes = encodeWav([Float64Array.from([0.25, -0.5, 0.75])], 48_000, '24'); // 9 data bytes
    expect(bytes.length).toBe(44 + 9 + 1);
    expect(new DataView(bytes.buffer).getUint32(4, true)).toBe(bytes.length - 8);
    expect(Array.from(decodeWav(bytes, 'odd.wav').channels[0])).toEqual([0.25, -0.5, 0.75]);
  });

  test('non-finite samples are refused by the writer', () => {
    expect(() => encodeWav([Float64Array.from([0, Number.NaN])], 48_000, '16')).toThrow(/NaN at frame 1/);
    expect(() => encodeWav([Float64Array.from([1e39])], 48_000, '32f')).toThrow(/1e\+39 at frame 0/); // beyond binary32 (IEEE 754)
  });
});

describe('formats read from hand-built files', () => {
  test('WAVE_FORMAT_EXTENSIBLE with a PCM sub-format (24-bit stereo)', () => {
    // codes +2^22 and -2^23 in little-endian 3-byte two's complement
    const data = [0x00, 0x00, 0x40, 0x00, 0x00, 0x80];
    const bytes = riffWave([chunk('fmt ', extensibleFmtBody({ channels: 2, sampleRate: 48_000, bitsPerSample: 24 }, 0x0001)), chunk('data', data)]);
    const wav = decodeWav(bytes, 'ext.wav');
    expect(wav.format).toBe('pcm24');
    expect([wav.channels[0][0], wav.channels[1][0]]).toEqual([0.5, -1]);
  });

  test('WAVE_FORMAT_EXTENSIBLE with an IEEE float sub-format', () => {
    const data = Array.from(new Uint8Array(Float32Array.from([0.125, -0.75]).buffer));
    const bytes = riffWave([chunk('fmt ', extensibleFmtBody({ channels: 1, sampleRate: 96_000, bitsPerSample: 32 }, 0x0003)), chunk('data', data)]);
    const wav = decodeWav(bytes, 'extf.wav');
    expect(wav.format).toBe('float32');
    expect(Array.from(wav.channels[0])).toEqual([0.125, -0.75]);
  });

  test('8-bit PCM is offset binary around 128', () => {
    const wav = decodeWav(simpleWav({ formatTag: 1, channels: 1, sampleRate: 44_100, bitsPerSample: 8 }, [0, 128, 192, 255]), 'u8.wav');
    expect(wav.format).toBe('pcm8');
    expect(Array.from(wav.channels[0])).toEqual([-1, 0, 0.5, 127 / 128]);
  });

  test('32-bit PCM', () => {
    const data = [0x00, 0x00, 0x00, 0x80, 0x00, 0x00, 0x00, 0x40]; // -2^31, +2^30
    const wav = decodeWav(simpleWav({ formatTag: 1, channels: 1, sampleRate: 192_000, bitsPerSample: 32 }, data), 'i32.wav');
    expect(wav.format).toBe('pcm32');
    expect(Array.from(wav.channels[0])).toEqual([-1, 0.5]);
  });

  test('64-bit float, stereo', () => {
    const data = float64Bytes([0.5, -0.25, 1.5, 0]);
    const wav = decodeWav(simpleWav({ formatTag: 3, channels: 2, sampleRate: 48_000, bitsPerSample: 64 }, data), 'f64.wav');
    expect(wav.format).toBe('float64');
    expect(Array.from(wav.channels[0])).toEqual([0.5, 1.5]);
    expect(Array.from(wav.channels[1])).toEqual([-0.25, 0]);
  });

  test('other chunks (odd-sized, padded) before and after fmt, and fmt after data, are skipped', () => {
    const fmt = chunk('fmt ', fmtBody({ formatTag: 1, channels: 1, sampleRate: 48_000, bitsPerSample: 16 }));
    const data = chunk('data', [0x00, 0x40, 0x00, 0xc0]);
    const list = chunk('LIST', [0x49, 0x4e, 0x46, 0x4f, 0x21]); // 5 bytes + pad
    for (const order of [[list, fmt, data], [data, list, fmt]]) {
      const wav = decodeWav(riffWave(order), 'chunks.wav');
      expect(Array.from(wav.channels[0])).toEqual([0.5, -0.5]);
    }
  });
});

describe('streamed writing', () => {
  test.each(['16', '24', '32f'] as const)('writeWavFile streams the same bytes as encodeWav (%s-bit, several chunks, odd length)', async (bits: WavOutputBits) => {
    const frames = 150_001; // more than two 65536-frame chunks; odd, so 24-bit mono needs a pad byte
    const samples = new Float32Array(frames);
    for (let i = 0; i < frames; i++) samples[i] = Math.sin(i * 0.01) * 0.9;
    const path = join(folder, `stream-${bits}.wav`);
    await writeWavFile(path, [samples], 48000, bits);
    expect(readFileSync(path).equals(Buffer.from(encodeWav([samples], 48000, bits)))).toBe(true);
  });
});

describe('chunked reading', () => {
  test('readWavFile (read in 1 MiB chunks) gives the same samples as decoding the whole file', async () => {
    const frames = 400_001; // 2.4 MB of 24-bit stereo: several read chunks, the last one partial
    const left = new Float32Array(frames);
    const right = new Float32Array(frames);
    for (let i = 0; i < frames; i++) {
      left[i] = Math.sin(i * 0.003) * 0.8;
      right[i] = Math.cos(i * 0.0071) * 0.5;
    }
    const path = join(folder, 'long-stereo.wav');
    await writeWavFile(path, [left, right], 48000, '24');
    const streamed = await readWavFile(path);
    const whole = decodeWav(readFileSync(path), path);
    expect(streamed.frames).toBe(frames);
    expect(streamed.channels[0]).toEqual(whole.channels[0]);
    expect(streamed.channels[1]).toEqual(whole.channels[1]);
  });

  test('a NaN far into a float file is reported at its true frame index', async () => {
    const frames = 300_000; // 1.2 MB of mono float: the bad sample sits in the second read chunk
    const samples = new Float32Array(frames);
    const bytes = encodeWav([samples], 48000, '32f');
    new DataView(bytes.buffer).setFloat32(44 + 4 * 290_000, Number.NaN, true);
    const path = join(folder, 'late-nan.wav');
    writeFileSync(path, bytes);
    await expect(readWavFile(path)).rejects.toThrow(/frame index 290000/);
  });
});
