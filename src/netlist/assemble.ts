/**
 * A circuit stage as indexed data for modified nodal analysis: every element reduced to the
 * primitives the solver stamps (conductances, capacitors, voltage sources, controlled sources) and
 * nonlinear devices with their ports. The solver never sees element types; the physics of each
 * element is in this expansion (see docs/models.md, "Elements") and in `solver/devices.ts`.
 */
import { requirePositive } from '../errors.js';
import { potFraction } from '../design/taper.js';
import { GROUND_NODE, REFERENCE_NODE, SUPPLY_NODE, type CircuitContext, type CircuitStage, type OpampParams } from '../design/types.js';
import { thermalVoltage } from './thermalVoltage.js';
import { DeviceKind } from './deviceKind.js';

/** Node index of ground: not an unknown of the system. */
export const GROUND = -1;

/** End resistance of a pot track at either stop, ohms (common practice: a few ohms or less). */
export const POT_END_OHMS = 1;

/** Conductance across every junction and channel, siemens: keeps cut-off devices from leaving nodes undetermined (common practice in circuit simulation). */
export const JUNCTION_GMIN_SIEMENS = 1e-12;

/** Open-loop gain standing in for "infinite" (the ideal op-amp): its error, 1e-7, lies below any measurement here. */
const IDEAL_OPEN_LOOP_GAIN = 1e7;

/**
 * Op-amp macromodel scaling (after Boyle, Cohn, Pederson, Solomon, IEEE JSSC 9(6), 1974): the input
 * stage's transconductance sets the compensation node's impedance level only; GBW = gm / (2 pi Cc),
 * slew rate = Imax / Cc, DC gain = gm Rc.
 */
const OPAMP_INPUT_SIEMENS = 1e-3;
/** Voltage scale of the output's approach to each rail (the knee is a few of these wide). */
const OPAMP_RAIL_KNEE_VOLTS = 0.05;
/** The ideal part's sharper knee: driven hard, it passes its rail by only a few tens of millivolts. */
const IDEAL_RAIL_KNEE_VOLTS = 0.01;

export interface Conductance {
  a: number;
  b: number;
  siemens: number;
  /** The part whose thermal noise (4kT/R) this conductance carries; absent for modelling aids (gmin, op-amp internals). */
  noisyElement?: string;
}

/** An op-amp's input noise (datasheet densities at 1 kHz), for the noise analysis (solver/noise.ts). */
export interface OpampNoise {
  elementId: string;
  plus: number;
  minus: number;
  /** The macromodel's compensation node: an input voltage e reaches it as a current gm e. */
  compensation: number;
  gm: number;
  /** V/sqrt(Hz) at the input, A/sqrt(Hz) into each input. */
  voltsPerRootHz: number;
  ampsPerRootHz: number;
}

export interface Capacitor {
  a: number;
  b: number;
  farads: number;
  elementId: string;
}

/** An ideal voltage source from `node` to ground: the stage input, vcc or vref. */
export interface VoltageSource {
  node: number;
  /** 'input' rides on the signal at 0 V DC; 'constant' holds `volts`. */
  kind: 'input' | 'constant';
  volts: number;
}

/** v(out) = v(control) - v(ground): the op-amp's output buffer, an ideal source. */
export interface VoltageFollower {
  out: number;
  control: number;
}

/** A linear voltage-controlled current source: `siemens` (v(ctrlA) - v(ctrlB)) flows from `from` to `to` through it. */
export interface Transconductance {
  from: number;
  to: number;
  ctrlA: number;
  ctrlB: number;
  siemens: number;
}

/** One port of a nonlinear device: its voltage is v(voltA) - v(voltB); its current flows from `from` to `to` through the device. */
export interface Port {
  voltA: number;
  voltB: number;
  from: number;
  to: number;
}

export interface DeviceInstance {
  elementId: string;
  kind: DeviceKind;
  ports: Port[];
  /** The device model's constants, in the order `solver/devices.ts` reads them. */
  params: number[];
}

export interface AssembledCircuit {
  stageId: string;
  /** Names of the unknown node voltages, in index order (internal nodes are `element#pin`). */
  nodeNames: string[];
  conductances: Conductance[];
  capacitors: Capacitor[];
  sources: VoltageSource[];
  followers: VoltageFollower[];
  transconductances: Transconductance[];
  devices: DeviceInstance[];
  opampNoise: OpampNoise[];
  inputNode: number;
  outputNode: number;
}

class NodeTable {
  readonly names: string[] = [];
  private readonly index = new Map<string, number>();

  of(name: string): number {
    if (name === GROUND_NODE) return GROUND;
    let i = this.index.get(name);
    if (i === undefined) {
      i = this.names.length;
      this.names.push(name);
      this.index.set(name, i);
    }
    return i;
  }

  has(name: string): boolean {
    return this.index.has(name);
  }
}

/** Rails of an op-amp output on this supply: [low, high] volts, scaled with `supplyScale` for source stepping. */
export function opampRails(opamp: OpampParams, supplyVolts: number, supplyScale: number): [number, number] {
  const low = opamp.headroomLowVolts;
  const high = supplyVolts - opamp.headroomHighVolts;
  return [supplyScale * low, supplyScale * high];
}

/**
 * Expand `stage` at the design's knob positions. `supplyScale` (0..1) scales vcc, vref and the op-amp
 * rails together: the operating-point solver ramps it for source stepping.
 */
export function assembleCircuit(
  stage: CircuitStage,
  ctx: CircuitContext,
  knobs: Readonly<Record<string, number>>,
  supplyScale = 1,
): AssembledCircuit {
  const nodes = new NodeTable();
  const out: AssembledCircuit = {
    stageId: stage.id,
    nodeNames: nodes.names,
    conductances: [],
    capacitors: [],
    sources: [],
    followers: [],
    transconductances: [],
    devices: [],
    opampNoise: [],
    inputNode: nodes.of(stage.input),
    outputNode: GROUND,
  };
  out.sources.push({ node: out.inputNode, kind: 'input', volts: 0 });
  const vt = thermalVoltage(ctx.temperatureC);
  const where = (id: string): string => `stage "${stage.id}" element "${id}"`;
  // Element ids with '#' are the compiler's own modelling aids (stageBlocks.ts), not parts: no noise.
  const resistor = (a: number, b: number, ohms: number, elementId: string): void => {
    if (a !== b) out.conductances.push({ a, b, siemens: 1 / ohms, ...(elementId.includes('#') ? {} : { noisyElement: elementId }) });
  };
  const junctionGmin = (a: number, b: number): void => {
    if (a !== b) out.conductances.push({ a, b, siemens: JUNCTION_GMIN_SIEMENS });
  };

  for (const element of stage.elements) {
    const pin = element.nodes.map((name) => nodes.of(name));
    switch (element.type) {
      case 'resistor':
        requirePositive(element.ohms, `${where(element.id)} value`, 'ohms');
        resistor(pin[0], pin[1], element.ohms, element.id);
        break;
      case 'capacitor':
        requirePositive(element.farads, `${where(element.id)} value`, 'farads');
        if (pin[0] !== pin[1]) out.capacitors.push({ a: pin[0], b: pin[1], farads: element.farads, elementId: element.id });
        break;
      case 'pot': {
        requirePositive(element.ohms, `${where(element.id)} value`, 'ohms');
        const position = knobs[element.knob] ?? 0.5;
        const fraction = potFraction(element.taper, position, element.reverse);
        resistor(pin[0], pin[1], Math.max(POT_END_OHMS, fraction * element.ohms), element.id);
        resistor(pin[1], pin[2], Math.max(POT_END_OHMS, (1 - fraction) * element.ohms), element.id);
        break;
      }
      case 'diode': {
        // A string of m equal diodes: n -> m n, Rs -> m Rs (Shockley equation; the string carries one current).
        const { saturationCurrent, ideality, seriesResistance } = element.diode;
        const seriesOhms = element.count * seriesResistance;
        const junction = seriesOhms > 0 ? nodes.of(`${element.id}#junction`) : pin[1];
        if (seriesOhms > 0) resistor(junction, pin[1], seriesOhms, element.id);
        junctionGmin(pin[0], junction);
        out.devices.push({
          elementId: element.id,
          kind: DeviceKind.Junction,
          ports: [{ voltA: pin[0], voltB: junction, from: pin[0], to: junction }],
          params: [saturationCurrent, element.count * ideality * vt],
        });
        break;
      }
      case 'npn':
      case 'pnp': {
        const [c, b, e] = pin;
        const { saturationCurrent, betaForward, betaReverse, ideality } = element.bjt;
        junctionGmin(b, e);
        junctionGmin(b, c);
        out.devices.push({
          elementId: element.id,
          kind: DeviceKind.Bjt,
          ports: [
            { voltA: b, voltB: e, from: b, to: e },
            { voltA: b, voltB: c, from: b, to: c },
          ],
          params: [saturationCurrent, ideality * vt, betaForward, betaReverse, element.type === 'npn' ? 1 : -1],
        });
        break;
      }
      case 'njfet':
      case 'pjfet': {
        const [d, g, s] = pin;
        const { idss, pinchOff, lambda } = element.jfet;
        junctionGmin(d, s);
        out.devices.push({
          elementId: element.id,
          kind: DeviceKind.Jfet,
          ports: [
            { voltA: g, voltB: s, from: g, to: s },
            { voltA: d, voltB: s, from: d, to: s },
          ],
          // In the n-channel frame the pinch-off voltage is negative; a p-channel part is mirrored.
          params: [idss, -Math.abs(pinchOff), lambda, element.type === 'njfet' ? 1 : -1],
        });
        break;
      }
      case 'opamp':
        addOpamp(out, nodes, element.id, pin, element.opamp, ctx.supplyVolts, supplyScale);
        break;
    }
  }

  if (nodes.has(SUPPLY_NODE)) out.sources.push({ node: nodes.of(SUPPLY_NODE), kind: 'constant', volts: supplyScale * ctx.supplyVolts });
  if (nodes.has(REFERENCE_NODE)) out.sources.push({ node: nodes.of(REFERENCE_NODE), kind: 'constant', volts: (supplyScale * ctx.supplyVolts) / 2 });
  out.outputNode = nodes.of(stage.output);
  return out;
}

/**
 * The op-amp macromodel: an input stage whose current saturates at Imax (slew rate Imax / Cc) drives
 * the compensation node c (Cc and Rc to ground: GBW and DC gain); c approaches each rail through a
 * smooth exponential clamp that sinks exactly Imax at the datasheet swing limit; a unity follower
 * copies c to the output as an ideal source. The ideal part (unlimited GBW) keeps only a linear
 * input stage of very high gain and the clamp, with its rails at the supply.
 */
function addOpamp(
  out: AssembledCircuit,
  nodes: NodeTable,
  id: string,
  pin: number[],
  opamp: OpampParams,
  supplyVolts: number,
  supplyScale: number,
): void {
  const [plus, minus, output] = pin;
  const c = nodes.of(`${id}#compensation`);
  const gm = OPAMP_INPUT_SIEMENS;
  const ideal = !Number.isFinite(opamp.gbwHz);
  const openLoopGain = Number.isFinite(opamp.openLoopGain) && !ideal ? opamp.openLoopGain : IDEAL_OPEN_LOOP_GAIN;
  out.conductances.push({ a: c, b: GROUND, siemens: gm / openLoopGain });
  out.followers.push({ out: output, control: c });
  const [railLow, railHigh] = opampRails(opamp, supplyVolts, supplyScale);
  const kneeVolts = ideal ? IDEAL_RAIL_KNEE_VOLTS : OPAMP_RAIL_KNEE_VOLTS;
  // Without a slew limit the clamp's scale is the input stage's current over one knee width.
  let clampAmps = gm * kneeVolts;
  const compensationFarads = ideal ? 0 : gm / (2 * Math.PI * opamp.gbwHz);
  if (compensationFarads > 0) out.capacitors.push({ a: c, b: GROUND, farads: compensationFarads, elementId: `${id}#compensation` });
  if (compensationFarads > 0 && Number.isFinite(opamp.slewRateVoltsPerSecond)) {
    const maxAmps = opamp.slewRateVoltsPerSecond * compensationFarads;
    clampAmps = maxAmps;
    out.devices.push({
      elementId: id,
      kind: DeviceKind.InputStage,
      ports: [{ voltA: plus, voltB: minus, from: GROUND, to: c }],
      params: [maxAmps, gm],
    });
  } else {
    out.transconductances.push({ from: GROUND, to: c, ctrlA: plus, ctrlB: minus, siemens: gm });
  }
  if (opamp.noiseVoltage !== null || opamp.noiseCurrent !== null) {
    out.opampNoise.push({ elementId: id, plus, minus, compensation: c, gm, voltsPerRootHz: opamp.noiseVoltage ?? 0, ampsPerRootHz: opamp.noiseCurrent ?? 0 });
  }
  out.devices.push({
    elementId: `${id}#rails`,
    kind: DeviceKind.RailClamp,
    ports: [{ voltA: c, voltB: GROUND, from: c, to: GROUND }],
    params: [clampAmps, railLow, railHigh, kneeVolts],
  });
}
