// The bundled circuit designs through check and measure: operating points against textbook hand
// calculations, the rest warnings, and the render's response against the analog circuit's at the
// 44.1 kHz file rate (the circuit core's fidelity goal: 0.1 dB to 10 kHz, 0.3 dB to 20 kHz).
import path from 'node:path';
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { checkDesign } from '../../src/analysis/designCheck.js';
import { measureResponse, predictResponse, responseFrequencies, responseProbeVolts } from '../../src/analysis/response.js';
import { settleSeconds } from '../../src/analysis/toneRun.js';
import { buildChain } from '../../src/circuit/chain.js';
import { parseDesignText } from '../../src/design/parseDesign.js';
import { loadPartsLibrary } from '../../src/design/parts.js';
import { resolveDesign } from '../../src/design/resolve.js';
import { thermalVoltage } from '../../src/netlist/thermalVoltage.js';
import { PROJECT_ROOT } from '../helpers/cli.js';

const parts = loadPartsLibrary();
const designPath = (name: string): string => path.join(PROJECT_ROOT, 'fixtures', 'designs', `${name}.json`);
const load = (name: string, overrides: string[] = []) => parseDesignText(readFileSync(designPath(name), 'utf8'), designPath(name), parts, overrides);

describe('check on circuit designs', () => {
  test('the booster rests in the active region where the Thevenin hand calculation puts it (Sedra & Smith, BJT DC bias)', () => {
    const result = checkDesign(load('clear-lift'), { inputPeakVolts: 0.5 });
    const nodes = result.operatingPoint.lift!;
    // Thevenin base bias: VTh = 9 x 100k / 570k, RTh = 470k || 100k; IE = (VTh - VBE) / (RE + RTh / (beta + 1)),
    // with VBE = n Vt ln(IC / Is) iterated once from 0.65 V (2N3904: Is 6.734e-15 A, beta 416).
    const vth = (9 * 100e3) / 570e3;
    const rth = (470e3 * 100e3) / 570e3;
    let vbe = 0.65;
    let ie = 0;
    for (let k = 0; k < 5; k++) {
      ie = (vth - vbe) / (820 + rth / 417);
      vbe = thermalVoltage(25) * Math.log(((ie * 416) / 417) / 6.734e-15);
    }
    expect(nodes.e).toBeCloseTo(ie * 820, 2);
    expect(nodes.c).toBeCloseTo(9 - ((ie * 416) / 417) * 4700, 1);
    expect(result.facts.find((f) => f.code === 'transistor-rest')?.text).toMatch(/^active/);
    expect(result.warnings.map((w) => w.code)).not.toContain('transistor-saturated');
  });

  test('a transistor biased into saturation and an op-amp resting at its rail are warned about', () => {
    const saturated = checkDesign(load('clear-lift'), { inputPeakVolts: 0.5 });
    expect(saturated.warnings.filter((w) => w.code.startsWith('transistor'))).toEqual([]);
    // 1M to ground instead of 100k: VB about 6 V, IE about 6.5 mA, which 4k7 cannot carry from 9 V.
    const overBiased = load('clear-lift', ['lift.rbot.value=1M']);
    expect(checkDesign(overBiased, { inputPeakVolts: 0.5 }).warnings.map((w) => w.code)).toContain('transistor-saturated');
    // The follower's input biased from vcc instead of vref: its output rests at the high rail.
    const railed = load('lattice-tone');
    (railed.stages[0] as { elements: { id: string; nodes: string[] }[] }).elements.find((e) => e.id === 'rbias')!.nodes[1] = 'vcc';
    const codes = checkDesign(railed, { inputPeakVolts: 0.5 }).warnings.map((w) => w.code);
    expect(codes).toContain('opamp-output-near-rail');
  });
});

describe('measure on circuit designs at a 44.1 kHz file rate', () => {
  test.each(['lattice-tone', 'twin-shelf'])('%s: rendered response within 0.1 dB of the analog circuit to 10 kHz, 0.3 dB to 20 kHz', (name) => {
    const rate = 44100;
    const design = resolveDesign(load(name));
    const chain = buildChain(design, { sampleRate: rate, oversample: 8 });
    const frequencies = responseFrequencies(rate, 8192, 13);
    const predicted = predictResponse(design, rate, 8, frequencies);
    const measured = measureResponse(chain, { sampleRate: rate, windowLength: 8192, amplitudeVolts: responseProbeVolts(predicted), settleSeconds: settleSeconds(design, rate) }, frequencies);
    frequencies.forEach((hz, i) => {
      const error = Math.abs(measured[i].db! - predicted[i].db!);
      expect(error, `${hz.toFixed(0)} Hz`).toBeLessThanOrEqual(hz <= 10000 ? 0.1 : 0.3);
    });
  });
});

describe('diode conduction in a circuit stage', () => {
  test('the two-op-amp drive meters its diodes: none conduct on a whisper, some on a hard note', () => {
    const design = resolveDesign(load('harbor-lights'));
    const share = (volts: number): number => {
      const chain = buildChain(design, { sampleRate: 48000, oversample: 2 });
      const block = new Float64Array(chain.blockSize);
      for (let n = 0; n < 48; n++) {
        for (let i = 0; i < block.length; i++) block[i] = volts * Math.sin((2 * Math.PI * 220 * (n * block.length + i)) / 48000);
        chain.process(block);
      }
      const meter = chain.stages[0].processor.conduction!;
      return meter.conductingSamples / meter.countedSamples;
    };
    expect(share(1e-4)).toBe(0);
    expect(share(0.5)).toBeGreaterThan(0.05);
  });
});
