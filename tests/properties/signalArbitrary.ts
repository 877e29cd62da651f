/**
 * fast-check arbitraries for finite test signals in volts: sines, seeded noise, steps, DC,
 * impulses, from 1e-12 V up to 1e6 V, a few thousand samples at most. A signal is a list of
 * segments (so a take can be a sine, then a step, then silence) and is built from its description
 * with a seeded PRNG, so fast-check's shrinking and replay see plain values.
 */
import fc from 'fast-check';

export type Segment =
  | { kind: 'sine'; length: number; amplitude: number; cyclesPerSample: number }
  | { kind: 'noise'; length: number; amplitude: number; seed: number }
  | { kind: 'step'; length: number; amplitude: number; at: number }
  | { kind: 'dc'; length: number; amplitude: number }
  | { kind: 'impulse'; length: number; amplitude: number; at: number };

const amplitude = fc.oneof(
  fc.constantFrom(1e-12, 1e-6, 1e-3, 0.1, 0.5, 1, 3, 10, 1e3, 1e6, -1e6, -1),
  fc.double({ min: -20, max: 20, noNaN: true }),
);
const length = fc.integer({ min: 1, max: 1500 });
const position = fc.double({ min: 0, max: 1, noNaN: true, maxExcluded: true });

const segment: fc.Arbitrary<Segment> = fc.oneof(
  fc.record({ kind: fc.constant('sine' as const), length, amplitude, cyclesPerSample: fc.double({ min: 1e-4, max: 0.5, noNaN: true }) }),
  fc.record({ kind: fc.constant('noise' as const), length, amplitude, seed: fc.integer({ min: 1, max: 2 ** 31 - 1 }) }),
  fc.record({ kind: fc.constant('step' as const), length, amplitude, at: position }),
  fc.record({ kind: fc.constant('dc' as const), length, amplitude }),
  fc.record({ kind: fc.constant('impulse' as const), length, amplitude, at: position }),
);

export const signalSegments: fc.Arbitrary<Segment[]> = fc.array(segment, { minLength: 1, maxLength: 3 });

/** Park-Miller minimal standard generator (Park & Miller, CACM 31(10), 1988): uniform in (0, 1). */
function parkMiller(seed: number): () => number {
  let state = seed % 2147483647;
  if (state <= 0) state += 2147483646;
  return () => {
    state = (state * 16807) % 2147483647;
    return state / 2147483647;
  };
}

export function buildSignal(segments: readonly Segment[]): Float64Array {
  const total = segments.reduce((sum, s) => sum + s.length, 0);
  const out = new Float64Array(total);
  let offset = 0;
  for (const s of segments) {
    const start = Math.floor(('at' in s ? s.at : 0) * s.length);
    const random = s.kind === 'noise' ? parkMiller(s.seed) : null;
    for (let i = 0; i < s.length; i++) {
      let v: number;
      switch (s.kind) {
        case 'sine':
          v = s.amplitude * Math.sin(2 * Math.PI * s.cyclesPerSample * i);
          break;
        case 'noise':
          v = s.amplitude * (2 * random!() - 1);
          break;
        case 'step':
          v = i >= start ? s.amplitude : 0;
          break;
        case 'dc':
          v = s.amplitude;
          break;
        case 'impulse':
          v = i === start ? s.amplitude : 0;
          break;
      }
      out[offset + i] = v;
    }
    offset += s.length;
  }
  return out;
}
