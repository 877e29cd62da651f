/**
 * The parts library: diodes, op-amps, bipolar transistors and JFETs by name (case-insensitive), loaded from
 * `shared/parts.json` plus an optional user parts file of the same format that adds or overrides parts.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { UserError } from '../errors.js';
import { BJT_FIELDS, BJT_RANGE_KEYS, DIODE_FIELDS, DIODE_RANGE_KEYS, JFET_FIELDS, JFET_RANGE_KEYS, OPAMP_FIELDS, PARTS_FILE_FIELDS, fieldNames } from './fields.js';
import { parseJsonText } from './jsonText.js';
import { childPath, Locator } from './locator.js';
import { readNumberInRange, readObject, readString, rejectUnknownFields, requireField } from './rawReaders.js';
import { suggestionText } from './suggest.js';
import type { BjtParams, DiodeParams, JfetParams, OpampParams, ParamRange } from './types.js';
import { parseValue } from './values.js';

export interface PartsLibrary {
  diodes: Map<string, DiodeParams>;
  opamps: Map<string, OpampParams>;
  bjts: Map<string, BjtParams>;
  jfets: Map<string, JfetParams>;
}

/** The bundled library file; resolved from this module so it works from `src/` and from `dist/`. */
export const BUNDLED_PARTS_PATH = fileURLToPath(new URL('../../shared/parts.json', import.meta.url));

/** JSON cannot hold Infinity; the library writes "inf" (or null) for an unlimited value. */
const UNLIMITED_MARKERS: readonly unknown[] = ['inf', 'Infinity', null];

/** Ideality factors outside this range are not physical for junction diodes and LEDs. */
const IDEALITY_MIN = 0.5;
const IDEALITY_MAX = 20;

/** Open-loop gain assumed when a part does not state it: 100 dB (common practice for bipolar and JFET-input op-amps, from memory). */
const DEFAULT_OPEN_LOOP_GAIN = 1e5;

function optionalVolts(value: unknown, path: string, where: Locator): number | null {
  return value === undefined ? null : parseValue(value, where.at(path), 'volt', { allowZero: true });
}

function readUnlimited(value: unknown, path: string, where: Locator, unit: 'hertz' | 'volt' | 'voltPerSecond' | 'ratio'): number {
  if (UNLIMITED_MARKERS.includes(value)) return Infinity;
  return parseValue(value, where.at(path), unit);
}

/** One diode entry (parts file, inline `parts`, or an inline diode object in a stage). */
export function parseDiodeEntry(raw: unknown, name: string, path: string, where: Locator, defaultSource: string): DiodeParams {
  const what = `diode "${name}"`;
  const entry = readObject(raw, path, where, what);
  rejectUnknownFields(entry, fieldNames(DIODE_FIELDS), path, where, what);
  const field = (key: string): unknown => requireField(entry, key, path, where, what);
  const saturationCurrent = parseValue(field('saturationCurrent'), where.at(childPath(path, 'saturationCurrent')), 'ampere');
  const ideality = readNumberInRange(field('ideality'), childPath(path, 'ideality'), where, 'an ideality factor', IDEALITY_MIN, IDEALITY_MAX);
  return {
    name,
    saturationCurrent,
    ideality,
    seriesResistance: parseValue(field('seriesResistance'), where.at(childPath(path, 'seriesResistance')), 'ohm', { allowZero: true }),
    ratedCurrent:
      entry.ratedCurrent === undefined ? Infinity : parseValue(entry.ratedCurrent, where.at(childPath(path, 'ratedCurrent')), 'ampere'),
    ...(entry.ranges === undefined ? {} : { ranges: readRanges(entry.ranges, DIODE_RANGE_KEYS, { saturationCurrent, ideality }, childPath(path, 'ranges'), where, what) }),
    source: entry.source === undefined ? defaultSource : readString(entry.source, childPath(path, 'source'), where, 'a source note'),
  };
}

export function parseOpampEntry(raw: unknown, name: string, path: string, where: Locator, defaultSource: string): OpampParams {
  const what = `op-amp "${name}"`;
  const entry = readObject(raw, path, where, what);
  rejectUnknownFields(entry, fieldNames(OPAMP_FIELDS), path, where, what);
  const field = (key: string): unknown => requireField(entry, key, path, where, what);
  const at = (key: string): string => childPath(path, key);
  const opamp: OpampParams = {
    name,
    gbwHz: readUnlimited(field('gbwHz'), at('gbwHz'), where, 'hertz'),
    slewRateVoltsPerSecond: readUnlimited(field('slewRateVoltsPerSecond'), at('slewRateVoltsPerSecond'), where, 'voltPerSecond'),
    headroomLowVolts: parseValue(field('headroomLowVolts'), where.at(at('headroomLowVolts')), 'volt', { allowZero: true }),
    headroomHighVolts: parseValue(field('headroomHighVolts'), where.at(at('headroomHighVolts')), 'volt', { allowZero: true }),
    supplyMinVolts: parseValue(field('supplyMinVolts'), where.at(at('supplyMinVolts')), 'volt', { allowZero: true }),
    supplyMaxVolts: readUnlimited(field('supplyMaxVolts'), at('supplyMaxVolts'), where, 'volt'),
    openLoopGain: entry.openLoopGain === undefined ? DEFAULT_OPEN_LOOP_GAIN : readUnlimited(entry.openLoopGain, at('openLoopGain'), where, 'ratio'),
    commonModeLowVolts: optionalVolts(entry.commonModeLowVolts, at('commonModeLowVolts'), where),
    commonModeHighVolts: optionalVolts(entry.commonModeHighVolts, at('commonModeHighVolts'), where),
    noiseVoltage: entry.noiseVoltage === undefined ? null : parseValue(entry.noiseVoltage, where.at(at('noiseVoltage')), 'volt', { allowZero: true }),
    noiseCurrent: entry.noiseCurrent === undefined ? null : parseValue(entry.noiseCurrent, where.at(at('noiseCurrent')), 'ampere', { allowZero: true }),
    ranges: {},
    source: entry.source === undefined ? defaultSource : readString(entry.source, at('source'), where, 'a source note'),
  };
  if (opamp.supplyMaxVolts < opamp.supplyMinVolts) {
    throw new UserError(`${where.at(at('supplyMaxVolts'))}: ${opamp.supplyMaxVolts} V is below supplyMinVolts (${opamp.supplyMinVolts} V)`);
  }
  opamp.ranges = readRanges(entry.ranges, OPAMP_RANGE_KEYS, { gbwHz: opamp.gbwHz, slewRateVoltsPerSecond: opamp.slewRateVoltsPerSecond }, at('ranges'), where, what);
  return opamp;
}

const OPAMP_RANGE_KEYS = ['gbwHz', 'slewRateVoltsPerSecond'] as const;

/** Pinch-off voltages beyond this are not small-signal JFETs (volts). */
const PINCH_OFF_MAX_VOLTS = 20;
/** Current gains outside this range are not transistors anyone solders into a pedal. */
const BETA_MIN = 0.01;
const BETA_MAX = 10000;

/** `ranges`: { key: { min, max } } for the listed keys; each typical value must lie inside its range. */
function readRanges<K extends string>(
  raw: unknown,
  keys: readonly K[],
  typical: Readonly<Record<K, number>>,
  path: string,
  where: Locator,
  what: string,
): Partial<Record<K, ParamRange>> {
  const ranges: Partial<Record<K, ParamRange>> = {};
  if (raw === undefined) return ranges;
  const object = readObject(raw, path, where, `${what} ranges`);
  rejectUnknownFields(object, [...keys], path, where, `${what} ranges`);
  for (const key of keys) {
    if (object[key] === undefined) continue;
    const at = childPath(path, key);
    const range = readObject(object[key], at, where, 'a range');
    rejectUnknownFields(range, ['min', 'max'], at, where, 'a range');
    const min = readNumberInRange(requireField(range, 'min', at, where, 'a range'), childPath(at, 'min'), where, 'a number', -Number.MAX_VALUE, Number.MAX_VALUE);
    const max = readNumberInRange(requireField(range, 'max', at, where, 'a range'), childPath(at, 'max'), where, 'a number', -Number.MAX_VALUE, Number.MAX_VALUE);
    if (min > max) throw new UserError(`${where.at(at)}: min ${min} is above max ${max}`);
    if (typical[key] < min || typical[key] > max) {
      throw new UserError(`${where.at(at)}: the typical ${key} ${typical[key]} lies outside its range ${min} to ${max}`);
    }
    ranges[key] = { min, max };
  }
  return ranges;
}

function readEntry(raw: unknown, table: Readonly<Record<string, unknown>>, path: string, where: Locator, what: string) {
  const entry = readObject(raw, path, where, what);
  rejectUnknownFields(entry, Object.keys(table), path, where, what);
  return { entry, field: (key: string): unknown => requireField(entry, key, path, where, what), at: (key: string): string => childPath(path, key) };
}

function readSource(entry: Record<string, unknown>, path: string, where: Locator, defaultSource: string): string {
  return entry.source === undefined ? defaultSource : readString(entry.source, childPath(path, 'source'), where, 'a source note');
}

/** One bipolar transistor entry (parts file, inline `parts`, or an inline part in a circuit). */
export function parseBjtEntry(raw: unknown, name: string, path: string, where: Locator, defaultSource: string): BjtParams {
  const what = `transistor "${name}"`;
  const { entry, field, at } = readEntry(raw, BJT_FIELDS, path, where, what);
  const polarity = readString(field('polarity'), at('polarity'), where, 'npn or pnp');
  if (polarity !== 'npn' && polarity !== 'pnp') throw new UserError(`${where.at(at('polarity'))}: "${polarity}" is not a transistor polarity (expected npn or pnp)`);
  const saturationCurrent = parseValue(field('saturationCurrent'), where.at(at('saturationCurrent')), 'ampere');
  const betaForward = readNumberInRange(field('betaForward'), at('betaForward'), where, 'a current gain', BETA_MIN, BETA_MAX);
  const betaReverse = readNumberInRange(field('betaReverse'), at('betaReverse'), where, 'a current gain', BETA_MIN, BETA_MAX);
  const ideality = entry.ideality === undefined ? 1 : readNumberInRange(entry.ideality, at('ideality'), where, 'an emission coefficient', IDEALITY_MIN, IDEALITY_MAX);
  return {
    name,
    polarity,
    saturationCurrent,
    betaForward,
    betaReverse,
    ideality,
    ranges: readRanges(entry.ranges, BJT_RANGE_KEYS, { saturationCurrent, betaForward }, at('ranges'), where, what),
    source: readSource(entry, path, where, defaultSource),
  };
}

/** One JFET entry (parts file, inline `parts`, or an inline part in a circuit). */
export function parseJfetEntry(raw: unknown, name: string, path: string, where: Locator, defaultSource: string): JfetParams {
  const what = `JFET "${name}"`;
  const { entry, field, at } = readEntry(raw, JFET_FIELDS, path, where, what);
  const polarity = readString(field('polarity'), at('polarity'), where, 'n or p');
  if (polarity !== 'n' && polarity !== 'p') throw new UserError(`${where.at(at('polarity'))}: "${polarity}" is not a JFET channel (expected n or p)`);
  const idss = parseValue(field('idss'), where.at(at('idss')), 'ampere');
  const pinchOff = readNumberInRange(field('pinchOff'), at('pinchOff'), where, 'a pinch-off voltage in volts', -PINCH_OFF_MAX_VOLTS, PINCH_OFF_MAX_VOLTS);
  if (pinchOff === 0 || (polarity === 'n') !== pinchOff < 0) {
    throw new UserError(`${where.at(at('pinchOff'))}: ${pinchOff} V does not fit a ${polarity}-channel JFET (expected ${polarity === 'n' ? 'a negative' : 'a positive'} VGS(off))`);
  }
  const lambda = entry.lambda === undefined ? 0 : readNumberInRange(entry.lambda, at('lambda'), where, 'a channel-length modulation in 1/V', 0, 1);
  return {
    name,
    polarity,
    idss,
    pinchOff,
    lambda,
    ranges: readRanges(entry.ranges, JFET_RANGE_KEYS, { idss, pinchOff }, at('ranges'), where, what),
    source: readSource(entry, path, where, defaultSource),
  };
}

/**
 * Add the parts of a parts-file object (`{ diodes: {...}, opamps: {...} }`) to `library`, replacing
 * parts of the same name. Returns the same library.
 */
export function addPartsFromObject(library: PartsLibrary, raw: unknown, path: string, where: Locator): PartsLibrary {
  const parts = readObject(raw, path, where, 'a parts list');
  rejectUnknownFields(parts, fieldNames(PARTS_FILE_FIELDS), path, where, 'a parts list');
  const defaultSource = `defined in ${where.fileName}`;
  if (parts.diodes !== undefined) {
    const diodesPath = childPath(path, 'diodes');
    for (const [name, entry] of Object.entries(readObject(parts.diodes, diodesPath, where, 'diodes by name'))) {
      const key = name.toLowerCase();
      library.diodes.set(key, parseDiodeEntry(entry, key, childPath(diodesPath, name), where, defaultSource));
    }
  }
  if (parts.opamps !== undefined) {
    const opampsPath = childPath(path, 'opamps');
    for (const [name, entry] of Object.entries(readObject(parts.opamps, opampsPath, where, 'op-amps by name'))) {
      const key = name.toLowerCase();
      library.opamps.set(key, parseOpampEntry(entry, key, childPath(opampsPath, name), where, defaultSource));
    }
  }
  if (parts.bjts !== undefined) {
    const bjtsPath = childPath(path, 'bjts');
    for (const [name, entry] of Object.entries(readObject(parts.bjts, bjtsPath, where, 'transistors by name'))) {
      const key = name.toLowerCase();
      library.bjts.set(key, parseBjtEntry(entry, key, childPath(bjtsPath, name), where, defaultSource));
    }
  }
  if (parts.jfets !== undefined) {
    const jfetsPath = childPath(path, 'jfets');
    for (const [name, entry] of Object.entries(readObject(parts.jfets, jfetsPath, where, 'JFETs by name'))) {
      const key = name.toLowerCase();
      library.jfets.set(key, parseJfetEntry(entry, key, childPath(jfetsPath, name), where, defaultSource));
    }
  }
  return library;
}

function readPartsFile(library: PartsLibrary, filePath: string): void {
  let text: string;
  try {
    text = readFileSync(filePath, 'utf8');
  } catch (error) {
    const reason = (error as NodeJS.ErrnoException).code === 'ENOENT' ? 'file not found' : (error as Error).message;
    throw new UserError(`${filePath}: cannot read parts file (${reason})`);
  }
  addPartsFromObject(library, parseJsonText(text, filePath), '', new Locator(filePath));
}

/** The bundled library, plus the parts of `extraPartsFile` (same format) when given. */
export function loadPartsLibrary(extraPartsFile?: string): PartsLibrary {
  const library: PartsLibrary = { diodes: new Map(), opamps: new Map(), bjts: new Map(), jfets: new Map() };
  readPartsFile(library, BUNDLED_PARTS_PATH);
  if (extraPartsFile !== undefined) readPartsFile(library, extraPartsFile);
  return library;
}

/** A copy whose maps can be extended without touching the original. */
export function copyPartsLibrary(library: PartsLibrary): PartsLibrary {
  return { diodes: new Map(library.diodes), opamps: new Map(library.opamps), bjts: new Map(library.bjts), jfets: new Map(library.jfets) };
}

function lookupPart<T>(parts: Map<string, T>, name: unknown, path: string, where: Locator, kind: string): T {
  const partName = readString(name, path, where, `${kind} part name`);
  const part = parts.get(partName.toLowerCase());
  if (part === undefined) {
    throw new UserError(`${where.at(path)}: unknown ${kind} "${partName}" ${suggestionText(partName.toLowerCase(), [...parts.keys()])}`);
  }
  return part;
}

export function lookupDiode(library: PartsLibrary, name: unknown, path: string, where: Locator): DiodeParams {
  return lookupPart(library.diodes, name, path, where, 'diode');
}

export function lookupOpamp(library: PartsLibrary, name: unknown, path: string, where: Locator): OpampParams {
  return lookupPart(library.opamps, name, path, where, 'op-amp');
}

export function lookupBjt(library: PartsLibrary, name: unknown, path: string, where: Locator): BjtParams {
  return lookupPart(library.bjts, name, path, where, 'transistor');
}

export function lookupJfet(library: PartsLibrary, name: unknown, path: string, where: Locator): JfetParams {
  return lookupPart(library.jfets, name, path, where, 'JFET');
}
