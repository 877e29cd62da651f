/**
 * Property-based test (fast-check, fixed seed) of the design parser against broken files (issue 6
 * "Bad input, everywhere"): a random VALID design with one mutation that makes it invalid (a field
 * of the wrong type, a negative or out-of-range value, a malformed value string, an unknown field,
 * a missing required field, a non-finite number, cut-off JSON text) must give a UserError with one
 * line of text, and never any other exception.
 *
 * Which values are invalid for which field follows the field kinds of src/design/fields.ts and the
 * value rules of issue 2 (SI prefixes or RKM codes per IEC 60062; "2.2kk", "-2k2", "4,7k" are errors).
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { DESIGN_FIELDS, DIODE_FIELDS, POT_FIELDS, STAGE_FIELDS, type FieldKind, type FieldSpec } from '../../src/design/fields.js';
import { parseDesignText } from '../../src/design/parseDesign.js';
import type { StageType } from '../../src/design/types.js';
import { UserError } from '../../src/errors.js';
import { PARTS, validDesign, type Json, type JsonObject } from './designArbitrary.js';

/** Stands for a number JSON.stringify cannot write; replaced by 1e999 (parsed as Infinity) in the text. */
const HUGE = '__HUGE_NUMBER__';

const NOT_A_VALUE: readonly Json[] = [-1, -4700, '-2k2', '2.2kk', '4,7k', 'abc', '', '1e400', [], [1], true, null, HUGE, '  '];
const NOT_A_STRING: readonly Json[] = [5, true, null, [], {}, ''];

/** Values that no field of this kind accepts. */
const INVALID_BY_KIND: Readonly<Partial<Record<FieldKind, readonly Json[]>>> = {
  resistance: [...NOT_A_VALUE, 0, {}, { pot: '10k' }, { pot: '10k', knob: 'drive', taper: 'log' }],
  resistanceOrZero: [...NOT_A_VALUE, {}, { pot: -1, knob: 'drive' }],
  ohms: [...NOT_A_VALUE, 0, {}],
  ohmsOrZero: [...NOT_A_VALUE, {}],
  capacitance: [...NOT_A_VALUE, 0, {}, '100nH'],
  volts: [...NOT_A_VALUE, 0, 2.9, 48.1, 1000],
  amperes: [...NOT_A_VALUE, 0],
  dimensionless: [0, -1, 1000, 'two', null, HUGE],
  temperature: [-41, 126, 'hot', null, HUGE],
  count: [-1, 1.5, 11, '2', true, null],
  knobName: NOT_A_STRING,
  knobPositions: ['0.5', 7, []],
  taper: ['log', 'Audio ', 1, null],
  boolean: ['yes', 'true', 1, 0, null],
  diode: ['1n4149', 'zener', 5, [], {}, { saturationCurrent: -1, ideality: 1, seriesResistance: 0 }],
  opamp: ['tl071x', 'opa', 7, [], null],
  id: ['', '9lives', 'a b', 5, null],
  stageType: ['gainz', 'Gain', 3, null],
  name: NOT_A_STRING,
  stages: [[], {}, 'x', null],
};

/** A place in the design object and the values that are invalid there. */
interface Slot {
  path: (string | number)[];
  invalid: readonly Json[];
  required: boolean;
}

function slotsOf(object: JsonObject, table: Readonly<Record<string, FieldSpec>>, path: (string | number)[], out: Slot[]): void {
  for (const [key, spec] of Object.entries(table)) {
    const value = object[key];
    const invalid = INVALID_BY_KIND[spec.kind];
    if (value !== undefined && invalid) out.push({ path: [...path, key], invalid, required: spec.required });
    if (value !== null && typeof value === 'object' && !Array.isArray(value)) {
      if (key === 'knobs') {
        for (const knob of Object.keys(value)) out.push({ path: [...path, key, knob], invalid: [-0.01, 1.01, '0.5', null, HUGE, true], required: false });
      } else if (spec.kind === 'diode') slotsOf(value, DIODE_FIELDS, [...path, key], out);
      else if (spec.kind === 'resistance' || spec.kind === 'resistanceOrZero') slotsOf(value, POT_FIELDS, [...path, key], out);
    }
  }
}

/** Every mutable place of a valid design (top level, stages, pots, inline diodes, knob positions). */
function designSlots(design: JsonObject): Slot[] {
  const slots: Slot[] = [];
  slotsOf(design, DESIGN_FIELDS, [], slots);
  (design.stages as JsonObject[]).forEach((stage, index) => slotsOf(stage, STAGE_FIELDS[stage.type as StageType], ['stages', index], slots));
  return slots;
}

/** The value at `path` in `root`. */
function nodeAt(root: JsonObject, path: readonly (string | number)[]): Json | undefined {
  let node: Json | undefined = root;
  for (const key of path) node = (node as Record<string | number, Json>)[key];
  return node;
}

/** The object holding `path`'s last key. */
function parentOf(root: JsonObject, path: readonly (string | number)[]): Record<string | number, Json | undefined> {
  return nodeAt(root, path.slice(0, -1)) as Record<string | number, Json | undefined>;
}

type Mutation =
  | { kind: 'replace'; slot: number; value: number }
  | { kind: 'delete-required'; slot: number }
  | { kind: 'unknown-field'; slot: number; name: string }
  | { kind: 'cut-text'; at: number };

const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  { weight: 6, arbitrary: fc.record({ kind: fc.constant('replace' as const), slot: fc.nat(), value: fc.nat() }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('delete-required' as const), slot: fc.nat() }) },
  {
    weight: 1,
    arbitrary: fc.record({ kind: fc.constant('unknown-field' as const), slot: fc.nat(), name: fc.constantFrom('gian', 'serie', 'Rf', 'colour', 'capacitance', 'knob2') }),
  },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('cut-text' as const), at: fc.double({ min: 0, max: 1, noNaN: true, maxExcluded: true }) }) },
);

/** The design text after the mutation (always invalid), and what was done, for the failure message. */
function mutate(design: JsonObject, m: Mutation): { text: string; what: string } {
  const copy = structuredClone(design);
  const slots = designSlots(copy);
  const write = (root: JsonObject): string => JSON.stringify(root).replace(`"${HUGE}"`, '1e999');
  switch (m.kind) {
    case 'replace': {
      const slot = slots[m.slot % slots.length]!;
      const value = slot.invalid[m.value % slot.invalid.length]!;
      parentOf(copy, slot.path)[slot.path.at(-1)!] = structuredClone(value);
      return { text: write(copy), what: `${slot.path.join('.')} = ${JSON.stringify(value)}` };
    }
    case 'delete-required': {
      const required = slots.filter((slot) => slot.required);
      const slot = required[m.slot % required.length]!;
      delete parentOf(copy, slot.path)[slot.path.at(-1)!];
      return { text: write(copy), what: `delete ${slot.path.join('.')}` };
    }
    case 'unknown-field': {
      // Into the design, the knobs, a stage, or a pot / inline diode object: the holders of the slots.
      const holders = [[], ...slots.map((slot) => slot.path.slice(0, -1))];
      const holder = holders[m.slot % holders.length]!;
      (nodeAt(copy, holder) as JsonObject)[m.name] = 1;
      return { text: write(copy), what: `unknown field ${[...holder, m.name].join('.')}` };
    }
    case 'cut-text': {
      const text = write(copy);
      const at = Math.floor(m.at * text.length);
      return { text: text.slice(0, at), what: `text cut at ${at} of ${text.length}` };
    }
  }
}

describe('broken design files', () => {
  test('every mutation of a valid design gives a one-line UserError, never another exception', () => {
    fc.assert(
      fc.property(validDesign, mutation, (design, m) => {
        const { text, what } = mutate(design, m);
        let caught: unknown = null;
        try {
          parseDesignText(text, 'broken.json', PARTS);
        } catch (error) {
          caught = error;
        }
        expect(caught, `${what}: accepted, or threw something else`).toBeInstanceOf(UserError);
        const message = (caught as UserError).message;
        expect(message.startsWith('broken.json'), `${what}: "${message}" names the file`).toBe(true);
        expect(message, `${what}: one line`).not.toMatch(/\n/);
      }),
      { seed: 42, numRuns: 1500 },
    );
  });
});
