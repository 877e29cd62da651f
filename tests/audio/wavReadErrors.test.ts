/**
 * Every bad WAV input gives one UserError line that names the file and the problem.
 * Format tags (mmreg.h, from memory): 0x0001 PCM, 0x0002 Microsoft ADPCM, 0x0003 IEEE float,
 * 0x0006 A-law, 0x0007 mu-law, 0x0011 IMA ADPCM, 0xFFFE WAVE_FORMAT_EXTENSIBLE.
 * Layout: Microsoft/IBM "Multimedia Programming Interface and Data Specifications 1.0" (1991, from memory).
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, test } from 'vitest';
import { readWavFile } from '../../src/audio/wavRead.js';
import { UserError } from '../../src/errors.js';
import { chunk, extensibleFmtBody, float32Bytes, float64Bytes, fmtBody, int16Bytes, riffWave, simpleWav } from './wavBytes.js';

const folder = mkdtempSync(join(tmpdir(), 'clipbench-badwav-'));
afterAll(() => rmSync(folder, { recursive: true, force: true }));

const pcm16Mono = { formatTag: 1, channels: 1, sampleRate: 48_000, bitsPerSample: 16 };
const goodData = int16Bytes([0, 1000, -1000, 0]);

async function expectUserError(name: string, bytes: Uint8Array | string | null, ...problems: RegExp[]): Promise<void> {
  const path = join(folder, name);
  if (bytes !== null) writeFileSync(path, bytes);
  const error = await readWavFile(path).then(
    () => undefined,
    (caught: unknown) => caught,
  );
  expect(error, `${name} should be refused`).toBeInstanceOf(UserError);
  const message = (error as UserError).message;
  expect(message).toContain(path);
  expect(message).not.toContain('\n');
  for (const problem of problems) expect(message).toMatch(problem);
}

describe('files that are not WAV or are damaged', () => {
  test('missing file', () => expectUserError('missing.wav', null, /not found/));

  test('a folder', async () => {
    mkdirSync(join(folder, 'folder.wav'));
    await expectUserError('folder.wav', null, /folder/);
  });

  test('empty file', () => expectUserError('empty.wav', new Uint8Array(0), /empty/));

  test('text file', () => expectUserError('notes.wav', 'these are my notes, not audio\n', /not a RIFF\/WAVE file/));

  test('RIFF of another form type (AVI)', () =>
    expectUserError('movie.wav', riffWave([chunk('fmt ', fmtBody(pcm16Mono))], 'AVI '), /not a RIFF\/WAVE file/));

  test('header cut short', () => expectUserError('short.wav', simpleWav(pcm16Mono, goodData).slice(0, 10), /truncated/, /10 bytes/));

  test('data chunk cut short', () => {
    const whole = simpleWav(pcm16Mono, int16Bytes(new Array(100).fill(5)));
    return expectUserError('cut.wav', whole.slice(0, whole.length - 50), /truncated/, /"data" chunk/);
  });

  test('no fmt chunk', () => expectUserError('nofmt.wav', riffWave([chunk('data', goodData)]), /no "fmt " chunk/));

  test('no data chunk', () => expectUserError('nodata.wav', riffWave([chunk('fmt ', fmtBody(pcm16Mono))]), /no "data" chunk/));

  test('fmt chunk too short', () => expectUserError('shortfmt.wav', riffWave([chunk('fmt ', fmtBody(pcm16Mono).slice(0, 12)), chunk('data', goodData)]), /too short/));

  test('block align contradicting channels and bits', () =>
    expectUserError('align.wav', simpleWav({ ...pcm16Mono, blockAlign: 4 }, goodData), /block align is 4 bytes, expected 2/));

  test('data ending inside a frame', () =>
    expectUserError('partial.wav', simpleWav({ ...pcm16Mono, channels: 2 }, [...goodData, 0, 0]), /ends inside a frame/));
});

describe('unsupported encodings', () => {
  test('A-law', () => expectUserError('alaw.wav', simpleWav({ ...pcm16Mono, formatTag: 0x0006, bitsPerSample: 8 }, [1, 2]), /A-law/, /0x0006/));

  test('IMA ADPCM', () => expectUserError('ima.wav', simpleWav({ ...pcm16Mono, formatTag: 0x0011, bitsPerSample: 4, blockAlign: 256 }, goodData), /IMA ADPCM/));

  test('Microsoft ADPCM', () => expectUserError('msadpcm.wav', simpleWav({ ...pcm16Mono, formatTag: 0x0002, bitsPerSample: 4, blockAlign: 256 }, goodData), /Microsoft ADPCM/));

  test('an unknown tag', () => expectUserError('odd.wav', simpleWav({ ...pcm16Mono, formatTag: 0x1234 }, goodData), /unsupported encoding/, /0x1234/));

  test('12-bit PCM', () => expectUserError('pcm12.wav', simpleWav({ ...pcm16Mono, bitsPerSample: 12, blockAlign: 2 }, goodData), /12-bit PCM/));

  test('16-bit float', () => expectUserError('f16.wav', simpleWav({ ...pcm16Mono, formatTag: 3 }, goodData), /16-bit float/));

  test('WAVE_FORMAT_EXTENSIBLE carrying A-law', () =>
    expectUserError('extalaw.wav', riffWave([chunk('fmt ', extensibleFmtBody({ channels: 1, sampleRate: 48_000, bitsPerSample: 8 }, 0x0006)), chunk('data', [1, 2])]), /A-law/));

  test('WAVE_FORMAT_EXTENSIBLE with a foreign sub-format GUID', () => {
    const guid = [0x11, 0x22, 0x33, 0x44, 0x55, 0x66, 0x77, 0x88, 0x99, 0xaa, 0xbb, 0xcc, 0xdd, 0xee];
    return expectUserError('extguid.wav', riffWave([chunk('fmt ', extensibleFmtBody({ channels: 1, sampleRate: 48_000, bitsPerSample: 16 }, 0x0001, guid)), chunk('data', goodData)]), /sub-format GUID/);
  });

  test('big-endian RIFX', () => {
    const bytes = simpleWav(pcm16Mono, goodData);
    bytes.set([0x52, 0x49, 0x46, 0x58], 0); // "RIFX"
    return expectUserError('rifx.wav', bytes, /RIFX/);
  });
});

describe('valid containers with unusable audio', () => {
  test('zero frames', () => expectUserError('zero.wav', simpleWav(pcm16Mono, []), /0 frames/));

  test('more than two channels', () =>
    expectUserError('surround.wav', simpleWav({ ...pcm16Mono, channels: 6 }, int16Bytes([1, 2, 3, 4, 5, 6])), /6 channels/, /mono or stereo/));

  test('zero channels', () => expectUserError('nochannels.wav', simpleWav({ ...pcm16Mono, channels: 0, blockAlign: 0 }, goodData), /0 channels/));

  test('sample rate below the accepted range', () =>
    expectUserError('phone.wav', simpleWav({ ...pcm16Mono, sampleRate: 8_000 }, goodData), /8000 Hz/, /44100\.\.192000 Hz/));

  test('sample rate above the accepted range', () =>
    expectUserError('fast.wav', simpleWav({ ...pcm16Mono, sampleRate: 384_000 }, goodData), /384000 Hz/, /44100\.\.192000 Hz/));

  test('NaN in a 32-bit float file names the first bad frame', () =>
    expectUserError('nan.wav', simpleWav({ ...pcm16Mono, formatTag: 3, bitsPerSample: 32 }, float32Bytes([0, 0.5, 0.25, Number.NaN, Number.NaN])), /NaN/, /frame index 3/));

  test('infinity in the second channel of a stereo float file', () =>
    expectUserError('inf.wav', simpleWav({ ...pcm16Mono, formatTag: 3, channels: 2, bitsPerSample: 32 }, float32Bytes([0, 0, 0.1, -Infinity])), /Infinity/, /frame index 1, channel 2/));

  test('a 64-bit float value beyond the 32-bit float range', () =>
    expectUserError('huge.wav', simpleWav({ ...pcm16Mono, formatTag: 3, bitsPerSample: 64 }, float64Bytes([0, 1e300])), /1e\+300/, /frame index 1/));
});
