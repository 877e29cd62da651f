/**
 * A circuit stage at rest, for `check`: every node's DC voltage, each transistor's region and
 * current, each op-amp's output headroom to its rails and whether its inputs sit inside the part's
 * common-mode range, with warnings for a transistor resting saturated or cut off and an op-amp output
 * resting within 1 V of a rail. Regions follow the usual textbook definitions (e.g. Sedra & Smith,
 * Microelectronic Circuits, ch. 6 and 7).
 */
import { analyseCircuitStage } from '../circuit/circuitStage.js';
import { thermalVoltage } from '../netlist/thermalVoltage.js';
import { opampRails } from '../netlist/assemble.js';
import {
  GROUND_NODE,
  REFERENCE_NODE,
  SUPPLY_NODE,
  type CircuitContext,
  type CircuitStage,
} from '../design/types.js';

/** A junction counts as conducting above this diffusion current (amperes): 1 uA, whatever the part's Is. */
const CONDUCTING_AMPS = 1e-6;
/** An op-amp output resting closer than this to a rail has little room to swing (volts). */
export const MIN_REST_HEADROOM_VOLTS = 1;

export type TransistorRegion = 'active' | 'saturated' | 'cut off' | 'ohmic';

export interface TransistorRest {
  element: string;
  type: string;
  region: TransistorRegion;
  /** Collector (BJT) or drain (JFET) current, amperes, flowing into that terminal. */
  currentAmps: number;
}

export interface OpampRest {
  element: string;
  outputVolts: number;
  headroomLowVolts: number;
  headroomHighVolts: number;
  /** null when the part states no common-mode range. */
  inputsInCommonModeRange: boolean | null;
}

export interface RestWarning {
  code: string;
  element: string;
  message: string;
}

export interface CircuitRest {
  nodes: Record<string, number>;
  transistors: TransistorRest[];
  opamps: OpampRest[];
  warnings: RestWarning[];
}

export function circuitRest(stage: CircuitStage, ctx: CircuitContext, knobs: Readonly<Record<string, number>>): CircuitRest {
  const { system, operatingPoint } = analyseCircuitStage(stage, ctx, knobs);
  const w = operatingPoint.unknowns;
  const nodeIndex = new Map(system.unknownNames.slice(0, system.nodeCount).map((name, i) => [name, i]));
  const volts = (name: string): number => (name === GROUND_NODE ? 0 : w[nodeIndex.get(name) as number]);
  const nodes: Record<string, number> = Object.create(null) as Record<string, number>;
  for (const element of stage.elements) for (const name of element.nodes) nodes[name] = volts(name);
  for (const name of [SUPPLY_NODE, REFERENCE_NODE]) if (nodeIndex.has(name)) nodes[name] = volts(name);

  const devicePorts = (id: string): number => system.devicePortStart[system.deviceIds.indexOf(id)];
  const vt = thermalVoltage(ctx.temperatureC);
  const out: CircuitRest = { nodes, transistors: [], opamps: [], warnings: [] };
  for (const element of stage.elements) {
    switch (element.type) {
      case 'npn':
      case 'pnp': {
        const [c, b, e] = element.nodes;
        const sign = element.type === 'npn' ? 1 : -1;
        const { saturationCurrent, ideality } = element.bjt;
        const conducts = (v: number): boolean => saturationCurrent * Math.expm1(v / (ideality * vt)) > CONDUCTING_AMPS;
        const emitterOn = conducts(sign * (volts(b) - volts(e)));
        const collectorOn = conducts(sign * (volts(b) - volts(c)));
        const region: TransistorRegion = !emitterOn ? 'cut off' : collectorOn ? 'saturated' : 'active';
        // Port (b,c) carries minus the collector current (Ebers-Moll ports, assemble.ts).
        const currentAmps = -operatingPoint.portAmps[devicePorts(element.id) + 1];
        out.transistors.push({ element: element.id, type: element.type, region, currentAmps });
        if (region !== 'active') {
          out.warnings.push({ code: `transistor-${region === 'cut off' ? 'cut-off' : 'saturated'}`, element: element.id, message: `${element.id} rests ${region} (collector current ${currentAmps.toExponential(2)} A): check its bias network` });
        }
        break;
      }
      case 'njfet':
      case 'pjfet': {
        const [d, g, s] = element.nodes;
        const sign = element.type === 'njfet' ? 1 : -1;
        const pinchOff = -Math.abs(element.jfet.pinchOff);
        const overdrive = sign * (volts(g) - volts(s)) - pinchOff;
        const vds = Math.abs(volts(d) - volts(s));
        const region: TransistorRegion = overdrive <= 0 ? 'cut off' : vds >= overdrive ? 'saturated' : 'ohmic';
        const currentAmps = operatingPoint.portAmps[devicePorts(element.id) + 1];
        out.transistors.push({ element: element.id, type: element.type, region, currentAmps });
        if (region === 'cut off') {
          out.warnings.push({ code: 'transistor-cut-off', element: element.id, message: `${element.id} rests cut off (VGS beyond pinch-off ${element.jfet.pinchOff} V): check its bias network` });
        }
        break;
      }
      case 'opamp': {
        const [plus, minus, output] = element.nodes;
        const [railLow, railHigh] = opampRails(element.opamp, ctx.supplyVolts, 1);
        const outputVolts = volts(output);
        const { commonModeLowVolts, commonModeHighVolts } = element.opamp;
        const inputsInCommonModeRange =
          commonModeLowVolts === null || commonModeHighVolts === null
            ? null
            : [plus, minus].every((pin) => volts(pin) >= commonModeLowVolts && volts(pin) <= ctx.supplyVolts - commonModeHighVolts);
        const rest: OpampRest = { element: element.id, outputVolts, headroomLowVolts: outputVolts - railLow, headroomHighVolts: railHigh - outputVolts, inputsInCommonModeRange };
        out.opamps.push(rest);
        if (Math.min(rest.headroomLowVolts, rest.headroomHighVolts) < MIN_REST_HEADROOM_VOLTS) {
          out.warnings.push({ code: 'opamp-output-near-rail', element: element.id, message: `${element.id} output rests at ${outputVolts.toFixed(2)} V, within ${MIN_REST_HEADROOM_VOLTS} V of a rail (${railLow.toFixed(2)}-${railHigh.toFixed(2)} V): little room to swing` });
        }
        if (inputsInCommonModeRange === false) {
          out.warnings.push({ code: 'opamp-common-mode', element: element.id, message: `${element.id} inputs rest outside the ${element.opamp.name}'s input common-mode range` });
        }
        break;
      }
      default:
        break;
    }
  }
  return out;
}
