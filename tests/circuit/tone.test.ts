import { describe, expect, it } from 'vitest';
import { createToneStage, designToneStage, toneStageSmallSignal } from '../../src/circuit/tone.js';
import { analogResponse, digitalResponse, magnitudeDb } from '../../src/dsp/bilinear.js';
import type { CircuitContext, ToneStage } from '../../src/design/types.js';
import { expectClose } from '../helpers/expectClose.js';
import { sineGainDb } from '../helpers/sineFit.js';

const HALF_POWER_DB = 20 * Math.log10(Math.SQRT1_2); // textbook first-order RC: |H| = 1/sqrt(2) at the corner

describe('tone stage', () => {
  // 1k fixed + 20k pot at full, 22n: corner 1 / (2 pi 21k 22n) = 344.5 Hz.
  const spec: ToneStage<number> = { id: 'tone', type: 'tone', r: 21e3, cap: 22e-9 };
  const cornerHz = 1 / (2 * Math.PI * spec.r * spec.cap);

  for (const sampleRate of [44100, 96000]) {
    it(`low-pass corner is -3.01 dB at 1/(2 pi R C) at ${sampleRate} Hz`, () => {
      const ctx: CircuitContext = { sampleRate, supplyVolts: 9, temperatureC: 25 };
      const design = designToneStage(spec, ctx);
      expectClose(magnitudeDb(digitalResponse(design, cornerHz)), HALF_POWER_DB, { atol: 1e-9 });
      expectClose(magnitudeDb(digitalResponse(design, 0)), 0, { atol: 1e-12 });
      const stage = createToneStage(design);
      expectClose(sineGainDb((b) => stage.process(b), cornerHz, sampleRate), HALF_POWER_DB, { atol: 0.01 });
    });
  }

  it('analog H(s) is 1 / (1 + jwRC): -20 dB/decade well above the corner (textbook)', () => {
    const tf = toneStageSmallSignal(spec);
    const hz = 100 * cornerHz;
    expectClose(magnitudeDb(analogResponse(tf, hz)), -10 * Math.log10(1 + 100 * 100), { atol: 1e-9 });
  });

  it('accepts a corner above half the sample rate as a stable, nearly flat section', () => {
    const ctx: CircuitContext = { sampleRate: 44100, supplyVolts: 9, temperatureC: 25 };
    const design = designToneStage({ ...spec, r: 100, cap: 1e-9 }, ctx); // fc = 1.59 MHz
    expect(Math.abs(design.a[1])).toBeLessThan(1);
    // DC gain of 1 / (1 + s R C) is exactly 1: sum(b) / sum(a) = 1.
    expectClose(design.b.reduce((x, y) => x + y, 0) / design.a.reduce((x, y) => x + y, 0), 1, { rtol: 1e-12 });
  });
});
