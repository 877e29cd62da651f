import { describe, expect, it } from 'vitest';
import { designKWeightingHighpass, designKWeightingShelf, integratedLoudness } from '../../src/dsp/loudness.js';
import { expectClose } from '../helpers/expectClose.js';

const SAMPLE_RATE = 48000;

/**
 * 1 kHz sine, the same in both channels, in sections of [level dBFS (peak), seconds], as the
 * EBU Tech 3341 conformance signals are built.
 */
function sectionedSine(sections: readonly [number, number][]): Float32Array {
  const total = sections.reduce((n, [, seconds]) => n + Math.round(seconds * SAMPLE_RATE), 0);
  const out = new Float32Array(total);
  const w = (2 * Math.PI * 1000) / SAMPLE_RATE;
  let n = 0;
  for (const [dbfs, seconds] of sections) {
    const amplitude = 10 ** (dbfs / 20);
    const end = n + Math.round(seconds * SAMPLE_RATE);
    for (; n < end; n++) out[n] = amplitude * Math.sin(w * n);
  }
  return out;
}

function stereoLoudness(sections: readonly [number, number][]): number {
  const channel = sectionedSine(sections);
  return integratedLoudness([channel, channel], SAMPLE_RATE);
}

describe('K-weighting (ITU-R BS.1770-4, Tables 1 and 2, 48 kHz)', () => {
  it('reproduces the published shelf coefficients', () => {
    const shelf = designKWeightingShelf(SAMPLE_RATE);
    const b = [1.53512485958697, -2.69169618940638, 1.19839281085285];
    const a = [1, -1.69065929318241, 0.73248077421585];
    b.forEach((c, i) => expectClose(shelf.b[i], c, { atol: 1e-6 }));
    a.forEach((c, i) => expectClose(shelf.a[i], c, { atol: 1e-6 }));
  });

  it('reproduces the published high-pass coefficients', () => {
    const highpass = designKWeightingHighpass(SAMPLE_RATE);
    const b = [1, -2, 1];
    const a = [1, -1.99004745483398, 0.99007225036621];
    b.forEach((c, i) => expectClose(highpass.b[i], c, { atol: 1e-6 }));
    a.forEach((c, i) => expectClose(highpass.a[i], c, { atol: 1e-6 }));
  });

  it('keeps the filters stable at other sample rates (poles inside the unit circle)', () => {
    for (const rate of [22050, 44100, 96000, 192000]) {
      for (const tf of [designKWeightingShelf(rate), designKWeightingHighpass(rate)]) {
        // A biquad 1 + a1 z^-1 + a2 z^-2 is stable iff |a2| < 1 and |a1| < 1 + a2 (Jury test).
        expect(Math.abs(tf.a[2])).toBeLessThan(1);
        expect(Math.abs(tf.a[1])).toBeLessThan(1 + tf.a[2]);
      }
    }
  });
});

describe('integratedLoudness against EBU Tech 3341 test signals (stereo 1 kHz sine)', () => {
  it('case 1: -23 dBFS reads -23.0 LUFS (Tech 3341; the 20 s signal is shortened, which a steady tone allows)', () => {
    expectClose(stereoLoudness([[-23, 5]]), -23, { atol: 0.1 });
  });

  it('case 2: -33 dBFS reads -33.0 LUFS (Tech 3341)', () => {
    expectClose(stereoLoudness([[-33, 5]]), -33, { atol: 0.1 });
  });

  // Gating cases 3-5, recalled from memory (Tech 3341 v3), at their full durations: shortening
  // them would give the blocks straddling a level change too much weight.
  it('case 3: -36/-23/-36 dBFS for 10/60/10 s reads -23.0 LUFS (relative gate)', () => {
    expectClose(stereoLoudness([[-36, 10], [-23, 60], [-36, 10]]), -23, { atol: 0.1 });
  });

  it('case 4: -72/-36/-23/-36/-72 dBFS for 10/10/60/10/10 s reads -23.0 LUFS (both gates)', () => {
    expectClose(stereoLoudness([[-72, 10], [-36, 10], [-23, 60], [-36, 10], [-72, 10]]), -23, { atol: 0.1 });
  });

  it('case 5: -26/-20/-26 dBFS for 20.1 s each reads -23.0 LUFS', () => {
    expectClose(stereoLoudness([[-26, 20.1], [-20, 20.1], [-26, 20.1]]), -23, { atol: 0.1 });
  });

  it('reads -Infinity for silence and for a take shorter than one 400 ms block', () => {
    expect(integratedLoudness([new Float32Array(48000)], SAMPLE_RATE)).toBe(-Infinity);
    expect(integratedLoudness([sectionedSine([[-10, 0.3]])], SAMPLE_RATE)).toBe(-Infinity);
  });
});
