/**
 * The part of npm `odex` (Hairer's ODEX extrapolation solver) the tests use. The package ships its
 * TypeScript source, which does not compile under this project's strict settings, so type-checking
 * of the tests maps the module here (tsconfig.tests.json `paths`).
 */
declare module 'odex' {
  export type Derivative = (x: number, y: number[]) => number[];
  export type OutputFunction = (n: number, xOld: number, x: number, y: number[], interpolate: (i: number, x: number) => number) => boolean | void;
  export class Solver {
    constructor(n: number);
    denseOutput: boolean;
    absoluteTolerance: number | number[];
    relativeTolerance: number | number[];
    maxSteps: number;
    maxStepSize: number;
    grid(dt: number, out: (x: number, y: number[]) => boolean | void): OutputFunction;
    solve(f: Derivative, x: number, y0: number[], xEnd: number, solOut?: OutputFunction): { y: number[]; outcome: number; nStep: number };
  }
}
