import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { buildDesignSchema } from '../../src/design/designSchema.js';
import { DESIGN_FIELDS, POT_FIELDS, STAGE_FIELDS, STAGE_TYPES } from '../../src/design/fields.js';

const schemaText = readFileSync('shared/design.schema.json', 'utf8');

interface ObjectSchema {
  properties: Record<string, { const?: string }>;
  required: string[];
  additionalProperties: boolean;
}

describe('shared/design.schema.json', () => {
  test('is valid JSON declaring JSON Schema draft 2020-12', () => {
    const schema = JSON.parse(schemaText) as { $schema: string };
    expect(schema.$schema).toBe('https://json-schema.org/draft/2020-12/schema');
  });

  test('is exactly the schema generated from the parser field tables (regenerate it when fields change)', () => {
    expect(JSON.parse(schemaText)).toEqual(buildDesignSchema());
  });

  test('lists every stage type and field the parser accepts, and no others', () => {
    const schema = JSON.parse(schemaText) as ObjectSchema & { $defs: Record<string, ObjectSchema> };
    expect(Object.keys(schema.properties).sort()).toEqual(Object.keys(DESIGN_FIELDS).sort());
    expect(Object.keys(schema.$defs.pot!.properties).sort()).toEqual(Object.keys(POT_FIELDS).sort());
    for (const type of STAGE_TYPES) {
      const stage = schema.$defs[`${type}Stage`]!;
      expect(stage.properties.type!.const).toBe(type);
      expect(Object.keys(stage.properties).sort(), type).toEqual(Object.keys(STAGE_FIELDS[type]).sort());
      expect(stage.additionalProperties).toBe(false);
    }
    expect(STAGE_TYPES.sort()).toEqual(['circuit', 'clipper', 'gain', 'highpass', 'input', 'lowpass', 'tone', 'volume']);
  });
});
