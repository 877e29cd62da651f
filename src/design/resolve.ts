/**
 * From a design with pots to plain values: each pot becomes its resistance at the design's knob
 * positions, R = fixed + pot * taper(position) (a tone pot: taper(1 - position), brighter clockwise).
 */
import type { Design, Pot, Resistance, Stage } from './types.js';
import { potFraction } from './taper.js';

/** Position of `knob` (0..1); every knob a pot references is in `design.knobs` after parsing. */
export function knobPosition(knobs: Readonly<Record<string, number>>, knob: string): number {
  const position = knobs[knob];
  if (position === undefined) throw new Error(`internal: knob "${knob}" has no position`);
  return position;
}

export function isPot(r: Resistance): r is Pot {
  return typeof r !== 'number';
}

/** Resistance in ohms at the given knob positions. */
export function resolveResistance(r: Resistance, knobs: Readonly<Record<string, number>>): number {
  if (!isPot(r)) return r;
  return r.fixedOhms + r.potOhms * potFraction(r.taper, knobPosition(knobs, r.knob), r.reverse);
}

/** Lowest and highest resistance over the whole rotation (a fixed resistor gives min = max). */
export function resistanceRange(r: Resistance): { minOhms: number; maxOhms: number } {
  if (!isPot(r)) return { minOhms: r, maxOhms: r };
  return { minOhms: r.fixedOhms, maxOhms: r.fixedOhms + r.potOhms };
}

function resolveStage(stage: Stage<Resistance>, knobs: Readonly<Record<string, number>>): Stage<number> {
  const ohms = (r: Resistance): number => resolveResistance(r, knobs);
  switch (stage.type) {
    case 'circuit':
      return stage; // pots keep their knobs; the netlist assembler reads the positions
    case 'input':
      return { ...stage, series: ohms(stage.series), pulldown: ohms(stage.pulldown) };
    case 'gain':
      return { ...stage, rf: ohms(stage.rf), rg: stage.rg === null ? null : ohms(stage.rg) };
    case 'clipper':
      return { ...stage, series: ohms(stage.series) };
    case 'tone':
      // Wired as tone controls are (common practice): clockwise is brighter, less resistance before
      // the capacitor; `reverse` wires it the other way round.
      return { ...stage, r: ohms(isPot(stage.r) ? { ...stage.r, reverse: !stage.r.reverse } : stage.r) };
    case 'lowpass':
    case 'highpass':
      return { ...stage, r: ohms(stage.r) };
    case 'volume':
      return { ...stage };
  }
}

/** The design at its own knob positions (`design.knobs`), every resistance in ohms. */
export function resolveDesign(design: Design<Resistance>): Design<number> {
  return { ...design, knobs: { ...design.knobs }, stages: design.stages.map((stage) => resolveStage(stage, design.knobs)) };
}
