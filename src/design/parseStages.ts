/**
 * Raw JSON stage objects to typed stage specs. Field names come from `fields.ts`; every error names
 * the JSON path, the value and what was expected.
 */
import { UserError } from '../errors.js';
import { POT_FIELDS, STAGE_FIELDS, STAGE_TYPES, fieldNames } from './fields.js';
import { childPath, type Locator } from './locator.js';
import { lookupOpamp } from './parts.js';
import {
  isRawObject,
  readBoolean,
  readCount,
  readObject,
  readString,
  rejectUnknownFields,
  requireField,
  type RawObject,
} from './rawReaders.js';
import { suggestionText } from './suggest.js';
import { parseCircuitStage } from './parseCircuit.js';
import { readDiode, readTaper, STAGE_ID_PATTERN, useKnob, type StageParseContext } from './stageReaders.js';
import { parseTolerance } from './tolerances.js';
import type { ClipperStage, DiodeParams, GainStage, Pot, Resistance, Stage, StageType, Taper } from './types.js';
import { parseValue } from './values.js';

/** Reads the fields of one raw stage object, each error naming `stages[i].field`. */
class StageReader {
  constructor(
    readonly raw: RawObject,
    readonly path: string,
    readonly id: string,
    readonly ctx: StageParseContext,
  ) {}

  has(key: string): boolean {
    return this.raw[key] !== undefined;
  }

  at(key: string): string {
    return childPath(this.path, key);
  }

  private required(key: string): unknown {
    return requireField(this.raw, key, this.path, this.ctx.where, `stage "${this.id}"`);
  }

  capacitance(key: string): number {
    return parseValue(this.required(key), this.ctx.where.at(this.at(key)), 'farad');
  }

  optionalCapacitance(key: string): number | null {
    return this.has(key) ? this.capacitance(key) : null;
  }

  ohms(key: string, allowZero = false): number {
    return parseValue(this.required(key), this.ctx.where.at(this.at(key)), 'ohm', { allowZero });
  }

  resistance(key: string, allowZero = false): Resistance {
    return readResistance(this.required(key), this.at(key), this.ctx, allowZero);
  }

  optionalResistance(key: string, fallback: Resistance | null, allowZero = false): Resistance | null {
    return this.has(key) ? this.resistance(key, allowZero) : fallback;
  }

  count(key: string, fallback: number): number {
    return this.has(key) ? readCount(this.raw[key], this.at(key), this.ctx.where) : fallback;
  }

  diode(key: string): DiodeParams {
    return readDiode(this.required(key), this.at(key), `${this.id}.${key}`, this.ctx);
  }

  knob(key: string): string {
    return useKnob(this.required(key), this.at(key), this.ctx);
  }

  taper(key: string, fallback: Taper): Taper {
    return this.has(key) ? readTaper(this.raw[key], this.at(key), this.ctx.where) : fallback;
  }

  /** An optional true/false field, false when absent. */
  flag(key: string): boolean {
    return this.has(key) ? readBoolean(this.raw[key], this.at(key), this.ctx.where) : false;
  }

  opamp(key: string) {
    return lookupOpamp(this.ctx.parts, this.required(key), this.at(key), this.ctx.where);
  }

  fail(problem: string): never {
    throw new UserError(`${this.ctx.where.at(this.path)}: stage "${this.id}" ${problem}`);
  }
}

function readPot(raw: RawObject, path: string, ctx: StageParseContext): Pot {
  rejectUnknownFields(raw, fieldNames(POT_FIELDS), path, ctx.where, 'a pot');
  const at = (key: string): string => childPath(path, key);
  const pot = requireField(raw, 'pot', path, ctx.where, 'a pot');
  return {
    fixedOhms: raw.fixed === undefined ? 0 : parseValue(raw.fixed, ctx.where.at(at('fixed')), 'ohm', { allowZero: true }),
    potOhms: parseValue(pot, ctx.where.at(at('pot')), 'ohm'),
    knob: useKnob(requireField(raw, 'knob', path, ctx.where, 'a pot'), at('knob'), ctx),
    taper: raw.taper === undefined ? 'linear' : readTaper(raw.taper, at('taper'), ctx.where),
    reverse: raw.reverse === undefined ? false : readBoolean(raw.reverse, at('reverse'), ctx.where),
  };
}

/** A resistor field: a value, or a pot object `{ fixed, pot, knob, taper, reverse }`. */
export function readResistance(value: unknown, path: string, ctx: StageParseContext, allowZero: boolean): Resistance {
  if (isRawObject(value)) return readPot(value, path, ctx);
  return parseValue(value, ctx.where.at(path), 'ohm', { allowZero });
}


function parseGain(stage: StageReader): GainStage {
  const rf = stage.optionalResistance('rf', 0, true) as Resistance;
  const rg = stage.optionalResistance('rg', null);
  const isUnity = rf === 0;
  if (!isUnity && rg === null) stage.fail('has rf but no rg (add rg, or omit rf for a unity buffer)');
  const cg = stage.optionalCapacitance('cg');
  if (cg !== null && rg === null) stage.fail('has cg but no rg (cg sits in series with rg)');
  const feedbackDiode = stage.has('feedbackDiode') ? stage.diode('feedbackDiode') : null;
  if (feedbackDiode === null && (stage.has('feedbackUp') || stage.has('feedbackDown'))) {
    stage.fail('has feedbackUp/feedbackDown but no feedbackDiode');
  }
  if (feedbackDiode !== null && isUnity) stage.fail('has feedbackDiode but no rf (the diodes sit across rf)');
  const defaultCount = feedbackDiode === null ? 0 : 1;
  return {
    id: stage.id,
    type: 'gain',
    opamp: stage.opamp('opamp'),
    rf,
    rg,
    cg,
    cf: stage.optionalCapacitance('cf'),
    feedbackDiode,
    feedbackUp: stage.count('feedbackUp', defaultCount),
    feedbackDown: stage.count('feedbackDown', defaultCount),
    railClipping: stage.flag('railClipping'),
  };
}

function parseClipper(stage: StageReader): ClipperStage {
  const diode = stage.diode('diode');
  return {
    id: stage.id,
    type: 'clipper',
    series: stage.resistance('series'),
    cap: stage.optionalCapacitance('cap'),
    diode,
    downDiode: stage.has('downDiode') ? stage.diode('downDiode') : diode,
    up: stage.count('up', 1),
    down: stage.count('down', 1),
  };
}

function parseTypedStage(type: StageType, stage: StageReader): Stage {
  const id = stage.id;
  switch (type) {
    case 'circuit':
      return parseCircuitStage(stage.raw, stage.path, id, stage.ctx);
    case 'input':
      return { id, type, series: stage.optionalResistance('series', 0, true) as Resistance, coupling: stage.capacitance('coupling'), pulldown: stage.resistance('pulldown') };
    case 'gain':
      return parseGain(stage);
    case 'clipper':
      return parseClipper(stage);
    case 'tone': {
      const r: Pot = {
        fixedOhms: stage.has('fixed') ? stage.ohms('fixed', true) : 0,
        potOhms: stage.ohms('pot'),
        knob: stage.knob('knob'),
        taper: stage.taper('taper', 'linear'),
        reverse: stage.flag('reverse'),
      };
      return { id, type, r, cap: stage.capacitance('cap') };
    }
    case 'lowpass':
    case 'highpass':
      return { id, type, r: stage.resistance('r'), c: stage.capacitance('c') };
    case 'volume':
      return { id, type, potOhms: stage.ohms('pot'), knob: stage.knob('knob'), taper: stage.taper('taper', 'audio'), reverse: stage.flag('reverse') };
  }
}

function readStageType(raw: RawObject, path: string, where: Locator): StageType {
  const typePath = childPath(path, 'type');
  const type = readString(requireField(raw, 'type', path, where, 'a stage'), typePath, where, 'a stage type');
  if (!(STAGE_TYPES as string[]).includes(type)) {
    throw new UserError(`${where.at(typePath)}: unknown stage type "${type}" ${suggestionText(type, STAGE_TYPES)}`);
  }
  return type as StageType;
}

function readStageId(raw: RawObject, path: string, where: Locator): string {
  const idPath = childPath(path, 'id');
  const id = readString(requireField(raw, 'id', path, where, 'a stage'), idPath, where, 'a stage id');
  if (!STAGE_ID_PATTERN.test(id)) {
    throw new UserError(`${where.at(idPath)}: ${JSON.stringify(id)} is not a valid stage id (expected letters, digits, - or _, starting with a letter)`);
  }
  return id;
}

/** One stage object at `stages[index]`. */
export function parseStage(raw: unknown, path: string, ctx: StageParseContext): Stage {
  const object = readObject(raw, path, ctx.where, 'a stage');
  const type = readStageType(object, path, ctx.where);
  const id = readStageId(object, path, ctx.where);
  rejectUnknownFields(object, fieldNames(STAGE_FIELDS[type]), path, ctx.where, `a ${type} stage`);
  const stage = parseTypedStage(type, new StageReader(object, path, id, ctx));
  if (object.tolerance !== undefined) readStageTolerances(object.tolerance, childPath(path, 'tolerance'), stage, ctx);
  return stage;
}

/** A stage's `tolerance` map: its keys are the stage's part fields (a circuit stage's: element ids). */
function readStageTolerances(value: unknown, path: string, stage: Stage, ctx: StageParseContext): void {
  const parts =
    stage.type === 'circuit'
      ? stage.elements.map((element) => element.id)
      : fieldNames(STAGE_FIELDS[stage.type]).filter((field) => !['id', 'type', 'tolerance', 'knob', 'taper', 'reverse', 'up', 'down', 'feedbackUp', 'feedbackDown', 'railClipping'].includes(field));
  for (const [key, tolerance] of Object.entries(readObject(value, path, ctx.where, 'tolerances by part'))) {
    const keyPath = childPath(path, key);
    if (!parts.includes(key)) throw new UserError(`${ctx.where.at(keyPath)}: "${key}" is not a part of stage "${stage.id}" ${suggestionText(key, parts)}`);
    ctx.tolerances.set(`${stage.id}.${key}`, parseTolerance(tolerance, keyPath, ctx.where));
  }
}
