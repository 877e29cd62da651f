/**
 * fast-check arbitraries for VALID design files (the JSON the user writes), over every stage type
 * and field of issue 2: all parts of shared/parts.json, pots with both tapers and `reverse`, values
 * as plain numbers, SI-prefix strings (with and without unit) and RKM codes (IEC 60062).
 *
 * Every RC corner stays between 0.5 Hz and 12 kHz over the whole pot rotation, so it is below half
 * of every file rate used (44.1 kHz and up): the first-order sections pre-warp at their corner and
 * refuse a corner at or above Nyquist (see the final report of issue 6 for that case). The supply
 * always leaves the chosen op-amps some output swing (a supply that leaves none is refused when the
 * stage is built, with a UserError; tested on its own).
 */
import fc from 'fast-check';
import { SUPPLY_MAX_VOLTS, SUPPLY_MIN_VOLTS } from '../../src/design/parseDesign.js';
import { loadPartsLibrary } from '../../src/design/parts.js';

export const PARTS = loadPartsLibrary();
export const DIODE_NAMES = [...PARTS.diodes.keys()];
export const OPAMP_NAMES = [...PARTS.opamps.keys()];
export const KNOB_NAMES = ['drive', 'tone', 'level', 'fuzz'] as const;

export type Json = null | boolean | number | string | Json[] | { [key: string]: Json | undefined };
export type JsonObject = { [key: string]: Json | undefined };

const MIN_CORNER_HZ = 0.5;
// Corners up to far above Nyquist: a tone pot at its end stop is a valid setting.
const MAX_CORNER_HZ = 1e6;

/** Log-uniform number in [min, max], rounded to 3 significant digits (what a designer writes). */
function logUniform(min: number, max: number): fc.Arbitrary<number> {
  return fc
    .double({ min: Math.log10(min), max: Math.log10(max), noNaN: true })
    .map((exponent) => Number((10 ** exponent).toPrecision(3)));
}

const PREFIXES: readonly [number, string][] = [
  [1e6, 'M'],
  [1e3, 'k'],
  [1, ''],
  [1e-3, 'm'],
  [1e-6, 'u'],
  [1e-9, 'n'],
  [1e-12, 'p'],
];

/** `value` (3 significant digits) as a number, an SI-prefix string, with unit, or an RKM code. */
function formatValue(value: number, unit: 'ohm' | 'F', style: number): Json {
  const [scale, prefix] = PREFIXES.find(([s]) => value >= s * 0.9995) ?? PREFIXES[PREFIXES.length - 1]!;
  const mantissa = String(Number((value / scale).toPrecision(3)));
  switch (style % 4) {
    case 0:
      return value;
    case 1:
      return `${mantissa}${prefix}`;
    case 2:
      return `${mantissa}${prefix}${unit}`;
    default: {
      // RKM (IEC 60062): the prefix letter (R for ohms without one) takes the decimal point's place.
      const letter = prefix === '' ? (unit === 'ohm' ? 'R' : '') : prefix;
      if (letter === '') return `${mantissa}`;
      return mantissa.includes('.') ? mantissa.replace('.', letter) : `${mantissa}${letter}`;
    }
  }
}

const style = fc.integer({ min: 0, max: 3 });
const ohms = (min: number, max: number): fc.Arbitrary<Json> => fc.tuple(logUniform(min, max), style).map(([v, s]) => formatValue(v, 'ohm', s));
const farads = (min: number, max: number): fc.Arbitrary<Json> => fc.tuple(logUniform(min, max), style).map(([v, s]) => formatValue(v, 'F', s));

const knob = fc.constantFrom(...KNOB_NAMES);
const taper = fc.option(fc.constantFrom('linear', 'audio'), { nil: undefined });
const reverse = fc.option(fc.boolean(), { nil: undefined });

/** A pot `{ fixed, pot, knob, taper, reverse }`; fixed from [fixedMin, fixedMax] (0 = omitted). */
function pot(fixedMin: number, fixedMax: number): fc.Arbitrary<JsonObject> {
  const fixed = fixedMin === 0 ? fc.option(ohms(10, fixedMax), { nil: undefined }) : ohms(fixedMin, fixedMax);
  return fc.record({ fixed, pot: ohms(1e3, 1e6), knob, taper, reverse });
}

/** A resistor for an RC section with capacitor C: every value it can take keeps the corner in band. */
function resistorForCap(capFarads: number, allowPot: boolean): fc.Arbitrary<Json> {
  const minOhms = Math.max(1 / (2 * Math.PI * MAX_CORNER_HZ * capFarads), 10);
  const maxOhms = Math.max(1 / (2 * Math.PI * MIN_CORNER_HZ * capFarads), minOhms * 2);
  // Rounding to 3 digits moves a value by under 0.05 %: keep that much clear of the limit.
  const fixed = ohms(minOhms * 1.01, Math.min(maxOhms, 10e6));
  return allowPot ? fc.oneof(fixed, pot(minOhms * 1.01, Math.min(maxOhms, 10e6))) : fixed;
}

/** A capacitor value (number) and an arbitrary resistor that keeps R C in band. */
function rcPair(capMin: number, capMax: number, allowPot: boolean): fc.Arbitrary<{ cap: Json; r: Json }> {
  return fc
    .tuple(logUniform(capMin, capMax), style)
    .chain(([capFarads, s]) => resistorForCap(capFarads, allowPot).map((r) => ({ cap: formatValue(capFarads, 'F', s), r })));
}

const diodeRef: fc.Arbitrary<Json> = fc.oneof(
  { weight: 4, arbitrary: fc.constantFrom(...DIODE_NAMES).map((name) => (name.length % 2 === 0 ? name.toUpperCase() : name)) },
  {
    weight: 1,
    arbitrary: fc.record({
      saturationCurrent: fc.constantFrom<Json>('1n', 2.6e-6, '93.2p', '10u'),
      ideality: fc.double({ min: 1, max: 8, noNaN: true }),
      seriesResistance: fc.constantFrom<Json>(0, 0.5, '6R5', 20),
    }),
  },
);

const count = fc.integer({ min: 0, max: 3 });
const optionalCount = fc.option(count, { nil: undefined });

function inputStage(id: string): fc.Arbitrary<JsonObject> {
  return fc.record({
    id: fc.constant(id),
    type: fc.constant('input'),
    series: fc.option(fc.oneof(ohms(10, 100e3), fc.constant<Json>(0)), { nil: undefined }),
    coupling: farads(1e-9, 10e-6),
    pulldown: fc.oneof(ohms(22e3, 10e6), pot(22e3, 1e6)),
  });
}

function gainStage(id: string): fc.Arbitrary<JsonObject> {
  const opamp = fc.constantFrom(...OPAMP_NAMES);
  const unity = fc.record({ id: fc.constant(id), type: fc.constant('gain'), opamp, railClipping: reverse });
  const rg = fc.oneof(ohms(100, 100e3), pot(100, 10e3));
  const withGain = fc.record({
    id: fc.constant(id),
    type: fc.constant('gain'),
    opamp,
    rf: fc.oneof(ohms(1e3, 2e6), pot(0, 100e3)),
    rg,
    cg: fc.option(farads(10e-9, 10e-6), { nil: undefined }),
    cf: fc.option(farads(10e-12, 10e-9), { nil: undefined }),
    feedbackDiode: fc.option(diodeRef, { nil: undefined }),
    feedbackUp: optionalCount,
    feedbackDown: optionalCount,
    railClipping: reverse,
  }).map((stage) => (stage.feedbackDiode === undefined ? { ...stage, feedbackUp: undefined, feedbackDown: undefined } : stage));
  return fc.oneof({ weight: 1, arbitrary: unity }, { weight: 4, arbitrary: withGain });
}

function clipperStage(id: string): fc.Arbitrary<JsonObject> {
  return fc.record({
    id: fc.constant(id),
    type: fc.constant('clipper'),
    series: fc.oneof(ohms(100, 100e3), pot(100, 10e3)),
    cap: fc.option(farads(100e-12, 100e-9), { nil: undefined }),
    diode: diodeRef,
    downDiode: fc.option(diodeRef, { nil: undefined }),
    up: optionalCount,
    down: optionalCount,
  });
}

function toneStage(id: string): fc.Arbitrary<JsonObject> {
  return rcPair(1e-9, 1e-6, false).chain(({ cap, r }) =>
    fc.record({
      id: fc.constant(id),
      type: fc.constant('tone'),
      fixed: fc.option(fc.constant(r), { nil: undefined }),
      pot: ohms(1e3, 1e6),
      knob,
      taper,
      reverse,
      cap: fc.constant(cap),
    }),
  );
}

function rcStage(id: string, type: 'lowpass' | 'highpass'): fc.Arbitrary<JsonObject> {
  return rcPair(1e-9, 1e-6, true).map(({ cap, r }) => ({ id, type, r, c: cap }));
}

function volumeStage(id: string): fc.Arbitrary<JsonObject> {
  return fc.record({ id: fc.constant(id), type: fc.constant('volume'), pot: ohms(1e3, 1e6), knob, taper, reverse });
}

const STAGE_MAKERS = [gainStage, clipperStage, toneStage, (id: string) => rcStage(id, 'lowpass'), (id: string) => rcStage(id, 'highpass'), volumeStage];

/** Lowest supply that leaves every op-amp of these stages some swing (headroom + 0.1 V each side). */
function minimumSupplyVolts(stages: readonly JsonObject[]): number {
  let supply = SUPPLY_MIN_VOLTS;
  for (const stage of stages) {
    if (stage.type !== 'gain') continue;
    const opamp = PARTS.opamps.get(String(stage.opamp))!;
    supply = Math.max(supply, 2 * (Math.max(opamp.headroomLowVolts, opamp.headroomHighVolts) + 0.1));
  }
  return supply;
}

/** Knobs used by pots anywhere in the stages (volume/tone knob fields and pot objects). */
export function usedKnobs(value: Json | undefined, found = new Set<string>()): Set<string> {
  if (Array.isArray(value)) for (const item of value) usedKnobs(item, found);
  else if (value !== null && typeof value === 'object') {
    for (const [key, item] of Object.entries(value)) {
      if (key === 'knob' && typeof item === 'string') found.add(item);
      else usedKnobs(item, found);
    }
  }
  return found;
}

/** A valid design file object: optional input stage first, then 1-5 other stages. */
export const validDesign: fc.Arbitrary<JsonObject> = fc
  .tuple(
    fc.boolean(),
    fc.array(fc.integer({ min: 0, max: STAGE_MAKERS.length - 1 }), { minLength: 1, maxLength: 5 }),
  )
  .chain(([hasInput, kinds]) => {
    const stageArbs = kinds.map((kind, index) => STAGE_MAKERS[kind]!(`s${index}`));
    return fc.tuple(hasInput ? inputStage('in').map((s) => [s]) : fc.constant([] as JsonObject[]), ...stageArbs);
  })
  .chain(([inputs, ...rest]) => {
    const stages = [...inputs, ...rest];
    const knobs = [...usedKnobs(stages)];
    const positions = fc.tuple(...knobs.map(() => fc.oneof(fc.constantFrom(0, 1, 0.5), fc.double({ min: 0, max: 1, noNaN: true }))));
    return fc.record({
      name: fc.constant('prop'),
      supply: fc.double({ min: minimumSupplyVolts(stages), max: SUPPLY_MAX_VOLTS, noNaN: true }),
      temperature: fc.option(fc.double({ min: -40, max: 125, noNaN: true }), { nil: undefined }),
      knobs: fc.option(positions.map((values) => Object.fromEntries(knobs.map((k, i) => [k, values[i]!]))), { nil: undefined }),
      stages: fc.constant(stages as Json),
    });
  });
