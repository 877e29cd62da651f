import { describe, expect, it } from 'vitest';
import { createRcFilter, designRcFilter, rcFilterSmallSignal } from '../../src/circuit/rcFilter.js';
import { analogResponse, digitalResponse, magnitudeDb } from '../../src/dsp/bilinear.js';
import type { CircuitContext, RcStage } from '../../src/design/types.js';
import { UserError } from '../../src/errors.js';
import { expectClose } from '../helpers/expectClose.js';
import { sineGainDb } from '../helpers/sineFit.js';

const ctx: CircuitContext = { sampleRate: 48000, supplyVolts: 9, temperatureC: 25 };
// Corner 1 / (2 pi R C) with R = 10k, C = 100n: 159.15 Hz.
const r = 10e3;
const c = 100e-9;
const cornerHz = 1 / (2 * Math.PI * r * c);
const HALF_POWER_DB = 20 * Math.log10(Math.SQRT1_2); // -3.0103 dB: |H(j wc)| = 1/sqrt(2), textbook first-order RC.

function stage(type: 'lowpass' | 'highpass'): RcStage<number> {
  return { id: type, type, r, c };
}

describe('RC sections', () => {
  it('high-pass is -3.01 dB at 1/(2 pi R C) (textbook first-order RC: |H| = 1/sqrt(2) at the corner)', () => {
    const design = designRcFilter(stage('highpass'), ctx);
    expectClose(magnitudeDb(digitalResponse(design, cornerHz)), HALF_POWER_DB, { atol: 1e-9 });
    const filter = createRcFilter(design);
    expectClose(sineGainDb((b) => filter.process(b), cornerHz, ctx.sampleRate), HALF_POWER_DB, { atol: 0.01 });
  });

  it('low-pass is -3.01 dB at 1/(2 pi R C) and passes DC at unity (textbook first-order RC)', () => {
    const design = designRcFilter(stage('lowpass'), ctx);
    expectClose(magnitudeDb(digitalResponse(design, cornerHz)), HALF_POWER_DB, { atol: 1e-9 });
    expectClose(magnitudeDb(digitalResponse(design, 0)), 0, { atol: 1e-9 });
    const filter = createRcFilter(design);
    expectClose(sineGainDb((b) => filter.process(b), cornerHz, ctx.sampleRate), HALF_POWER_DB, { atol: 0.01 });
  });

  it('high-pass follows |H| = wRC / sqrt(1 + (wRC)^2) (textbook) away from the corner', () => {
    const analogTf = rcFilterSmallSignal(stage('highpass'));
    for (const hz of [20, 100, 1000, 5000]) {
      const wrc = 2 * Math.PI * hz * r * c;
      const textbookDb = 20 * Math.log10(wrc / Math.sqrt(1 + wrc * wrc));
      expectClose(magnitudeDb(analogResponse(analogTf, hz)), textbookDb, { atol: 1e-9 });
      expectClose(magnitudeDb(digitalResponse(designRcFilter(stage('highpass'), ctx), hz)), textbookDb, { atol: 0.01 });
    }
  });

  it('accepts a corner above half the sample rate (stable, plain bilinear) and still names a zero capacitor', () => {
    const tiny: RcStage<number> = { id: 'hp2', type: 'highpass', r: 10, c: 100e-9 }; // 159 kHz
    const design = designRcFilter(tiny, ctx);
    // First-order section: stable when its pole -a1 lies inside the unit circle.
    expect(Math.abs(design.a[1])).toBeLessThan(1);
    expect(() => designRcFilter({ ...tiny, c: 0 }, ctx)).toThrow(UserError);
    expect(() => designRcFilter({ ...tiny, c: 0 }, ctx)).toThrow(/stage "hp2" c/);
  });
});
