// odex ships TypeScript sources that do not pass `strict`; this declaration of the part the tests use
// stands in for them (tsconfig maps the module here).
declare module 'odex' {
  export type Derivative = (x: number, y: number[]) => number[];
  export type OutputFunction = (nr: number, xOld: number, x: number, y: number[], dense?: (c: number, x: number) => number) => boolean | void;
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
}
