/**
 * The design-file vocabulary in one place: every stage type and field the parser accepts, with its
 * kind and meaning. The parser checks field names against these tables and the JSON Schema in
 * `shared/design.schema.json` is generated from them (see `designSchema.ts`), so the two cannot drift.
 */
import type { ElementType, StageType } from './types.js';

export type FieldKind =
  | 'id'
  | 'stageType'
  | 'name'
  | 'resistance' // value > 0 or a pot object
  | 'resistanceOrZero' // value >= 0 or a pot object
  | 'ohms' // plain value > 0 (never a pot)
  | 'ohmsOrZero'
  | 'capacitance'
  | 'volts'
  | 'voltsOrZero'
  | 'voltsOrInf'
  | 'amperes'
  | 'noiseDensity' // V/sqrt(Hz) or A/sqrt(Hz), zero or more
  | 'tolerance' // "5%", 0.05 or "datasheet"
  | 'toleranceMap' // { field or element id: tolerance }
  | 'toleranceKinds' // { part kind: tolerance }
  | 'hertzOrInf'
  | 'voltsPerSecondOrInf'
  | 'dimensionless'
  | 'temperature'
  | 'count'
  | 'knobName'
  | 'knobPositions'
  | 'taper'
  | 'boolean'
  | 'diode' // part name or inline diode object
  | 'opamp' // part name
  | 'stages'
  | 'node'
  | 'elements'
  | 'elementType'
  | 'nodes'
  | 'bjt' // part name or inline transistor object
  | 'jfet' // part name or inline JFET object
  | 'bjtPolarity'
  | 'jfetPolarity'
  | 'signedVolts'
  | 'ranges'
  | 'parts'
  | 'text';

export interface FieldSpec {
  kind: FieldKind;
  required: boolean;
  description: string;
}

type FieldTable = Readonly<Record<string, FieldSpec>>;

const required = (kind: FieldKind, description: string): FieldSpec => ({ kind, required: true, description });
const optional = (kind: FieldKind, description: string): FieldSpec => ({ kind, required: false, description });

const STAGE_HEAD: FieldTable = {
  id: required('id', 'Unique stage name (letters, digits, - and _), used by --set stageId.field=value'),
  type: required('stageType', 'Stage type'),
  tolerance: optional('toleranceMap', 'Tolerances of this stage\'s parts for spread, by field or element id, e.g. { "series": "1%" }'),
};

/** A `circuit` stage: any schematic as a list of elements (see ELEMENT_FIELDS). */
export const CIRCUIT_STAGE_FIELDS: FieldTable = {
  ...STAGE_HEAD,
  input: required('node', 'Node driven by the previous stage (or the take) as an ideal source at 0 V DC'),
  output: required('node', 'Node whose voltage (minus its DC operating point) is the stage output'),
  elements: required('elements', 'Resistors, capacitors, pots, diodes, op-amps and transistors, each with its nodes'),
};

export const STAGE_FIELDS: Readonly<Record<StageType, FieldTable>> = {
  circuit: CIRCUIT_STAGE_FIELDS,
  input: {
    ...STAGE_HEAD,
    series: optional('resistanceOrZero', 'Series resistor from the jack, ohms (default 0)'),
    coupling: required('capacitance', 'Coupling capacitor, farads'),
    pulldown: required('resistance', 'Pull-down resistor to the bias point after the coupling capacitor, ohms'),
  },
  gain: {
    ...STAGE_HEAD,
    opamp: required('opamp', 'Op-amp part name'),
    rf: optional('resistanceOrZero', 'Feedback resistor, ohms (0 or omitted with no rg: unity buffer)'),
    rg: optional('resistance', 'Resistor from the inverting input to the bias point, ohms'),
    cg: optional('capacitance', 'Capacitor in series with rg, farads'),
    cf: optional('capacitance', 'Capacitor across rf, farads'),
    feedbackDiode: optional('diode', 'Diode part (or inline diode) across rf: clipping inside the feedback loop'),
    feedbackUp: optional('count', 'Feedback diodes in series conducting for positive output (default 1 with feedbackDiode)'),
    feedbackDown: optional('count', 'Feedback diodes in series conducting for negative output (default 1 with feedbackDiode)'),
    railClipping: optional('boolean', 'Clipping at the op-amp rails is intended: check does not warn that the rails clip before the diodes (default false)'),
  },
  clipper: {
    ...STAGE_HEAD,
    series: required('resistance', 'Series resistor into the diodes, ohms'),
    cap: optional('capacitance', 'Capacitor across the diodes, farads (omitted: memoryless clipper)'),
    diode: required('diode', 'Diode part name or inline diode'),
    downDiode: optional('diode', 'Diode for the negative side (default: same as diode)'),
    up: optional('count', 'Diodes in series conducting for positive voltage (default 1, 0 = none)'),
    down: optional('count', 'Diodes in series conducting for negative voltage (default 1, 0 = none)'),
  },
  tone: {
    ...STAGE_HEAD,
    fixed: optional('ohmsOrZero', 'Fixed resistor in series with the tone pot, ohms (default 0)'),
    pot: required('ohms', 'Tone pot value, ohms'),
    knob: required('knobName', 'Knob that turns the tone pot'),
    taper: optional('taper', 'Tone pot taper (default linear)'),
    reverse: optional('boolean', 'Pot wired the other way round: clockwise darker (default false: clockwise brighter, the resistance falls as the knob turns up)'),
    cap: required('capacitance', 'Capacitor to the bias point, farads'),
  },
  lowpass: {
    ...STAGE_HEAD,
    r: required('resistance', 'Series resistor, ohms'),
    c: required('capacitance', 'Capacitor to the bias point, farads'),
  },
  highpass: {
    ...STAGE_HEAD,
    r: required('resistance', 'Resistor to the bias point, ohms'),
    c: required('capacitance', 'Series capacitor, farads'),
  },
  volume: {
    ...STAGE_HEAD,
    pot: required('ohms', 'Volume pot value, ohms'),
    knob: required('knobName', 'Knob that turns the volume pot'),
    taper: optional('taper', 'Volume pot taper (default audio)'),
    reverse: optional('boolean', 'Pot wired backwards (default false)'),
  },
};

export const STAGE_TYPES = Object.keys(STAGE_FIELDS) as StageType[];

const ELEMENT_HEAD: FieldTable = {
  id: required('id', 'Unique element name within the stage (letters, digits, - and _), used by --set stageId.elementId.field=value'),
  type: required('elementType', 'Element type'),
  tolerance: optional('tolerance', 'This part\'s tolerance for spread: "1%", 0.01 or "datasheet"'),
};

const nodesInOrder = (order: string): FieldSpec => required('nodes', `Nodes, in order: ${order}`);

/** The elements of a `circuit` stage and their fields; node order is part of each type's meaning. */
export const ELEMENT_FIELDS: Readonly<Record<ElementType, FieldTable>> = {
  resistor: { ...ELEMENT_HEAD, nodes: nodesInOrder('[a, b]'), value: required('resistance', 'Resistance, ohms') },
  capacitor: { ...ELEMENT_HEAD, nodes: nodesInOrder('[a, b]'), value: required('capacitance', 'Capacitance, farads') },
  pot: {
    ...ELEMENT_HEAD,
    nodes: nodesInOrder('[lug 1, wiper, lug 3]; a pot wired as a variable resistor repeats a node, [x, y, y]'),
    value: required('ohms', 'Track resistance lug 1 to lug 3, ohms'),
    knob: required('knobName', 'Knob that turns this pot (clockwise moves the wiper towards lug 3)'),
    taper: optional('taper', 'linear or audio (default linear): resistance lug 1 to wiper = taper(position) x value'),
    reverse: optional('boolean', 'Wired backwards: position p acts as 1 - p (default false)'),
  },
  diode: {
    ...ELEMENT_HEAD,
    nodes: nodesInOrder('[anode, cathode]'),
    part: required('diode', 'Diode part name or inline { saturationCurrent, ideality, seriesResistance }'),
    count: optional('count', 'Equal diodes in series (default 1)'),
  },
  opamp: { ...ELEMENT_HEAD, nodes: nodesInOrder('[non-inverting input, inverting input, output]; powered from gnd and vcc'), part: required('opamp', 'Op-amp part name') },
  npn: { ...ELEMENT_HEAD, nodes: nodesInOrder('[collector, base, emitter]'), part: required('bjt', 'NPN part name or inline transistor') },
  pnp: { ...ELEMENT_HEAD, nodes: nodesInOrder('[collector, base, emitter]'), part: required('bjt', 'PNP part name or inline transistor') },
  njfet: { ...ELEMENT_HEAD, nodes: nodesInOrder('[drain, gate, source]'), part: required('jfet', 'N-channel JFET part name or inline JFET') },
  pjfet: { ...ELEMENT_HEAD, nodes: nodesInOrder('[drain, gate, source]'), part: required('jfet', 'P-channel JFET part name or inline JFET') },
};

export const ELEMENT_TYPES = Object.keys(ELEMENT_FIELDS) as ElementType[];

/** Pins each element type takes. */
export const ELEMENT_PIN_COUNT: Readonly<Record<ElementType, number>> = {
  resistor: 2,
  capacitor: 2,
  pot: 3,
  diode: 2,
  opamp: 3,
  npn: 3,
  pnp: 3,
  njfet: 3,
  pjfet: 3,
};

/** A resistor field given as a potentiometer. */
export const POT_FIELDS: FieldTable = {
  fixed: optional('ohmsOrZero', 'Fixed resistance in series with the pot, ohms (default 0)'),
  pot: required('ohms', 'Pot value (end to end), ohms'),
  knob: required('knobName', 'Knob that turns this pot'),
  taper: optional('taper', 'Pot taper (default linear)'),
  reverse: optional('boolean', 'Pot wired backwards: position p acts as 1 - p (default false)'),
};

export const DESIGN_FIELDS: FieldTable = {
  $schema: optional('text', 'Optional reference to the JSON Schema'),
  $comment: optional('text', 'Free text, ignored'),
  name: optional('name', 'Design name (default: the file name)'),
  supply: required('volts', 'Single supply voltage, volts (the signal is biased at half of it)'),
  temperature: optional('temperature', 'Temperature in degrees C for the diode thermal voltage (default 25)'),
  knobs: optional('knobPositions', 'Knob positions 0..1 (0 = fully counter-clockwise); unlisted knobs sit at 0.5'),
  parts: optional('parts', 'Extra diode and op-amp parts, in the parts-file format'),
  tolerances: optional('toleranceKinds', 'Part tolerances for spread by kind, e.g. { "resistor": "1%", "capacitor": "5%", "diode": "datasheet" } (defaults: resistor 5 %, capacitor 10 %, pot 20 %, semiconductors datasheet)'),
  stages: required('stages', 'Stages in signal order'),
};

/** An inline diode (in a design) or a diode entry in a parts file. */
export const DIODE_FIELDS: FieldTable = {
  saturationCurrent: required('amperes', 'Shockley saturation current Is, amperes'),
  ideality: required('dimensionless', 'Ideality factor n'),
  seriesResistance: required('ohmsOrZero', 'Ohmic series resistance Rs, ohms'),
  ratedCurrent: optional('amperes', 'Continuous forward current rating, amperes (used by check)'),
  ranges: optional('ranges', 'Datasheet ranges for tolerance runs, e.g. { "saturationCurrent": { "min": 6e-10, "max": 5.6e-9 } } (the Is that keep VF within its limits)'),
  source: optional('text', 'Where the numbers come from'),
};

export const OPAMP_FIELDS: FieldTable = {
  gbwHz: required('hertzOrInf', 'Gain-bandwidth product, hertz ("inf" = unlimited)'),
  slewRateVoltsPerSecond: required('voltsPerSecondOrInf', 'Slew rate, volts per second ("inf" = unlimited)'),
  headroomLowVolts: required('voltsOrZero', 'Output swing limit above the negative rail, volts'),
  headroomHighVolts: required('voltsOrZero', 'Output swing limit below the positive rail, volts'),
  supplyMinVolts: required('voltsOrZero', 'Lowest rated total supply, volts'),
  supplyMaxVolts: required('voltsOrInf', 'Highest rated total supply, volts ("inf" = any)'),
  openLoopGain: optional('dimensionless', 'DC open-loop voltage gain, V/V ("inf" for the ideal part; default 100000)'),
  commonModeLowVolts: optional('voltsOrZero', 'How close to the negative rail the inputs may go, volts (omitted: not stated)'),
  commonModeHighVolts: optional('voltsOrZero', 'How close to the positive rail the inputs may go, volts (omitted: not stated)'),
  noiseVoltage: optional('noiseDensity', 'Input voltage noise density at 1 kHz, V/sqrt(Hz), e.g. "18n" (omitted: not stated, no op-amp noise)'),
  noiseCurrent: optional('noiseDensity', 'Input current noise density at 1 kHz, A/sqrt(Hz), e.g. "10f" (omitted: not stated)'),
  ranges: optional('ranges', 'Datasheet ranges for tolerance runs, e.g. { "gbwHz": { "min": 2.5e6, "max": 4e6 } } (min to typ)'),
  source: optional('text', 'Where the numbers come from'),
};

/** A bipolar transistor (Ebers-Moll transport model), inline in a circuit or in a parts file. */
export const BJT_FIELDS: FieldTable = {
  polarity: required('bjtPolarity', 'npn or pnp'),
  saturationCurrent: required('amperes', 'Transport saturation current Is, amperes'),
  betaForward: required('dimensionless', 'Forward common-emitter current gain (hFE)'),
  betaReverse: required('dimensionless', 'Reverse common-emitter current gain'),
  ideality: optional('dimensionless', 'Emission coefficient n (default 1)'),
  ranges: optional('ranges', 'Datasheet ranges, e.g. { "betaForward": { "min": 100, "max": 300 } }'),
  source: optional('text', 'Where the numbers come from'),
};

/** A junction FET (square law), inline in a circuit or in a parts file. */
export const JFET_FIELDS: FieldTable = {
  polarity: required('jfetPolarity', 'n or p (channel)'),
  idss: required('amperes', 'Drain current at VGS = 0 in saturation, amperes'),
  pinchOff: required('signedVolts', 'Gate-source cut-off voltage VGS(off), volts: negative for n-channel, positive for p-channel'),
  lambda: optional('voltsOrZero', 'Channel-length modulation, 1/V (default 0)'),
  ranges: optional('ranges', 'Datasheet ranges, e.g. { "idss": { "min": 0.2e-3, "max": 1e-3 } }'),
  source: optional('text', 'Where the numbers come from'),
};

/** Parameters a BJT's or JFET's `ranges` may bound. */
export const BJT_RANGE_KEYS = ['saturationCurrent', 'betaForward'] as const;
export const DIODE_RANGE_KEYS = ['saturationCurrent', 'ideality'] as const;
export const JFET_RANGE_KEYS = ['idss', 'pinchOff'] as const;

export const PARTS_FILE_FIELDS: FieldTable = {
  $comment: optional('text', 'Free text, ignored'),
  diodes: optional('parts', 'Diodes by part name'),
  opamps: optional('parts', 'Op-amps by part name'),
  bjts: optional('parts', 'Bipolar transistors by part name'),
  jfets: optional('parts', 'Junction FETs by part name'),
};

export const fieldNames = (table: FieldTable): string[] => Object.keys(table);
