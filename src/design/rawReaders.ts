/**
 * Typed readers for raw JSON values: each checks one value and throws a `UserError` that names its
 * location, the value and what was expected.
 */
import { UserError } from '../errors.js';
import { childPath, type Locator } from './locator.js';
import { suggestionText } from './suggest.js';

export type RawObject = Record<string, unknown>;

export function isRawObject(value: unknown): value is RawObject {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

export function showRaw(value: unknown): string {
  if (value === undefined) return 'nothing';
  const text = JSON.stringify(value);
  return text.length > 60 ? `${text.slice(0, 57)}...` : text;
}

export function readObject(value: unknown, path: string, where: Locator, what: string): RawObject {
  if (!isRawObject(value)) throw new UserError(`${where.at(path)}: expected ${what} (a JSON object), found ${showRaw(value)}`);
  return value;
}

/** Every key of `object` must be one of `allowed`; a stray key is named with a suggestion. */
export function rejectUnknownFields(object: RawObject, allowed: readonly string[], path: string, where: Locator, what: string): void {
  for (const key of Object.keys(object)) {
    if (!allowed.includes(key)) {
      throw new UserError(`${where.at(childPath(path, key))}: unknown field "${key}" in ${what} ${suggestionText(key, allowed)}`);
    }
  }
}

export function requireField(object: RawObject, key: string, path: string, where: Locator, what: string): unknown {
  const value = object[key];
  if (value === undefined) throw new UserError(`${where.at(path)}: ${what} is missing its "${key}" field`);
  return value;
}

export function readString(value: unknown, path: string, where: Locator, what: string): string {
  if (typeof value !== 'string' || value.trim() === '') {
    throw new UserError(`${where.at(path)}: expected ${what} (a non-empty string), found ${showRaw(value)}`);
  }
  return value;
}

export function readBoolean(value: unknown, path: string, where: Locator): boolean {
  if (typeof value !== 'boolean') throw new UserError(`${where.at(path)}: expected true or false, found ${showRaw(value)}`);
  return value;
}

/** A plain JSON number within [min, max], described by `what` with its unit. */
export function readNumberInRange(value: unknown, path: string, where: Locator, what: string, min: number, max: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < min || value > max) {
    throw new UserError(`${where.at(path)}: ${showRaw(value)} is out of range (expected ${what} from ${min} to ${max})`);
  }
  return value;
}

export const MAX_DIODE_COUNT = 10;

/** Count of diodes in series: an integer 0..10. */
export function readCount(value: unknown, path: string, where: Locator): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < 0 || value > MAX_DIODE_COUNT) {
    throw new UserError(`${where.at(path)}: ${showRaw(value)} is not a diode count (expected a whole number from 0 to ${MAX_DIODE_COUNT})`);
  }
  return value;
}
