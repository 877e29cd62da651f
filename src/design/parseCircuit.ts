/**
 * A `circuit` stage's JSON to a typed netlist: every element's type, id, nodes (their count fixed by
 * the type) and fields, each error naming the JSON path and the element. The structure of the
 * netlist as a whole (DC paths, source loops, op-amp feedback) is checked by `netlist/validate.ts`.
 */
import { UserError } from '../errors.js';
import { ELEMENT_FIELDS, ELEMENT_PIN_COUNT, ELEMENT_TYPES, fieldNames } from './fields.js';
import { childPath } from './locator.js';
import { lookupBjt, lookupJfet, lookupOpamp, parseBjtEntry, parseJfetEntry } from './parts.js';
import { isRawObject, readBoolean, readObject, readString, rejectUnknownFields, requireField, showRaw, type RawObject } from './rawReaders.js';
import { readDiode, readTaper, STAGE_ID_PATTERN, useKnob, type StageParseContext } from './stageReaders.js';
import { parseTolerance } from './tolerances.js';
import { suggestionText } from './suggest.js';
import { RESERVED_NODES, type CircuitElement, type CircuitStage, type ElementType } from './types.js';
import { parseValue } from './values.js';
import { validateNetlist } from './netlistChecks.js';

export const NODE_NAME_PATTERN = /^[A-Za-z0-9_-]+$/;
/** Most diodes in one series string. */
const MAX_SERIES_DIODES = 10;

/** Reads one element object at `path`. */
class ElementReader {
  constructor(
    private readonly raw: RawObject,
    private readonly path: string,
    readonly id: string,
    readonly type: ElementType,
    private readonly stageId: string,
    private readonly ctx: StageParseContext,
  ) {}

  at(key: string): string {
    return childPath(this.path, key);
  }

  field(key: string): unknown {
    return requireField(this.raw, key, this.path, this.ctx.where, `element "${this.id}"`);
  }

  has(key: string): boolean {
    return this.raw[key] !== undefined;
  }

  fail(problem: string, key?: string): never {
    throw new UserError(`${this.ctx.where.at(key === undefined ? this.path : this.at(key))}: stage "${this.stageId}" element "${this.id}" ${problem}`);
  }

  nodes(): string[] {
    const raw = this.field('nodes');
    const expected = ELEMENT_PIN_COUNT[this.type];
    if (!Array.isArray(raw)) this.fail(`nodes: expected an array of ${expected} node names, found ${showRaw(raw)}`, 'nodes');
    if (raw.length !== expected) {
      this.fail(`has ${raw.length} node${raw.length === 1 ? '' : 's'} but a ${this.type} takes ${expected} (${ELEMENT_FIELDS[this.type].nodes!.description.replace(/^Nodes, in order: /, '')})`, 'nodes');
    }
    return raw.map((name: unknown, index) => {
      const at = childPath(this.at('nodes'), index);
      if (typeof name !== 'string' || !NODE_NAME_PATTERN.test(name)) {
        throw new UserError(`${this.ctx.where.at(at)}: ${showRaw(name)} is not a node name (expected letters, digits, - or _)`);
      }
      return name;
    });
  }

  /** A part: a library name, or an inline object parsed by `inline`. */
  part<T>(lookup: (name: unknown, path: string) => T, inline: (raw: RawObject, path: string) => T): T {
    const raw = this.field('part');
    return isRawObject(raw) ? inline(raw, this.at('part')) : lookup(raw, this.at('part'));
  }
}

function readElementType(raw: RawObject, path: string, ctx: StageParseContext): ElementType {
  const typePath = childPath(path, 'type');
  const type = readString(requireField(raw, 'type', path, ctx.where, 'an element'), typePath, ctx.where, 'an element type');
  if (!(ELEMENT_TYPES as string[]).includes(type)) {
    throw new UserError(`${ctx.where.at(typePath)}: unknown element type "${type}" ${suggestionText(type, ELEMENT_TYPES)}`);
  }
  return type as ElementType;
}

function readElementId(raw: RawObject, path: string, ctx: StageParseContext): string {
  const idPath = childPath(path, 'id');
  const id = readString(requireField(raw, 'id', path, ctx.where, 'an element'), idPath, ctx.where, 'an element id');
  if (!STAGE_ID_PATTERN.test(id)) {
    throw new UserError(`${ctx.where.at(idPath)}: ${JSON.stringify(id)} is not a valid element id (expected letters, digits, - or _, starting with a letter)`);
  }
  return id;
}

function parseElement(raw: unknown, path: string, stageId: string, ctx: StageParseContext): CircuitElement {
  const object = readObject(raw, path, ctx.where, 'an element');
  const type = readElementType(object, path, ctx);
  const id = readElementId(object, path, ctx);
  rejectUnknownFields(object, fieldNames(ELEMENT_FIELDS[type]), path, ctx.where, `a ${type}`);
  if (object.tolerance !== undefined) ctx.tolerances.set(`${stageId}.${id}`, parseTolerance(object.tolerance, childPath(path, 'tolerance'), ctx.where));
  const e = new ElementReader(object, path, id, type, stageId, ctx);
  const where = (key: string): string => ctx.where.at(e.at(key));
  switch (type) {
    case 'resistor':
      return { id, type, nodes: e.nodes() as [string, string], ohms: parseValue(e.field('value'), where('value'), 'ohm') };
    case 'capacitor':
      return { id, type, nodes: e.nodes() as [string, string], farads: parseValue(e.field('value'), where('value'), 'farad') };
    case 'pot':
      return {
        id,
        type,
        nodes: e.nodes() as [string, string, string],
        ohms: parseValue(e.field('value'), where('value'), 'ohm'),
        knob: useKnob(e.field('knob'), e.at('knob'), ctx),
        taper: e.has('taper') ? readTaper(object.taper, e.at('taper'), ctx.where) : 'linear',
        reverse: e.has('reverse') ? readBoolean(object.reverse, e.at('reverse'), ctx.where) : false,
      };
    case 'diode': {
      const count = e.has('count') ? object.count : 1;
      if (typeof count !== 'number' || !Number.isInteger(count) || count < 1 || count > MAX_SERIES_DIODES) {
        return e.fail(`count: ${showRaw(count)} is not a number of diodes in series (expected a whole number from 1 to ${MAX_SERIES_DIODES})`, 'count');
      }
      return { id, type, nodes: e.nodes() as [string, string], diode: readDiode(e.field('part'), e.at('part'), `${stageId}.${id}`, ctx), count };
    }
    case 'opamp':
      return { id, type, nodes: e.nodes() as [string, string, string], opamp: lookupOpamp(ctx.parts, e.field('part'), e.at('part'), ctx.where) };
    case 'npn':
    case 'pnp': {
      const bjt = e.part(
        (name, at) => lookupBjt(ctx.parts, name, at, ctx.where),
        (inline, at) => parseBjtEntry(inline, `${stageId}.${id}`, at, ctx.where, `inline in ${ctx.where.fileName}`),
      );
      if (bjt.polarity !== type) e.fail(`is ${type === 'npn' ? 'an npn' : 'a pnp'} element but part "${bjt.name}" is ${bjt.polarity}`, 'part');
      return { id, type, nodes: e.nodes() as [string, string, string], bjt };
    }
    case 'njfet':
    case 'pjfet': {
      const jfet = e.part(
        (name, at) => lookupJfet(ctx.parts, name, at, ctx.where),
        (inline, at) => parseJfetEntry(inline, `${stageId}.${id}`, at, ctx.where, `inline in ${ctx.where.fileName}`),
      );
      if (`${jfet.polarity}jfet` !== type) e.fail(`is a ${type} element but part "${jfet.name}" is ${jfet.polarity}-channel`, 'part');
      return { id, type, nodes: e.nodes() as [string, string, string], jfet };
    }
  }
}

function readNodeField(raw: RawObject, key: 'input' | 'output', path: string, stageId: string, ctx: StageParseContext): string {
  const at = childPath(path, key);
  const name = readString(requireField(raw, key, path, ctx.where, `stage "${stageId}"`), at, ctx.where, 'a node name');
  if (!NODE_NAME_PATTERN.test(name)) throw new UserError(`${ctx.where.at(at)}: ${JSON.stringify(name)} is not a node name (expected letters, digits, - or _)`);
  if (RESERVED_NODES.includes(name)) {
    throw new UserError(`${ctx.where.at(at)}: the ${key} cannot be the reserved node "${name}" (gnd, vcc and vref are fixed voltages)`);
  }
  return name;
}

/** A circuit stage object at `path` (its fields already checked against CIRCUIT_STAGE_FIELDS). */
export function parseCircuitStage(raw: RawObject, path: string, id: string, ctx: StageParseContext): CircuitStage {
  const input = readNodeField(raw, 'input', path, id, ctx);
  const output = readNodeField(raw, 'output', path, id, ctx);
  const elementsPath = childPath(path, 'elements');
  const list = requireField(raw, 'elements', path, ctx.where, `stage "${id}"`);
  if (!Array.isArray(list) || list.length === 0) {
    throw new UserError(`${ctx.where.at(elementsPath)}: expected a non-empty array of elements, found ${showRaw(list)}`);
  }
  const firstPathOfId = new Map<string, string>();
  const elements = list.map((rawElement: unknown, index) => {
    const elementPath = childPath(elementsPath, index);
    const element = parseElement(rawElement, elementPath, id, ctx);
    const earlier = firstPathOfId.get(element.id);
    if (earlier !== undefined) throw new UserError(`${ctx.where.at(childPath(elementPath, 'id'))}: duplicate element id "${element.id}" in stage "${id}" (already used by ${earlier})`);
    firstPathOfId.set(element.id, elementPath);
    return element;
  });
  const stage: CircuitStage = { id, type: 'circuit', input, output, elements };
  validateNetlist(stage, (index) => ctx.where.at(index === null ? path : childPath(elementsPath, index)));
  return stage;
}
