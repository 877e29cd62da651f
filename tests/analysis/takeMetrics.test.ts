import { describe, it } from 'vitest';
import { longTermSpectrum } from '../../src/analysis/analyzeTake.js';
import { spectralCentroidHz } from '../../src/analysis/takeMetrics.js';
import { expectClose } from '../helpers/expectClose.js';

const RATE = 48000;

/** The centroid of a signal's long-term spectrum, as compare measures a written take. */
function centroidHz(signal: Float64Array): number {
  const spectrum = longTermSpectrum(signal, RATE);
  return (spectrum && spectralCentroidHz(spectrum)) ?? NaN;
}

function tones(parts: { hz: number; amplitude: number }[], seconds = 2): Float64Array {
  const out = new Float64Array(seconds * RATE);
  for (let n = 0; n < out.length; n++) {
    for (const { hz, amplitude } of parts) out[n] += amplitude * Math.sin((2 * Math.PI * hz * n) / RATE);
  }
  return out;
}

describe('spectralCentroidHz', () => {
  it('is the frequency of a single tone', () => {
    // Centroid sum f P(f) / sum P(f) of a one-line spectrum is that line (definition).
    expectClose(centroidHz(tones([{ hz: 1000, amplitude: 0.5 }])), 1000, { rtol: 0.005 });
  });

  it('is the power-weighted mean frequency of two tones', () => {
    // Hand calculation: equal powers at 500 and 2000 Hz -> (500 + 2000) / 2 = 1250 Hz;
    // powers 1 : 4 (amplitudes 0.1 : 0.2) at 500 and 2000 Hz -> (500 + 4 * 2000) / 5 = 1700 Hz.
    expectClose(centroidHz(tones([{ hz: 500, amplitude: 0.3 }, { hz: 2000, amplitude: 0.3 }])), 1250, { rtol: 0.005 });
    expectClose(centroidHz(tones([{ hz: 500, amplitude: 0.1 }, { hz: 2000, amplitude: 0.2 }])), 1700, { rtol: 0.005 });
  });
});
