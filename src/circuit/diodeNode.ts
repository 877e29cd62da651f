/**
 * A diode node integrated in time: the part the clipper and the feedback-diode gain stage share.
 *
 *   C dv/dt = j(t) - G_r v - i_d(v)
 *
 * j is the current driven into the node (clipper: vin / R; gain stage: the current through Zg),
 * G_r the node's resistor (1/R, 1/Rf), C the capacitor across the diodes (0 = memoryless).
 * Trapezoidal rule with a = 2C/T (companion form, e.g. Pillage, Rohrer & Visweswariah, Electronic
 * Circuit and System Simulation Methods, ch. 4):
 *
 *   (a + G_r) v_n + i_d(v_n) = p_n,   p_n = j_n + s_{n-1},   s_n = j_n - p_n + 2 a v_n
 *
 * (s_n = a v_n + f(v_n) written without a second diode evaluation). Each step is equation (1) of
 * `diodeNodeSolver.ts` with G = a + G_r, solved by Newton ('newton') or by the precomputed table
 * with Newton outside its range ('table').
 */
import type { ConductionMeter } from '../dsp/conduction.js';
import { conductionThresholdSiemens } from '../dsp/conduction.js';
import { stringConductance, voltageAtConductance, type DiodeString } from './diode.js';
import { DiodeNodeSolver, type DiodeNetwork } from './diodeNodeSolver.js';
import { limitInputVolts } from './inputLimit.js';
import { buildDiodeNodeTable, tableErrorVolts, type DiodeNodeTable } from './diodeNodeTable.js';

export type DiodeSolverKind = 'newton' | 'table';

/**
 * Table sizing: start with TABLE_INTERVALS over [-pMax, pMax] and double (up to
 * MAX_TABLE_INTERVALS) until the table agrees with the Newton solver within TABLE_TOLERANCE_VOLTS at
 * every interval midpoint. A design no table size satisfies runs on Newton alone (correct, slower).
 * 4096 intervals take 128 KiB (4 coefficients each), small enough to stay in the L2 cache; the
 * night-drive clipper at 384 kHz meets the tolerance there with a factor 2 to spare (4.8e-7 V).
 */
export const TABLE_INTERVALS = 4096;
export const MAX_TABLE_INTERVALS = 65536;
/**
 * -120 dB re 1 V. The stable recursion can accumulate a table error by a factor of about
 * 2 / (1 - rho), rho = (a - G_r) / (a + G_r) the companion's memory, i.e. tens of times at most for
 * ordinary designs: still far below the -60 dB waveform-error target.
 */
export const TABLE_TOLERANCE_VOLTS = 1e-6;
/** The table covers p up to this many times the largest expected drive current (see pMax). */
const TABLE_DRIVE_MARGIN = 4;

export interface DiodeNodeDesign {
  readonly network: DiodeNetwork;
  readonly resistiveSiemens: number; // G_r
  readonly companionSiemens: number; // a = 2 C / T, 0 without a capacitor
  /** null when no table size met TABLE_TOLERANCE_VOLTS: the node then always uses Newton. */
  readonly table: DiodeNodeTable | null;
  /** Node voltages beyond which the diodes count as conducting (see conduction.ts); magnitudes. */
  readonly conductionUpVolts: number;
  readonly conductionDownVolts: number;
}

/**
 * Precompute a diode node; the table is built whatever solver runs it later, so one design serves
 * both. `driveAmpsMax` is the largest drive current the stage expects; the table covers p up to
 * TABLE_DRIVE_MARGIN times it plus the capacitor's share at the matching node voltage, and anything
 * beyond is solved by Newton (correct, only slower).
 */
export function designDiodeNode(
  network: DiodeNetwork,
  resistiveSiemens: number,
  capFarads: number | null,
  sampleRate: number,
  driveAmpsMax: number,
): DiodeNodeDesign {
  const companionSiemens = capFarads === null ? 0 : 2 * capFarads * sampleRate;
  const dcSolver = new DiodeNodeSolver(network, resistiveSiemens);
  const nodeVoltsMax = Math.max(dcSolver.solve(2 * driveAmpsMax), -dcSolver.solve(-2 * driveAmpsMax));
  const pMax = TABLE_DRIVE_MARGIN * driveAmpsMax + 2 * companionSiemens * nodeVoltsMax;
  const conductionVolts = (string: DiodeString): number => voltageAtConductance(string, conductionThresholdSiemens(stringConductance(string, 0), resistiveSiemens));
  return {
    network,
    resistiveSiemens,
    companionSiemens,
    table: buildCheckedTable(network, companionSiemens + resistiveSiemens, pMax, companionSiemens),
    conductionUpVolts: network.up ? conductionVolts(network.up) : Infinity,
    conductionDownVolts: network.down ? conductionVolts(network.down) : Infinity,
  };
}

function buildCheckedTable(
  network: DiodeNetwork,
  conductanceSiemens: number,
  pMax: number,
  companionSiemens: number,
): DiodeNodeTable | null {
  for (let intervals = TABLE_INTERVALS; intervals <= MAX_TABLE_INTERVALS; intervals *= 2) {
    const table = buildDiodeNodeTable(network, conductanceSiemens, pMax, intervals, companionSiemens);
    if (tableErrorVolts(table, network, conductanceSiemens) <= TABLE_TOLERANCE_VOLTS) return table;
  }
  return null;
}

/**
 * The running node. `process` turns a block of drive currents into node voltages in place and
 * counts conduction since the last reset.
 *
 * Table path, in table units x = (p - pMin) / step, J = j / step, with w(x) = K v(x) - x and
 * K = 2a / step tabulated beside v(x) (diodeNodeTable.ts), the companion recursion above reads
 *   x_{n+1} = (J_{n+1} + J_n + 2 x0) + w(x_n),   x0 = -pMin / step.
 * Each sample waits for the previous one, so the loop-carried chain (index, load, one multiply, one
 * add) sets the speed; the bracket and the line's offset are summed off that chain.
 * Between blocks the state kept is q_n = x_{n+1} - J_{n+1} (the next drive is not known yet).
 */
export class DiodeNode implements ConductionMeter {
  conductingSamples = 0;
  countedSamples = 0;
  /** Samples that went to Newton (outside the table, or no table), since the last reset. */
  newtonSamples = 0;

  // The constants and the state are also read (and the state written) by the fused gain-clipper
  // kernel (gainClipperPair.ts).
  private readonly solver: DiodeNodeSolver;
  readonly step: number; // table grid step in amperes
  readonly pMin: number;
  readonly stateGain: number;
  readonly intervals: number; // 0 for the 'newton' solver: every p goes to Newton
  readonly coefficients: Float64Array;
  readonly upVolts: number;
  readonly downVolts: number; // negative
  state: number; // q_{n-1}

  constructor(design: DiodeNodeDesign, solver: DiodeSolverKind) {
    const table = design.table;
    this.solver = new DiodeNodeSolver(design.network, design.companionSiemens + design.resistiveSiemens);
    // Without a table the coordinates are plain amperes (step 1, origin 0) and Newton does it all.
    this.step = table === null ? 1 : 1 / table.intervalsPerAmp;
    this.pMin = table?.pMin ?? 0;
    this.stateGain = (2 * design.companionSiemens) / this.step;
    this.intervals = solver === 'table' && table !== null ? table.intervals : 0;
    this.coefficients = table?.coefficients ?? new Float64Array(0);
    this.upVolts = design.conductionUpVolts;
    this.downVolts = -design.conductionDownVolts;
    this.state = this.quiescentState();
  }

  /** q at rest (v = 0, no drive): 2 x0 + w(x0) = x0. */
  private quiescentState(): number {
    return -this.pMin / this.step;
  }

  reset(): void {
    this.state = this.quiescentState();
    this.conductingSamples = 0;
    this.countedSamples = 0;
    this.newtonSamples = 0;
    this.solver.reset();
  }

  /** Solver fallbacks to bisection since creation (for tests and diagnostics). */
  get fallbacks(): number {
    return this.solver.fallbacks;
  }

  /** Node voltage for table coordinate x by Newton (outside the table, or no table); counted. */
  solveOffTable(x: number): number {
    this.newtonSamples++;
    return this.solver.solve(x * this.step + this.pMin);
  }

  /**
   * Drive in, node voltages (volts) out, in place. The drive current in amperes is
   * `driveScale` times the block value (the clipper passes volts and 1/R); block values are first
   * limited to +-MAX_INPUT_VOLTS (inputLimit.ts), off the loop's critical path.
   */
  process(block: Float64Array, driveScale: number): void {
    const n = block.length;
    if (n === 0) return;
    const c = this.coefficients;
    const intervals = this.intervals;
    const invStep = driveScale / this.step;
    const twiceOrigin = (-2 * this.pMin) / this.step;
    const upVolts = this.upVolts;
    const downVolts = this.downVolts;
    let conducting = 0;
    let drive = limitInputVolts(block[0]) * invStep;
    let x = drive + this.state;
    for (let i = 0; i < n; i++) {
      const nextDrive = i + 1 < n ? limitInputVolts(block[i + 1]) * invStep : 0;
      const bracket = nextDrive + drive + twiceOrigin;
      let v: number;
      if (x >= 0 && x < intervals) {
        const o = (x | 0) << 2; // COEFFICIENTS_PER_INTERVAL = 4; x | 0 = floor(x) for x >= 0
        v = c[o] + x * c[o + 1];
        x = bracket + c[o + 2] + x * c[o + 3];
      } else {
        v = this.solveOffTable(x);
        x = bracket + this.stateGain * v - x;
      }
      if (v > upVolts || v < downVolts) conducting++;
      block[i] = v;
      drive = nextDrive;
    }
    this.state = x;
    this.conductingSamples += conducting;
    this.countedSamples += n;
  }
}
