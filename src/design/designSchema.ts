/**
 * The JSON Schema (draft 2020-12) of design files, built from the field tables in `fields.ts`.
 * `shared/design.schema.json` is this object written out; a test keeps the two identical.
 */
import {
  BJT_FIELDS,
  JFET_FIELDS,
  DESIGN_FIELDS,
  DIODE_FIELDS,
  ELEMENT_FIELDS,
  ELEMENT_TYPES,
  OPAMP_FIELDS,
  POT_FIELDS,
  STAGE_FIELDS,
  STAGE_TYPES,
  type FieldKind,
  type FieldSpec,
} from './fields.js';
import { MAX_DIODE_COUNT } from './rawReaders.js';
import { PART_KINDS } from './tolerances.js';
import { TEMPERATURE_MAX_C, TEMPERATURE_MIN_C } from './parseDesign.js';

type JsonSchema = Record<string, unknown>;

const ref = (name: string): JsonSchema => ({ $ref: `#/$defs/${name}` });

const VALUE_TEXT = 'SI base units as a number, or a string with an SI prefix and optional unit (4.7k, 100nF) or an RKM code (4k7, 2u2, R47)';

const KIND_SCHEMAS: Readonly<Record<Exclude<FieldKind, 'stageType'>, JsonSchema>> = {
  id: { type: 'string', pattern: '^[A-Za-z_][A-Za-z0-9_-]*$' },
  name: { type: 'string', minLength: 1 },
  text: { type: 'string' },
  resistance: { anyOf: [ref('positiveValue'), ref('pot')] },
  resistanceOrZero: { anyOf: [ref('valueOrZero'), ref('pot')] },
  ohms: ref('positiveValue'),
  ohmsOrZero: ref('valueOrZero'),
  capacitance: ref('positiveValue'),
  volts: ref('positiveValue'),
  voltsOrZero: ref('valueOrZero'),
  voltsOrInf: ref('valueOrUnlimited'),
  amperes: ref('positiveValue'),
  noiseDensity: ref('valueOrZero'),
  tolerance: ref('tolerance'),
  toleranceMap: { type: 'object', additionalProperties: ref('tolerance') },
  toleranceKinds: { type: 'object', properties: Object.fromEntries(PART_KINDS.map((kind) => [kind, ref('tolerance')])), additionalProperties: false },
  hertzOrInf: ref('valueOrUnlimited'),
  voltsPerSecondOrInf: ref('valueOrUnlimited'),
  dimensionless: { type: 'number', exclusiveMinimum: 0 },
  temperature: { type: 'number', minimum: TEMPERATURE_MIN_C, maximum: TEMPERATURE_MAX_C },
  count: { type: 'integer', minimum: 0, maximum: MAX_DIODE_COUNT },
  knobName: { type: 'string', minLength: 1 },
  knobPositions: { type: 'object', additionalProperties: { type: 'number', minimum: 0, maximum: 1 } },
  taper: { enum: ['linear', 'audio'] },
  boolean: { type: 'boolean' },
  diode: { anyOf: [{ type: 'string', minLength: 1 }, ref('diodeParams')] },
  opamp: { type: 'string', minLength: 1 },
  stages: { type: 'array', minItems: 1, items: { oneOf: STAGE_TYPES.map((type) => ref(`${type}Stage`)) } },
  parts: ref('parts'),
  node: { type: 'string', pattern: '^[A-Za-z0-9_-]+$' },
  bjtPolarity: { enum: ['npn', 'pnp'] },
  jfetPolarity: { enum: ['n', 'p'] },
  signedVolts: { type: 'number' },
  ranges: { type: 'object', additionalProperties: { type: 'object', properties: { min: { type: 'number' }, max: { type: 'number' } }, required: ['min', 'max'], additionalProperties: false } },
  elements: { type: 'array', minItems: 1, items: { oneOf: ELEMENT_TYPES.map((type) => ref(`${type}Element`)) } },
  elementType: { enum: ELEMENT_TYPES },
  nodes: { type: 'array', minItems: 2, maxItems: 3, items: { type: 'string', pattern: '^[A-Za-z0-9_-]+$' } },
  bjt: { anyOf: [{ type: 'string', minLength: 1 }, ref('bjtParams')] },
  jfet: { anyOf: [{ type: 'string', minLength: 1 }, ref('jfetParams')] },
};

/** A closed object schema from a field table; `type` fields become a constant. */
function objectSchema(fields: Readonly<Record<string, FieldSpec>>, typeName?: string): JsonSchema {
  const properties: Record<string, JsonSchema> = {};
  for (const [name, spec] of Object.entries(fields)) {
    const schema = spec.kind === 'stageType' || (spec.kind === 'elementType' && typeName !== undefined) ? { const: typeName } : KIND_SCHEMAS[spec.kind];
    properties[name] = { ...schema, description: spec.description };
  }
  const required = Object.entries(fields).flatMap(([name, spec]) => (spec.required ? [name] : []));
  return { type: 'object', properties, required, additionalProperties: false };
}

export function buildDesignSchema(): JsonSchema {
  const stageDefs = Object.fromEntries(STAGE_TYPES.map((type) => [`${type}Stage`, objectSchema(STAGE_FIELDS[type], type)]));
  const elementDefs = Object.fromEntries(ELEMENT_TYPES.map((type) => [`${type}Element`, objectSchema(ELEMENT_FIELDS[type], type)]));
  return {
    $schema: 'https://json-schema.org/draft/2020-12/schema',
    title: 'clipbench design file',
    description: 'A drive circuit as a chain of stages in signal order. Generated from src/design/fields.ts.',
    ...objectSchema(DESIGN_FIELDS),
    $defs: {
      positiveValue: { anyOf: [{ type: 'number', exclusiveMinimum: 0 }, { type: 'string', minLength: 1 }], description: VALUE_TEXT },
      valueOrZero: { anyOf: [{ type: 'number', minimum: 0 }, { type: 'string', minLength: 1 }], description: VALUE_TEXT },
      tolerance: { anyOf: [{ type: 'number', minimum: 0, maximum: 0.9 }, { type: 'string', pattern: '^\\s*(\\d+(\\.\\d*)?|\\.\\d+)\\s*%\\s*$' }, { const: 'datasheet' }], description: 'A tolerance: "5%", 0.05 or "datasheet"' },
      valueOrUnlimited: { anyOf: [ref('positiveValue'), { const: 'inf' }, { type: 'null' }], description: `${VALUE_TEXT}; "inf" = unlimited` },
      pot: objectSchema(POT_FIELDS),
      diodeParams: objectSchema(DIODE_FIELDS),
      opampParams: objectSchema(OPAMP_FIELDS),
      bjtParams: objectSchema(BJT_FIELDS),
      jfetParams: objectSchema(JFET_FIELDS),
      parts: {
        type: 'object',
        properties: {
          $comment: { type: 'string' },
          diodes: { type: 'object', additionalProperties: ref('diodeParams') },
          opamps: { type: 'object', additionalProperties: ref('opampParams') },
          bjts: { type: 'object', additionalProperties: ref('bjtParams') },
          jfets: { type: 'object', additionalProperties: ref('jfetParams') },
        },
        additionalProperties: false,
      },
      ...stageDefs,
      ...elementDefs,
    },
  };
}
