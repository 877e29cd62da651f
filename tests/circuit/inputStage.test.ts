import { describe, expect, it } from 'vitest';
import { createInputStage, designInputStage, inputStageSmallSignal } from '../../src/circuit/inputStage.js';
import { analogResponse, digitalResponse, magnitudeDb, phaseDegrees } from '../../src/dsp/bilinear.js';
import type { CircuitContext, InputStage } from '../../src/design/types.js';
import { UserError } from '../../src/errors.js';
import { expectClose } from '../helpers/expectClose.js';
import { sineGainDb } from '../helpers/sineFit.js';

const ctx: CircuitContext = { sampleRate: 48000, supplyVolts: 9, temperatureC: 25 };
const spec: InputStage<number> = { id: 'in', type: 'input', series: 10e3, coupling: 10e-9, pulldown: 100e3 };

/**
 * Textbook voltage divider (e.g. Horowitz & Hill, The Art of Electronics, 3rd ed., sec. 1.7): the
 * pull-down Rp against Rs + 1/(jwC) gives |H| = w Rp C / sqrt(1 + (w (Rs + Rp) C)^2) and a phase
 * lead of 90 deg - atan(w (Rs + Rp) C).
 */
function textbook(hz: number): { db: number; degrees: number } {
  const w = 2 * Math.PI * hz;
  const x = w * (spec.series + spec.pulldown) * spec.coupling;
  return {
    db: 20 * Math.log10((w * spec.pulldown * spec.coupling) / Math.sqrt(1 + x * x)),
    degrees: 90 - (Math.atan(x) * 180) / Math.PI,
  };
}

describe('input stage', () => {
  const cornerHz = 1 / (2 * Math.PI * (spec.series + spec.pulldown) * spec.coupling); // 144.7 Hz

  it('analog H(s) matches the divider formula exactly', () => {
    const tf = inputStageSmallSignal(spec, ctx);
    for (const hz of [5, cornerHz, 1000, 15000]) {
      const h = analogResponse(tf, hz);
      expectClose(magnitudeDb(h), textbook(hz).db, { atol: 1e-9 });
      expectClose(phaseDegrees(h), textbook(hz).degrees, { atol: 1e-9 });
    }
  });

  it('digital response follows the divider formula within 0.01 dB from 20 Hz to 10 kHz', () => {
    const design = designInputStage(spec, ctx);
    for (const hz of [20, 50, cornerHz, 500, 2000, 10000]) {
      expectClose(magnitudeDb(digitalResponse(design, hz)), textbook(hz).db, { atol: 0.01 });
    }
    // Pre-warped at the corner: exact there, -3.01 dB below the passband gain Rp / (Rs + Rp).
    expectClose(magnitudeDb(digitalResponse(design, cornerHz)), textbook(cornerHz).db, { atol: 1e-9 });
  });

  it('the processor realises the design (1 kHz sine, steady state)', () => {
    const stage = createInputStage(designInputStage(spec, ctx));
    expectClose(sineGainDb((b) => stage.process(b), 1000, ctx.sampleRate), textbook(1000).db, { atol: 0.01 });
    expect(stage.latencySamples).toBe(0);
  });

  it('a missing series resistor (0) is a plain high-pass at 1/(2 pi Rp C)', () => {
    const design = designInputStage({ ...spec, series: 0 }, ctx);
    const fc = 1 / (2 * Math.PI * spec.pulldown * spec.coupling);
    expectClose(magnitudeDb(digitalResponse(design, fc)), 20 * Math.log10(Math.SQRT1_2), { atol: 1e-9 });
  });

  it('rejects a zero coupling capacitor', () => {
    expect(() => designInputStage({ ...spec, coupling: 0 }, ctx)).toThrow(UserError);
  });
});
