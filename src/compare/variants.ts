/**
 * The variants a comparison renders: either the cartesian product of `--vary key=v1,v2,...`
 * options, or named variants from a JSON file. Each variant is a label and `--set`-style overrides
 * (`drive=0.8`, `clip.diode=1n34a`), checked later exactly like `render --set`.
 *
 * Variants file:
 *   { "variants": [ { "label": "silicon", "set": { "clip.diode": "1n4148" } },
 *                   { "label": "germanium, hotter", "set": { "clip.diode": "1n34a", "drive": 0.8 } } ] }
 */
import { readFile } from 'node:fs/promises';
import { UserError } from '../errors.js';
import { parseJsonText } from '../design/jsonText.js';
import { childPath, Locator } from '../design/locator.js';
import { readObject, readString, rejectUnknownFields, requireField, showRaw } from '../design/rawReaders.js';

export interface Variant {
  label: string;
  /** `--set`-style overrides, e.g. `clip.diode=1n34a`. */
  overrides: string[];
  /** Where each override was written (a variants file entry), for errors; absent for --vary. */
  origins?: string[];
}

/** Upper bound on the variants of one comparison (each is rendered for every take). */
export const MAX_VARIANTS = 64;

interface VaryAxis {
  key: string;
  values: string[];
}

function parseVaryOption(text: string): VaryAxis {
  const equals = text.indexOf('=');
  const key = equals < 0 ? '' : text.slice(0, equals).trim();
  if (key === '') throw new UserError(`--vary ${text}: expected key=v1,v2,... (e.g. clip.diode=1n4148,1n34a or drive=0.2,0.5,0.9)`);
  const values = text.slice(equals + 1).split(',').map((value) => value.trim());
  if (values.some((value) => value === '')) throw new UserError(`--vary ${text}: empty value in the list (expected key=v1,v2,...)`);
  const repeated = values.find((value, index) => values.indexOf(value) !== index);
  if (repeated !== undefined) throw new UserError(`--vary ${text}: value "${repeated}" is listed twice`);
  return { key, values };
}

function checkCount(count: number, what: string): void {
  if (count > MAX_VARIANTS) throw new UserError(`${what}: ${count} variants is too many (at most ${MAX_VARIANTS}); compare fewer values at a time`);
}

/**
 * Cartesian product of the `--vary` options, in nested-loop order: the first option varies
 * slowest, the last fastest. Labels read `key=value key=value`.
 */
export function expandVaryMatrix(varyOptions: readonly string[]): Variant[] {
  if (varyOptions.length === 0) return [];
  const axes = varyOptions.map(parseVaryOption);
  const keys = axes.map((axis) => axis.key);
  const repeatedKey = keys.find((key, index) => keys.indexOf(key) !== index);
  if (repeatedKey !== undefined) throw new UserError(`--vary ${repeatedKey}: given twice (list all its values in one --vary)`);
  checkCount(
    axes.reduce((count, axis) => count * axis.values.length, 1),
    '--vary',
  );
  let combinations: string[][] = [[]];
  for (const axis of axes) {
    combinations = combinations.flatMap((earlier) => axis.values.map((value) => [...earlier, `${axis.key}=${value}`]));
  }
  return combinations.map((overrides) => ({ label: overrides.join(' '), overrides }));
}

function overrideValueText(value: unknown, path: string, where: Locator): string {
  if (typeof value === 'string' && value.trim() !== '') return value.trim();
  if (typeof value === 'number' && Number.isFinite(value)) return String(value);
  if (typeof value === 'boolean') return String(value);
  throw new UserError(`${where.at(path)}: expected a value as text or a number (e.g. "1n34a" or 0.8), found ${showRaw(value)}`);
}

/** Named variants from the text of a variants file; `fileName` names it in errors. */
export function parseVariantsText(text: string, fileName: string): Variant[] {
  const where = new Locator(fileName);
  const root = readObject(parseJsonText(text, fileName), '', where, 'a variants file');
  rejectUnknownFields(root, ['variants'], '', where, 'a variants file');
  const list = requireField(root, 'variants', '', where, 'a variants file');
  if (!Array.isArray(list) || list.length === 0) {
    throw new UserError(`${where.at('variants')}: expected a non-empty array of { "label", "set" } objects, found ${showRaw(list)}`);
  }
  checkCount(list.length, fileName);
  const seen = new Map<string, string>();
  return list.map((raw: unknown, index) => {
    const path = childPath('variants', index);
    const entry = readObject(raw, path, where, 'a variant');
    rejectUnknownFields(entry, ['label', 'set'], path, where, 'a variant');
    const label = readString(requireField(entry, 'label', path, where, 'a variant'), childPath(path, 'label'), where, 'a label').trim();
    const earlier = seen.get(label);
    if (earlier !== undefined) throw new UserError(`${where.at(childPath(path, 'label'))}: label "${label}" is already used by ${earlier}`);
    seen.set(label, path);
    const setPath = childPath(path, 'set');
    const set = readObject(entry.set ?? {}, setPath, where, 'overrides such as { "clip.diode": "1n34a" }');
    const entries = Object.entries(set);
    const overrides = entries.map(([key, value]) => `${key}=${overrideValueText(value, childPath(setPath, key), where)}`);
    return { label, overrides, origins: entries.map(([key]) => where.at(childPath(setPath, key))) };
  });
}

export async function readVariantsFile(path: string): Promise<Variant[]> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    throw new UserError(`${path}: cannot read the variants file (${code === 'ENOENT' ? 'file not found' : (code ?? String(error))})`);
  }
  return parseVariantsText(text, path);
}
