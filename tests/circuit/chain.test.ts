import { describe, expect, it } from 'vitest';
import { buildChain } from '../../src/circuit/chain.js';
import { OVERSAMPLE_FACTORS } from '../../src/dsp/oversampler.js';
import { renderChannel } from '../../src/circuit/renderChannel.js';
import type { Design } from '../../src/design/types.js';
import { IDEAL_OPAMP } from './parts.js';

function unityBufferDesign(): Design<number> {
  return {
    name: 'buffer',
    supplyVolts: 9,
    temperatureC: 25,
    knobs: {},
    stages: [
      { id: 'buf', type: 'gain', opamp: IDEAL_OPAMP, rf: 0, rg: null, cg: null, cf: null, feedbackDiode: null, feedbackUp: 0, feedbackDown: 0 },
    ],
  };
}

/** Band-limited test signal: a few sines inside 20 Hz-20 kHz, 0.3 V peak in all. */
function bandLimitedSignal(length: number, sampleRate: number): Float64Array {
  const out = new Float64Array(length);
  const tones = [
    [110, 0.1],
    [1234.5, 0.1],
    [7000, 0.05],
    [15000, 0.05],
  ];
  for (let n = 0; n < length; n++) {
    for (const [hz, amp] of tones) out[n] += amp * Math.sin((2 * Math.PI * hz * n) / sampleRate);
  }
  return out;
}

function nullDb(a: Float64Array, b: Float64Array, from: number, to: number): number {
  let err = 0;
  let ref = 0;
  for (let i = from; i < to; i++) {
    err += (a[i] - b[i]) ** 2;
    ref += b[i] ** 2;
  }
  return 10 * Math.log10(err / ref);
}

describe('chain', () => {
  it.each(OVERSAMPLE_FACTORS)('unity buffer returns its input, aligned, at %ix oversampling', (factor) => {
    // Issue requirement: a unity design returns its input (null below -80 dB in band).
    const sampleRate = 48000;
    const input = bandLimitedSignal(24000, sampleRate);
    const chain = buildChain(unityBufferDesign(), { sampleRate, oversample: factor });
    const output = renderChannel(chain, input);
    expect(output.length).toBe(input.length);
    // Skip the filters' start-up edge (the signal starts abruptly at full level).
    expect(nullDb(output, input, 2000, 22000)).toBeLessThan(-80);
  });

  it('gives the same output for the same input (deterministic)', () => {
    const sampleRate = 44100;
    const input = bandLimitedSignal(5000, sampleRate);
    const chain = buildChain(unityBufferDesign(), { sampleRate, oversample: 4 });
    const first = renderChannel(chain, input);
    const second = renderChannel(chain, input);
    expect(Buffer.from(first.buffer).equals(Buffer.from(second.buffer))).toBe(true);
  });
});

describe('end-stop settings', () => {
  it('renders a tone pot at 0 ohm (corner at infinity) as a flat stage', () => {
    const sampleRate = 48000;
    const input = bandLimitedSignal(4800, sampleRate);
    const design: Design<number> = {
      name: 'tone-open',
      supplyVolts: 9,
      temperatureC: 25,
      knobs: {},
      stages: [{ id: 'tone', type: 'tone', r: 0, cap: 22e-9 }],
    };
    const output = renderChannel(buildChain(design, { sampleRate, oversample: 1 }), input);
    // H(s) = 1 / (1 + s R C) = 1 for R = 0 (first-order RC low-pass, any circuits text).
    expect(output).toEqual(input);
  });

  it('renders a corner above Nyquist without refusing the design', () => {
    const sampleRate = 44100;
    const input = bandLimitedSignal(4410, sampleRate);
    const design: Design<number> = {
      name: 'lp-high',
      supplyVolts: 9,
      temperatureC: 25,
      knobs: {},
      stages: [{ id: 'lp', type: 'lowpass', r: 100, c: 1e-9 }], // fc = 1.59 MHz
    };
    const output = renderChannel(buildChain(design, { sampleRate, oversample: 1 }), input);
    // 1.59 MHz corner: |H| at 15 kHz is 1/sqrt(1 + (15e3/1.59e6)^2), within 0.001 dB of 1.
    expect(nullDb(output, input, 100, 4400)).toBeLessThan(-40);
  });
});
