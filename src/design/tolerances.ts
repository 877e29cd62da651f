/**
 * Part tolerances for `spread`: a fraction (from "5%" or 0.05) or "datasheet" (a semiconductor's
 * datasheet ranges in the parts library). A design may give them by part kind (`tolerances`), per
 * stage (`tolerance`: { "<field or element id>": "1%" }) and per circuit element (`tolerance` beside
 * its value); what it does not give takes the defaults below.
 */
import { UserError } from '../errors.js';
import { childPath, type Locator } from './locator.js';
import { readObject, showRaw } from './rawReaders.js';
import { suggestionText } from './suggest.js';

export type PartKind = 'resistor' | 'capacitor' | 'pot' | 'diode' | 'opamp' | 'bjt' | 'jfet';
export const PART_KINDS: readonly PartKind[] = ['resistor', 'capacitor', 'pot', 'diode', 'opamp', 'bjt', 'jfet'];

/** A symmetric fraction of the nominal value, or the part's datasheet ranges. */
export type Tolerance = number | 'datasheet';

/**
 * Defaults (common practice: 5 % carbon/metal-film resistors, 10 % film capacitors, 20 % pots;
 * semiconductors from their datasheet ranges).
 */
export const DEFAULT_TOLERANCES: Readonly<Record<PartKind, Tolerance>> = {
  resistor: 0.05,
  capacitor: 0.1,
  pot: 0.2,
  diode: 'datasheet',
  opamp: 'datasheet',
  bjt: 'datasheet',
  jfet: 'datasheet',
};

/** Tolerances beyond this fraction are typos, not parts. */
const MAX_TOLERANCE = 0.9;

export interface DesignTolerances {
  byKind: Record<PartKind, Tolerance>;
  /** "stageId.field" or "stageId.elementId" -> its own tolerance. */
  byPart: Map<string, Tolerance>;
}

export function defaultTolerances(): DesignTolerances {
  return { byKind: { ...DEFAULT_TOLERANCES }, byPart: new Map() };
}

/** "5%", "0.5 %", 0.05, or "datasheet". */
export function parseTolerance(value: unknown, path: string, where: Locator): Tolerance {
  if (value === 'datasheet') return 'datasheet';
  let fraction: number | null = null;
  if (typeof value === 'number') fraction = value;
  else if (typeof value === 'string') {
    const match = /^\s*(\d+(?:\.\d*)?|\.\d+)\s*%\s*$/.exec(value);
    if (match) fraction = Number(match[1]) / 100;
  }
  if (fraction === null || !Number.isFinite(fraction) || fraction < 0 || fraction > MAX_TOLERANCE) {
    throw new UserError(`${where.at(path)}: ${showRaw(value)} is not a tolerance (expected a percentage such as "5%" up to ${MAX_TOLERANCE * 100} %, a fraction such as 0.05, or "datasheet")`);
  }
  return fraction;
}

/** The design's `tolerances` object: by part kind. */
export function parseToleranceKinds(value: unknown, where: Locator): Record<PartKind, Tolerance> {
  const byKind: Record<PartKind, Tolerance> = { ...DEFAULT_TOLERANCES };
  if (value === undefined) return byKind;
  for (const [kind, tolerance] of Object.entries(readObject(value, 'tolerances', where, 'tolerances by part kind'))) {
    const path = childPath('tolerances', kind);
    if (!(PART_KINDS as readonly string[]).includes(kind)) throw new UserError(`${where.at(path)}: "${kind}" is not a part kind ${suggestionText(kind, PART_KINDS)}`);
    byKind[kind as PartKind] = parseTolerance(tolerance, path, where);
  }
  return byKind;
}
