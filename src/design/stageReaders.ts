/**
 * Field readers shared by the stage parsers (named stages, parseStages.ts; circuit stages,
 * parseCircuit.ts): pot tapers, knob names, diodes by part name or inline, and stage ids.
 */
import { UserError } from '../errors.js';
import type { Locator } from './locator.js';
import { lookupDiode, parseDiodeEntry, type PartsLibrary } from './parts.js';
import { isRawObject, readString, showRaw } from './rawReaders.js';
import { suggestionText } from './suggest.js';
import type { DiodeParams, Taper } from './types.js';
import type { Tolerance } from './tolerances.js';

const TAPERS: readonly Taper[] = ['linear', 'audio'];
export const STAGE_ID_PATTERN = /^[A-Za-z_][A-Za-z0-9_-]*$/;

/** What the stage parsers share: where errors point, the parts to look up, and the knobs pots use. */
export interface StageParseContext {
  where: Locator;
  parts: PartsLibrary;
  /** knob name -> JSON path of the first pot that uses it */
  knobUses: Map<string, string>;
  /** "stageId.field" or "stageId.elementId" -> the tolerance the design gives that part (spread). */
  tolerances: Map<string, Tolerance>;
}

export function readTaper(value: unknown, path: string, where: Locator): Taper {
  if (typeof value === 'string' && (TAPERS as readonly string[]).includes(value)) return value as Taper;
  const hint = typeof value === 'string' ? suggestionText(value, TAPERS) : `(expected one of: ${TAPERS.join(', ')})`;
  throw new UserError(`${where.at(path)}: ${showRaw(value)} is not a pot taper ${hint}`);
}

export function useKnob(value: unknown, path: string, ctx: StageParseContext): string {
  const knob = readString(value, path, ctx.where, 'a knob name');
  if (!ctx.knobUses.has(knob)) ctx.knobUses.set(knob, path);
  return knob;
}

/** A diode field: a part name, or an inline `{ saturationCurrent, ideality, seriesResistance }`. */
export function readDiode(value: unknown, path: string, inlineName: string, ctx: StageParseContext): DiodeParams {
  if (isRawObject(value)) return parseDiodeEntry(value, inlineName, path, ctx.where, `inline in ${ctx.where.fileName}`);
  return lookupDiode(ctx.parts, value, path, ctx.where);
}
