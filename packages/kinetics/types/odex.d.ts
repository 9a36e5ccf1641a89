// Minimal typings for odex 2.0.4 (CommonJS; its shipped src/odex.ts does not pass our strict tsc).
// Mirrors littleredcomputer/odex-js src/odex.ts: class Solver(n), solve(f, x, y0, xEnd, solOut?).
export type Derivative = (x: number, y: number[]) => number[];
export type OutputFunction = (
  nr: number,
  xold: number,
  x: number,
  y: number[],
  dense?: (c: number, x: number) => number,
) => boolean | void;
export enum Outcome {
  Converged,
  MaxStepsExceeded,
  EarlyReturn,
}
export class Solver {
  constructor(n: number);
  n: number;
  maxSteps: number;
  initialStepSize: number;
  maxStepSize: number;
  denseOutput: boolean;
  relativeTolerance: number | number[];
  absoluteTolerance: number | number[];
  grid(dt: number, out: (xOut: number, yOut: number[]) => unknown): OutputFunction;
  solve(
    f: Derivative,
    x: number,
    y0: number[],
    xEnd: number,
    solOut?: OutputFunction,
  ): {
    y: number[];
    outcome: Outcome;
    nStep: number;
    xEnd: number;
    nAccept: number;
    nReject: number;
    nEval: number;
  };
}
