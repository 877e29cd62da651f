/**
 * Command-line overrides (`render --set`, `compare --vary`) applied to the raw design JSON before
 * validation, so an override is checked exactly like the file and its errors name the option:
 *   knob=value            e.g. drive=0.8          sets knobs.drive
 *   supply=V, temperature=C, name=text             set the top-level fields
 *   stageId.field=value   e.g. clip.diode=1n34a    sets a stage field (a clipper's `diode` sets both
 *                         sides when it has its own `downDiode`, unless `stageId.downDiode` is set too)
 *   stageId.field.sub=v   e.g. amp.rf.fixed=4k7    sets a field inside a pot object
 *   stageId.elementId.field=v  e.g. drive.rx.value=2k2, drive.d1.part=1n34a  sets a field of an
 *                         element of a circuit stage
 */
import { UserError } from '../errors.js';
import { childPath } from './locator.js';
import { isRawObject, type RawObject } from './rawReaders.js';
import { suggestionText } from './suggest.js';
import { DEFAULT_KNOB_POSITION } from './taper.js';

const TOP_LEVEL_SETTINGS = ['supply', 'temperature', 'name'];
const NUMBER_PATTERN = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

export interface TrackedOverrides {
  raw: unknown;
  /** JSON path -> the option that set it, e.g. `stages[2].diode` -> `--set clip.diode` */
  overriddenPaths: Map<string, string>;
}

/**
 * Command-line text to a JSON value: numbers (counts, knob positions) and booleans are converted, and
 * a JSON object (`{...}`) stands for an inline part, e.g. clip.diode={"saturationCurrent": 3e-9, ...}.
 */
function toJsonValue(text: string, option: string): unknown {
  if (NUMBER_PATTERN.test(text)) return Number(text);
  if (text === 'true' || text === 'false') return text === 'true';
  if (text.startsWith('{')) {
    try {
      return JSON.parse(text) as unknown;
    } catch (error) {
      throw new UserError(`${option}: the value looks like an inline part but is not valid JSON (${(error as Error).message})`);
    }
  }
  return text;
}

/** Every knob name a pot in the raw stages refers to (unvalidated JSON, so looked up defensively). */
function knobNamesIn(value: unknown, names: Set<string> = new Set()): Set<string> {
  if (Array.isArray(value)) for (const item of value) knobNamesIn(item, names);
  else if (isRawObject(value)) {
    if (typeof value.knob === 'string') names.add(value.knob);
    for (const child of Object.values(value)) if (typeof child === 'object') knobNamesIn(child, names);
  }
  return names;
}

function stageIdsIn(stages: unknown): string[] {
  if (!Array.isArray(stages)) return [];
  return stages.flatMap((stage: unknown) => (isRawObject(stage) && typeof stage.id === 'string' ? [stage.id] : []));
}

/**
 * An override: `key=value` text from `--set`, or with the place it came from (e.g. an entry of a
 * variants file), which its errors then name instead of `--set key`.
 */
export type OverrideInput = string | { text: string; origin: string };

function splitOverride(input: OverrideInput, fileName: string): { key: string; valueText: string; option: string } {
  const override = typeof input === 'string' ? input : input.text;
  const equals = override.indexOf('=');
  const key = equals < 0 ? override.trim() : override.slice(0, equals).trim();
  const option = typeof input === 'string' ? `--set ${key}` : input.origin;
  if (equals < 0 || key === '') {
    throw new UserError(`--set ${override}: expected name=value, e.g. drive=0.8 or clip.diode=1n34a (for ${fileName})`);
  }
  return { key, valueText: override.slice(equals + 1).trim(), option };
}

function setKnobOrSetting(design: RawObject, key: string, value: unknown, option: string, fileName: string): string {
  if (TOP_LEVEL_SETTINGS.includes(key)) {
    design[key] = value;
    return key;
  }
  const knobs = [...knobNamesIn(design.stages)];
  if (!knobs.includes(key)) {
    throw new UserError(`${option}: no knob "${key}" in ${fileName} ${suggestionText(key, [...knobs, ...TOP_LEVEL_SETTINGS])}`);
  }
  // A design without `knobs` has every knob at mid rotation: keep the others there.
  if (!isRawObject(design.knobs)) design.knobs = Object.fromEntries(knobs.map((knob) => [knob, DEFAULT_KNOB_POSITION]));
  (design.knobs as RawObject)[key] = value;
  return childPath('knobs', key);
}

/** A pot replaced by a fixed value takes its knob along, unless another pot still uses it. */
function forgetUnusedKnobs(design: RawObject, knobs: Set<string>): void {
  if (!isRawObject(design.knobs)) return;
  const stillUsed = knobNamesIn(design.stages);
  for (const knob of knobs) if (!stillUsed.has(knob)) delete design.knobs[knob];
}

function setStageField(design: RawObject, keys: string[], value: unknown, option: string, fileName: string, setsDownDiode: ReadonlySet<string>): string[] {
  const [stageId, ...fieldKeys] = keys as [string, ...string[]];
  const stages = Array.isArray(design.stages) ? (design.stages as unknown[]) : [];
  const index = stages.findIndex((stage) => isRawObject(stage) && stage.id === stageId);
  if (index < 0) throw new UserError(`${option}: no stage "${stageId}" in ${fileName} ${suggestionText(stageId, stageIdsIn(stages))}`);
  let target = stages[index] as RawObject;
  let jsonPath = childPath('stages', index);
  if (target.type === 'circuit' && fieldKeys.length >= 2) {
    // stageId.elementId.field: step into the element.
    const elementId = fieldKeys.shift() as string;
    const elements = Array.isArray(target.elements) ? (target.elements as unknown[]) : [];
    const elementIndex = elements.findIndex((element) => isRawObject(element) && element.id === elementId);
    if (elementIndex < 0) {
      const ids = elements.flatMap((element: unknown) => (isRawObject(element) && typeof element.id === 'string' ? [element.id] : []));
      throw new UserError(`${option}: no element "${elementId}" in stage "${stageId}" of ${fileName} ${suggestionText(elementId, ids)}`);
    }
    target = elements[elementIndex] as RawObject;
    jsonPath = childPath(childPath(jsonPath, 'elements'), elementIndex);
  }
  for (const key of fieldKeys.slice(0, -1)) {
    const inner = target[key];
    if (!isRawObject(inner)) {
      throw new UserError(`${option}: ${stageId}.${key} is not a pot in ${fileName} (set it whole, e.g. --set ${stageId}.${key}=22k)`);
    }
    target = inner;
    jsonPath = childPath(jsonPath, key);
  }
  const last = fieldKeys[fieldKeys.length - 1]!;
  const replacedKnobs = knobNamesIn(target[last]);
  target[last] = value;
  forgetUnusedKnobs(design, replacedKnobs);
  const paths = [childPath(jsonPath, last)];
  // A clipper with its own `downDiode`: `stage.diode` names the part of the clipper, so it changes
  // both sides, unless the negative side is set on its own.
  if (target.type === 'clipper' && fieldKeys.length === 1 && last === 'diode' && target.downDiode !== undefined && !setsDownDiode.has(stageId)) {
    target.downDiode = value;
    paths.push(childPath(jsonPath, 'downDiode'));
  }
  return paths;
}

/** Apply overrides to a copy of the raw design and remember which JSON path each one set. */
export function applyOverridesTracked(raw: unknown, overrides: readonly OverrideInput[], fileName: string): TrackedOverrides {
  const overriddenPaths = new Map<string, string>();
  if (overrides.length === 0) return { raw, overriddenPaths };
  if (!isRawObject(raw)) throw new UserError(`${fileName}: expected a design (a JSON object)`);
  const design = structuredClone(raw);
  const parsed = overrides.map((override) => splitOverride(override, fileName));
  const setsDownDiode = new Set(parsed.flatMap(({ key }) => (key.endsWith('.downDiode') ? [key.slice(0, -'.downDiode'.length)] : [])));
  for (const { key, valueText, option } of parsed) {
    const keys = key.split('.');
    if (keys.some((part) => part === '')) throw new UserError(`${option}: malformed name (expected knob or stageId.field)`);
    const value = toJsonValue(valueText, option);
    const jsonPaths = keys.length === 1 ? [setKnobOrSetting(design, key, value, option, fileName)] : setStageField(design, keys, value, option, fileName, setsDownDiode);
    for (const jsonPath of jsonPaths) overriddenPaths.set(jsonPath, option);
  }
  return { raw: design, overriddenPaths };
}

/** Apply `--set`-style overrides to a raw design (a copy is returned; the input is not changed). */
export function applyOverrides(raw: unknown, overrides: readonly OverrideInput[], fileName: string): unknown {
  return applyOverridesTracked(raw, overrides, fileName).raw;
}
