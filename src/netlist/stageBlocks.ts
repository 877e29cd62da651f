/**
 * The named stage types as netlist fragments (blocks) for the circuit core: each stage, at the
 * design's knob positions, becomes a `circuit` stage of resistors, capacitors, diodes and op-amps
 * between its input node `in` and its output node `out`, with the bias point `vref` as its signal
 * ground (the named stages work relative to the bias; docs/models.md, "Named stage types").
 *
 * The take (or the stage before) drives `in` as an ideal source at 0 V DC; a block reaches its bias
 * through an AC coupling the compiler adds in front (`#couple`, 1 F into 1 G to vref: its corner,
 * 0.16 nHz, and its noise, 4 pA/sqrt(Hz) into an ideal source, are far below anything measured), so
 * a gain stage or a clipper rests at vref as the named model assumes. Ids with '#' are the
 * compiler's aids, not parts: they carry no noise (netlist/assemble.ts).
 *
 * `STAGE_BLOCKS` is the one table of block builders; its type requires an entry for every named
 * stage type.
 */
import type {
  CircuitElement,
  CircuitStage,
  ClipperStage,
  DiodeParams,
  GainStage,
  InputStage,
  RcStage,
  Stage,
  ToneStage,
  VolumeStage,
} from '../design/types.js';
import { REFERENCE_NODE } from '../design/types.js';
import { POT_END_OHMS } from './assemble.js';

export type NamedStage = Exclude<Stage<number>, CircuitStage>;

const IN = 'in';
const OUT = 'out';
const COUPLED = 'in#coupled';
const COUPLING_FARADS = 1;
const COUPLING_BIAS_OHMS = 1e9;

type BlockBuilder<S extends NamedStage> = (stage: S, knobs: Readonly<Record<string, number>>) => CircuitElement[];

/** A resistor that may be 0 ohms in the named model: at least a pot's end resistance here. */
function resistor(id: string, a: string, b: string, ohms: number): CircuitElement {
  return { id, type: 'resistor', nodes: [a, b], ohms: Math.max(POT_END_OHMS, ohms) };
}

function capacitor(id: string, a: string, b: string, farads: number): CircuitElement {
  return { id, type: 'capacitor', nodes: [a, b], farads };
}

function diodes(id: string, anode: string, cathode: string, diode: DiodeParams, count: number): CircuitElement[] {
  return count > 0 ? [{ id, type: 'diode', nodes: [anode, cathode], diode, count }] : [];
}

const inputBlock: BlockBuilder<InputStage<number>> = (stage) => [
  ...(stage.series > 0 ? [resistor('series', COUPLED, 'a', stage.series), capacitor('coupling', 'a', OUT, stage.coupling)] : [capacitor('coupling', COUPLED, OUT, stage.coupling)]),
  resistor('pulldown', OUT, REFERENCE_NODE, stage.pulldown),
];

/** Non-inverting op-amp: Rf (with Cf and feedback diodes across it) from out to the inverting input, Rg (with Cg in series) to vref. */
const gainBlock: BlockBuilder<GainStage<number>> = (stage) => {
  const opamp = (minus: string): CircuitElement => ({ id: 'opamp', type: 'opamp', nodes: [COUPLED, minus, OUT], opamp: stage.opamp });
  if (stage.rg === null) return [opamp(OUT)];
  const ground = stage.cg === null ? [resistor('rg', 'm', REFERENCE_NODE, stage.rg)] : [resistor('rg', 'm', 'g', stage.rg), capacitor('cg', 'g', REFERENCE_NODE, stage.cg)];
  return [
    opamp('m'),
    resistor('rf', OUT, 'm', stage.rf),
    ...(stage.cf === null ? [] : [capacitor('cf', OUT, 'm', stage.cf)]),
    ...ground,
    ...(stage.feedbackDiode === null
      ? []
      : [...diodes('feedbackUp', OUT, 'm', stage.feedbackDiode, stage.feedbackUp), ...diodes('feedbackDown', 'm', OUT, stage.feedbackDiode, stage.feedbackDown)]),
  ];
};

const clipperBlock: BlockBuilder<ClipperStage<number>> = (stage) => [
  resistor('series', COUPLED, OUT, stage.series),
  ...diodes('up', OUT, REFERENCE_NODE, stage.diode, stage.up),
  ...diodes('down', REFERENCE_NODE, OUT, stage.downDiode, stage.down),
  ...(stage.cap === null ? [] : [capacitor('cap', OUT, REFERENCE_NODE, stage.cap)]),
];

const toneBlock: BlockBuilder<ToneStage<number>> = (stage) => [resistor('r', COUPLED, OUT, stage.r), capacitor('cap', OUT, REFERENCE_NODE, stage.cap)];

const rcBlock: BlockBuilder<RcStage<number>> = (stage) =>
  stage.type === 'lowpass'
    ? [resistor('r', COUPLED, OUT, stage.r), capacitor('c', OUT, REFERENCE_NODE, stage.c)]
    : [capacitor('c', COUPLED, OUT, stage.c), resistor('r', OUT, REFERENCE_NODE, stage.r)];

/** A pot as a divider: lug 1 at vref, wiper out, lug 3 at the input, so out = taper(position) x in. */
const volumeBlock: BlockBuilder<VolumeStage> = (stage) => [
  { id: 'pot', type: 'pot', nodes: [REFERENCE_NODE, OUT, COUPLED], ohms: stage.potOhms, knob: stage.knob, taper: stage.taper, reverse: stage.reverse },
];

/** One builder per named stage type (the compiler's completeness check is this type). */
export const STAGE_BLOCKS: { readonly [T in NamedStage['type']]: BlockBuilder<Extract<NamedStage, { type: T }>> } = {
  input: inputBlock,
  gain: gainBlock,
  clipper: clipperBlock,
  tone: toneBlock,
  lowpass: rcBlock,
  highpass: rcBlock,
  volume: volumeBlock,
};

/** The named stage `stage` as a circuit stage (element ids are the stage's field names: `amp` + `rf` reads "amp.rf" in reports). */
export function namedStageCircuit(stage: NamedStage, knobs: Readonly<Record<string, number>>): CircuitStage {
  const build = STAGE_BLOCKS[stage.type] as BlockBuilder<NamedStage>;
  const coupling: CircuitElement[] = [capacitor('#couple', IN, COUPLED, COUPLING_FARADS), resistor('#bias', COUPLED, REFERENCE_NODE, COUPLING_BIAS_OHMS)];
  return { id: stage.id, type: 'circuit', input: IN, output: OUT, elements: [...coupling, ...build(stage, knobs)] };
}
