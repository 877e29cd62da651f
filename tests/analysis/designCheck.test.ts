import { lambertW0Log } from 'lambert-w-function';
import { describe, expect, test } from 'vitest';
import { checkDesign, diodeStringCurrent, type CheckResult, type Fact } from '../../src/analysis/designCheck.js';
import { loadPartsLibrary } from '../../src/design/parts.js';
import { parseDesignText, readDesignFile } from '../../src/design/parseDesign.js';
import { expectClose } from '../helpers/expectClose.js';

const parts = loadPartsLibrary();
// Vt = kT/q at 25 C (k, q exact in SI 2019)
const VT_25C = (1.380649e-23 * 298.15) / 1.602176634e-19;

function factOf(result: CheckResult, stage: string, code: string): Fact {
  const fact = result.facts.find((f) => f.stage === stage && f.code === code);
  if (fact === undefined) throw new Error(`no fact ${code} for stage ${stage}`);
  return fact;
}

function warningCodes(result: CheckResult): string[] {
  return result.warnings.map((w) => `${w.stage}:${w.code}`);
}

function checkText(design: unknown, inputPeakVolts = 1): CheckResult {
  return checkDesign(parseDesignText(JSON.stringify(design), 'design.json', parts), { inputPeakVolts });
}

describe('night-drive facts against hand calculations', async () => {
  const result = checkDesign(await readDesignFile('fixtures/designs/night-drive.json', parts), { inputPeakVolts: 1 });

  test('input impedance = series + pulldown = 1k + 1M', () => {
    expect(factOf(result, 'in', 'input-impedance')).toMatchObject({ min: 1.001e6, max: 1.001e6 });
  });

  test('corners 1/(2 pi R C)', () => {
    // input high-pass: H(s) = s Rp C / (1 + s (Rs + Rp) C), fc = 1/(2 pi (1k + 1M) 100n)
    expectClose(factOf(result, 'in', 'corner-input').value!, 1 / (2 * Math.PI * 1.001e6 * 100e-9), { rtol: 1e-12 });
    // gain bass corner 1/(2 pi 3k9 68n) = 600.1 Hz
    expectClose(factOf(result, 'amp', 'corner-bass').value!, 600.1, { rtol: 1e-3 });
    // treble corner over the drive pot: 1/(2 pi 482k 100p) .. 1/(2 pi 12k 100p)
    const treble = factOf(result, 'amp', 'corner-treble');
    expectClose(treble.min!, 1 / (2 * Math.PI * 482e3 * 100e-12), { rtol: 1e-12 });
    expectClose(treble.max!, 1 / (2 * Math.PI * 12e3 * 100e-12), { rtol: 1e-12 });
    // tone: 1k..21k with 22n: 344.5 Hz .. 7234 Hz
    const tone = factOf(result, 'tone', 'corner-tone');
    expectClose(tone.min!, 344.5, { rtol: 1e-3 });
    expectClose(tone.max!, 7234, { rtol: 1e-3 });
    // clipper (diodes off): 1/(2 pi 2k2 10n) = 7234 Hz
    expectClose(factOf(result, 'clip', 'corner-clipper').value!, 7234, { rtol: 1e-3 });
  });

  test('gain range 1 + Rf/Rg over the drive pot', () => {
    const gain = factOf(result, 'amp', 'gain');
    expectClose(gain.min!, 1 + 12e3 / 3.9e3, { rtol: 1e-12 });
    expectClose(gain.max!, 1 + 482e3 / 3.9e3, { rtol: 1e-12 });
  });

  test('GBW-limited bandwidth GBW/(1+Rf/Rg) and slew-limited bandwidth SR/(2 pi Vpeak)', () => {
    // TL072: GBW 4 MHz, SR 16 V/us (datasheet typ); swing on 9 V: 4.5 V - 1.5 V headroom = 3 V
    expectClose(factOf(result, 'amp', 'gbw-bandwidth').value!, 4e6 / (1 + 482e3 / 3.9e3), { rtol: 1e-12 });
    expectClose(factOf(result, 'amp', 'slew-bandwidth').value!, 16e6 / (2 * Math.PI * 3), { rtol: 1e-12 });
    expect(factOf(result, 'amp', 'opamp-swing')).toMatchObject({ min: -3, max: 3 });
  });

  test('diode peak current: the rails (3 V) drive 2k2 into a 1N4148, against the Lambert-W closed form', () => {
    // Shockley with series resistance R (2k2 + Rs): I + Is = (n Vt / R) W((Is R / n Vt) exp((V + Is R) / n Vt))
    const [is, n, rs] = [2.52e-9, 1.752, 0.568];
    const r = 2200 + rs;
    const nvt = n * VT_25C;
    const expected = (nvt / r) * lambertW0Log(Math.log((is * r) / nvt) + (3 + is * r) / nvt) - is;
    expectClose(factOf(result, 'clip', 'diode-peak-current').value!, expected, { rtol: 1e-6 });
  });

  test('no rails-before-diodes although 125 x 1 V passes the 3 V swing: the 1N4148 clipper starts clipping near 0.5 V, long before; cautions are present', () => {
    expect(warningCodes(result)).toEqual([]);
    expect(result.facts.filter((f) => f.code === 'caution').map((f) => f.text).join(' ')).toMatch(/low volume.*mains.*ventilate/is);
  });

  test('JSON output holds only finite numbers', () => {
    const text = JSON.stringify(result);
    expect(text).not.toMatch(/null|NaN|Infinity/);
  });
});

describe('rails-before-diodes, the right way round', () => {
  // Three red LEDs in series each way start clipping near 3 x 1.14 V (where their conductance reaches
  // a tenth of 1 / 2k2; Shockley with the library's LED card), above the 3 V the TL072 swings each way
  // on 9 V (4.5 V - 1.5 V headroom, datasheet): the rails come first.
  const ledString = ['clip.diode=led-red', 'clip.up=3', 'clip.down=3'];
  const railWarnings = (result: CheckResult): string[] => warningCodes(result).filter((code) => code.endsWith(':rails-before-diodes'));

  test('an LED clipper that needs more than the op-amp swings: the rails come first, said that way', async () => {
    const result = checkDesign(await readDesignFile('fixtures/designs/night-drive.json', parts, ledString), { inputPeakVolts: 1 });
    expect(railWarnings(result)).toEqual(['amp:rails-before-diodes']);
    const message = result.warnings.find((w) => w.code === 'rails-before-diodes')!.message;
    expect(message).toMatch(/swings only \+3 V\/-3 V, below the \+3\.\d+ V\/-3\.\d+ V at which the diodes of stage "clip" start clipping: .* it clips at its rails before they do/);
  });

  test('an input too quiet to reach the rails gives no warning, whatever the diodes', async () => {
    const result = checkDesign(await readDesignFile('fixtures/designs/night-drive.json', parts, ledString), { inputPeakVolts: 0.01 });
    expect(railWarnings(result)).toEqual([]);
  });
});

describe('diodeStringCurrent', () => {
  test('two diodes in series: the string drop equals twice one diode at the same current (n -> 2n, Rs -> 2Rs)', () => {
    const diode = parts.diodes.get('1n4148')!;
    const current = diodeStringCurrent(diode, 2, 5, 1000, 25);
    const oneDiodeVolts = diode.ideality * VT_25C * Math.log(current / diode.saturationCurrent + 1) + current * diode.seriesResistance;
    // KVL: 5 V = I R + 2 Vf
    expectClose(current * 1000 + 2 * oneDiodeVolts, 5, { atol: 1e-9 });
  });
});

describe('warnings', () => {
  const stages = (...list: object[]) => ({ supply: 9, stages: list });

  test('low input impedance below 250k (common practice)', () => {
    const result = checkText(stages({ id: 'in', type: 'input', coupling: '100n', pulldown: '100k' }));
    expect(warningCodes(result)).toEqual(['in:input-impedance-low']);
  });

  test('GBW-limited bandwidth under 10 kHz, supply outside the rated range, slew-limited', () => {
    // LM741 at gain 1 + 1M/1k = 1001: 1.5 MHz / 1001 = 1.5 kHz; rated from 10 V; SR 0.5 V/us over 2 pi 3.5 V = 22.7 kHz
    const result = checkText(stages({ id: 'amp', type: 'gain', opamp: 'lm741', rf: '1M', rg: '1k' }), 0.001);
    expect(warningCodes(result)).toEqual(['amp:input-no-pulldown', 'amp:gbw-bandwidth-low', 'amp:supply-out-of-range']);
    expectClose(factOf(result, 'amp', 'gbw-bandwidth').value!, 1.5e6 / 1001, { rtol: 1e-12 });
    expectClose(factOf(result, 'amp', 'slew-bandwidth').value!, 0.5e6 / (2 * Math.PI * 3.5), { rtol: 1e-12 });
  });

  test('diode over its rating and diodes that never conduct', () => {
    const result = checkText(
      stages(
        { id: 'in', type: 'input', coupling: '100n', pulldown: '1M' },
        { id: 'amp', type: 'gain', opamp: 'ideal', rf: '10k', rg: '10k' },
        { id: 'clip', type: 'clipper', series: '10', diode: '1n34a', downDiode: 'led-blue' },
      ),
    );
    // +: 2 V (ideal op-amp, gain 2) behind 10 ohm into a 1N34A: tens of mA > 50 mA rating? (2 - 0.5) / 16.5 ohm = 90 mA
    // -: 2 V is far below a blue LED's knee (about 3 V at microamps): no conduction
    expect(warningCodes(result)).toEqual(['clip:diode-overcurrent', 'clip:diode-never-conducts']);
    expect(result.warnings[1]!.message).toMatch(/negative diodes \(1 x led-blue\)/);
  });

  test('values off E24 (resistors) and E12 (capacitors) with the nearest values (IEC 60063)', () => {
    const result = checkText(stages({ id: 'in', type: 'input', coupling: '50n', pulldown: '1M', series: '4k8' }));
    expect(result.warnings.map((w) => w.message)).toEqual([
      'series 4.8k ohm is not an E24 value (IEC 60063); nearest 4.7k ohm or 5.1k ohm',
      'coupling 50nF is not an E12 value (IEC 60063); nearest 47nF or 56nF',
    ]);
  });

  test('feedback diodes keep the output off the rails: output = Vin + Vd', () => {
    const result = checkText(
      stages(
        { id: 'in', type: 'input', coupling: '100n', pulldown: '1M' },
        { id: 'amp', type: 'gain', opamp: 'tl072', rf: '100k', rg: '10k', feedbackDiode: '1n4148' },
      ),
      0.5,
    );
    // linear demand 11 x 0.5 V = 5.5 V would pass the 3 V swing; the diodes hold it near 0.5 V + 0.45 V
    expect(warningCodes(result)).toEqual([]);
    // KCL at the feedback node: the current 0.5 V / 10k through rg splits into Id + Vd / Rf
    const id = factOf(result, 'amp', 'diode-peak-current').value!;
    const vd = 1.752 * VT_25C * Math.log(id / 2.52e-9 + 1) + id * 0.568; // 1N4148 card (Shockley with Rs)
    expectClose(id + vd / 100e3, 0.5 / 10e3, { rtol: 1e-6 });
  });
});

describe('values that read like a typo', () => {
  test('"1m" for a pull-down is one milliohm (SI prefix m = milli): check says so', () => {
    const design = {
      supply: 9,
      stages: [
        { id: 'in', type: 'input', coupling: '100n', pulldown: '1m' },
        { id: 'clip', type: 'clipper', series: '2k2', diode: '1n4148' },
      ],
    };
    const result = checkText(design);
    expect(warningCodes(result)).toContain('in:resistance-milliohm');
    expect(result.warnings.find((w) => w.code === 'resistance-milliohm')?.message).toMatch(/pulldown is 1m ohm, less than 1 ohm: "m" means milli; write "M"/);
  });
});
