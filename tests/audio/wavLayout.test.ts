// The RIFF container counts its size in 32 bits, so a WAV holds at most 4 GiB (Microsoft/IBM
// "Multimedia Programming Interface and Data Specifications 1.0", 1991: chunk sizes are DWORDs).
import { describe, expect, it } from 'vitest';
import { wavLayout } from '../../src/audio/wavWrite.js';
import { UserError } from '../../src/errors.js';

describe('wavLayout', () => {
  it('lays out a stereo 24-bit file: 6 bytes a frame', () => {
    const layout = wavLayout(2, 1001, '24');
    expect(layout.blockAlign).toBe(6);
    expect(layout.dataBytes).toBe(6006);
    expect(layout.padBytes).toBe(0);
  });

  it('refuses, before any rendering, a render past the 4 GiB limit, naming the bits', () => {
    // 2^29 stereo frames of 32-bit float = 4 GiB of audio, just past the limit with the header.
    expect(() => wavLayout(2, 2 ** 29, '32f')).toThrow(UserError);
    expect(() => wavLayout(2, 2 ** 29, '32f')).toThrow(/exceed the 4 GiB RIFF limit; render shorter takes or use fewer bits/);
    expect(wavLayout(2, 2 ** 29, '16').dataBytes).toBe(2 ** 31);
  });
});
