/**
 * `check` for a circuit stage: its operating point (every node, each transistor's region and current,
 * each op-amp's headroom at rest), the input impedance it shows at 1 kHz, its small-signal gain over
 * the audio band and each op-amp's rated supply, all from the circuit core's own analysis.
 */
import { analyseCircuitStage } from '../circuit/circuitStage.js';
import type { CircuitContext, CircuitStage, Design } from '../design/types.js';
import { smallSignalInputOhms, smallSignalResponse } from '../solver/smallSignal.js';
import { circuitRest, type CircuitRest } from './circuitRest.js';
import type { CheckWarning, Fact } from './designCheck.js';
import { logSpaced } from './levelSweep.js';
import { AUDIO_BAND_HIGH_HZ, AUDIO_BAND_LOW_HZ } from '../dsp/audioBand.js';

/** Where the input impedance a pickup sees is quoted (common practice: mid-band). */
export const INPUT_IMPEDANCE_HZ = 1000;

export interface CircuitCheck {
  facts: Fact[];
  warnings: CheckWarning[];
  rest: CircuitRest;
  inputOhms: number;
  /** Largest small-signal gain over 20 Hz-20 kHz. */
  peakGain: number;
}

const volts = (v: number): string => `${Number(v.toPrecision(3))} V`;

export function checkCircuitStage(stage: CircuitStage, design: Design): CircuitCheck {
  const ctx: CircuitContext = { sampleRate: 48000, supplyVolts: design.supplyVolts, temperatureC: design.temperatureC };
  const rest = circuitRest(stage, ctx, design.knobs);
  const { system, operatingPoint } = analyseCircuitStage(stage, ctx, design.knobs);
  const [inputOhms] = smallSignalInputOhms(system, operatingPoint, [INPUT_IMPEDANCE_HZ]);
  const peakGain = Math.max(...smallSignalResponse(system, operatingPoint, logSpaced(AUDIO_BAND_LOW_HZ, AUDIO_BAND_HIGH_HZ, 61)).map(({ re, im }) => Math.hypot(re, im)));
  const facts: Fact[] = [];
  const warnings: CheckWarning[] = rest.warnings.map((w) => ({ code: w.code, stage: stage.id, message: w.message }));
  facts.push({ code: 'circuit-gain', stage: stage.id, label: 'largest small-signal gain, 20 Hz-20 kHz (at the knob positions)', text: `${Number(peakGain.toPrecision(3))} x (${(20 * Math.log10(peakGain)).toFixed(1)} dB)`, value: peakGain });
  for (const t of rest.transistors) {
    facts.push({ code: 'transistor-rest', stage: stage.id, label: `${t.element} (${t.type}) at rest`, text: `${t.region}, ${t.type.endsWith('jfet') ? 'drain' : 'collector'} current ${Number((t.currentAmps * 1e3).toPrecision(3))} mA`, unit: 'A', value: t.currentAmps });
  }
  for (const o of rest.opamps) {
    const commonMode = o.inputsInCommonModeRange === null ? 'input common-mode range not stated' : o.inputsInCommonModeRange ? 'inputs inside the common-mode range' : 'inputs OUTSIDE the common-mode range';
    facts.push({ code: 'opamp-rest', stage: stage.id, label: `${o.element} output at rest`, text: `${volts(o.outputVolts)}, ${volts(o.headroomLowVolts)} above the low rail, ${volts(o.headroomHighVolts)} below the high rail; ${commonMode}`, unit: 'V', value: o.outputVolts, min: o.headroomLowVolts, max: o.headroomHighVolts });
  }
  for (const element of stage.elements) {
    if (element.type !== 'opamp') continue;
    const { opamp } = element;
    if (design.supplyVolts < opamp.supplyMinVolts || design.supplyVolts > opamp.supplyMaxVolts) {
      warnings.push({ code: 'supply-out-of-range', stage: stage.id, message: `${element.id}: ${design.supplyVolts} V is outside the ${opamp.name}'s rated supply range (${opamp.supplyMinVolts}-${opamp.supplyMaxVolts} V)` });
    }
  }
  return { facts, warnings, rest, inputOhms, peakGain };
}
