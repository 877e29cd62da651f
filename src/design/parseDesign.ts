/**
 * Design files (JSON) to typed designs. Checks every field: names (with "did you mean"), values and
 * units, physical ranges, parts and knobs; errors name the file (or the --set override) and the JSON path.
 */
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { UserError } from '../errors.js';
import { DESIGN_FIELDS, fieldNames } from './fields.js';
import { parseJsonText } from './jsonText.js';
import { childPath, Locator } from './locator.js';
import { applyOverridesTracked, type OverrideInput } from './overrides.js';
import { addPartsFromObject, copyPartsLibrary, type PartsLibrary } from './parts.js';
import { parseStage } from './parseStages.js';
import type { StageParseContext } from './stageReaders.js';
import { readNumberInRange, readObject, readString, rejectUnknownFields, requireField, showRaw } from './rawReaders.js';
import { closestName, suggestionText } from './suggest.js';
import type { Design, Resistance, Stage } from './types.js';
import { parseValue } from './values.js';
import { DEFAULT_KNOB_POSITION } from './taper.js';
import { parseToleranceKinds } from './tolerances.js';

export const SUPPLY_MIN_VOLTS = 3;
export const SUPPLY_MAX_VOLTS = 48;
export const TEMPERATURE_MIN_C = -40;
export const TEMPERATURE_MAX_C = 125;
export const DEFAULT_TEMPERATURE_C = 25;

function readSupplyVolts(value: unknown, where: Locator): number {
  const volts = parseValue(value, where.at('supply'), 'volt');
  if (volts < SUPPLY_MIN_VOLTS || volts > SUPPLY_MAX_VOLTS) {
    throw new UserError(`${where.at('supply')}: ${showRaw(value)} is out of range (expected a supply from ${SUPPLY_MIN_VOLTS} to ${SUPPLY_MAX_VOLTS} volts)`);
  }
  return volts;
}

function parseStages(value: unknown, ctx: StageParseContext): Stage[] {
  if (!Array.isArray(value) || value.length === 0) {
    throw new UserError(`${ctx.where.at('stages')}: expected a non-empty array of stages, found ${showRaw(value)}`);
  }
  const firstPathOfId = new Map<string, string>();
  return value.map((raw: unknown, index) => {
    const stagePath = childPath('stages', index);
    const stage = parseStage(raw, stagePath, ctx);
    const earlier = firstPathOfId.get(stage.id);
    if (earlier !== undefined) throw new UserError(`${ctx.where.at(childPath(stagePath, 'id'))}: duplicate stage id "${stage.id}" (already used by ${earlier})`);
    firstPathOfId.set(stage.id, stagePath);
    if (stage.type === 'input' && index !== 0) {
      throw new UserError(`${ctx.where.at(childPath(stagePath, 'type'))}: an input stage must come first (it is the jack side of the circuit)`);
    }
    return stage;
  });
}

/**
 * Knob positions. Without a `knobs` object every knob sits at 0.5; with one, every listed knob must be
 * used by a pot and every pot's knob must be listed, and a listed knob no pot uses beside a pot knob
 * that is not listed is reported as the pair (either may be the typo).
 */
function parseKnobs(value: unknown, knobUses: ReadonlyMap<string, string>, where: Locator): Record<string, number> {
  // No prototype: knob names such as "constructor" or "__proto__" are plain keys here.
  const knobs: Record<string, number> = Object.create(null) as Record<string, number>;
  const used = [...knobUses.keys()];
  if (value === undefined) {
    for (const knob of used) knobs[knob] = DEFAULT_KNOB_POSITION;
    return knobs;
  }
  const listed = readObject(value, 'knobs', where, 'knob positions');
  const listedNames = Object.keys(listed);
  const unlisted = used.filter((knob) => !Object.hasOwn(listed, knob));
  for (const [knob, position] of Object.entries(listed)) {
    const knobPath = childPath('knobs', knob);
    if (!knobUses.has(knob)) {
      const partner = closestName(knob, unlisted);
      if (partner !== null) {
        throw new UserError(
          `${where.at(knobPath)}: knob "${knob}" is not used by any pot, and ${knobUses.get(partner)} names knob "${partner}", which is not in knobs: is one a typo of the other?`,
        );
      }
      throw new UserError(`${where.at(knobPath)}: knob "${knob}" is not used by any pot ${suggestionText(knob, used)}`);
    }
    knobs[knob] = readNumberInRange(position, knobPath, where, 'a knob position', 0, 1);
  }
  for (const knob of unlisted) {
    const close = closestName(knob, listedNames);
    const hint = close === null ? `; give its position there, e.g. "knobs": { "${knob}": 0.5 }` : ` (did you mean "${close}"?)`;
    throw new UserError(`${where.at(knobUses.get(knob) as string)}: knob "${knob}" is not in knobs${hint}`);
  }
  return knobs;
}

function defaultDesignName(fileName: string): string {
  return path.basename(fileName).replace(/\.json$/i, '');
}

/** A parsed JSON value to a typed design; `where` names the file (and any overrides) in errors. */
export function parseDesignObject(raw: unknown, where: Locator, parts: PartsLibrary): Design<Resistance> {
  const design = readObject(raw, '', where, 'a design');
  rejectUnknownFields(design, fieldNames(DESIGN_FIELDS), '', where, 'the design');
  const library = design.parts === undefined ? parts : addPartsFromObject(copyPartsLibrary(parts), design.parts, 'parts', where);
  const ctx: StageParseContext = { where, parts: library, knobUses: new Map(), tolerances: new Map() };
  const supplyVolts = readSupplyVolts(requireField(design, 'supply', '', where, 'the design'), where);
  const temperatureC =
    design.temperature === undefined
      ? DEFAULT_TEMPERATURE_C
      : readNumberInRange(design.temperature, 'temperature', where, 'a temperature in degrees C', TEMPERATURE_MIN_C, TEMPERATURE_MAX_C);
  const name = design.name === undefined ? defaultDesignName(where.fileName) : readString(design.name, 'name', where, 'a design name');
  const stages = parseStages(requireField(design, 'stages', '', where, 'the design'), ctx);
  const knobs = parseKnobs(design.knobs, ctx.knobUses, where);
  const tolerances = { byKind: parseToleranceKinds(design.tolerances, where), byPart: ctx.tolerances };
  return { name, supplyVolts, temperatureC, knobs, stages, tolerances };
}

/** Design JSON text (from `fileName`) to a typed design, with `--set` overrides applied first. */
export function parseDesignText(jsonText: string, fileName: string, parts: PartsLibrary, overrides: readonly OverrideInput[] = []): Design<Resistance> {
  const raw = parseJsonText(jsonText, fileName);
  const { raw: overridden, overriddenPaths } = applyOverridesTracked(raw, overrides, fileName);
  return parseDesignObject(overridden, new Locator(fileName, overriddenPaths), parts);
}

/** Read and parse a design file; `overrides` are `--set` texts such as `drive=0.8` or `clip.diode=1n34a`. */
/** A design file's text; a file that cannot be read is one line naming it and why. */
export async function readDesignText(filePath: string): Promise<string> {
  try {
    return await readFile(filePath, 'utf8');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const reason = code === 'ENOENT' ? 'file not found' : code === 'EISDIR' ? 'is a folder, expected a design file' : (error as Error).message;
    throw new UserError(`${filePath}: cannot read design (${reason})`);
  }
}

export async function readDesignFile(filePath: string, parts: PartsLibrary, overrides: readonly OverrideInput[] = []): Promise<Design<Resistance>> {
  return parseDesignText(await readDesignText(filePath), filePath, parts, overrides);
}
