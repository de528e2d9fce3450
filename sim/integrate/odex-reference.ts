// Reference solver for tests and benchmarks: the `odex` package 2.0.4 (C. Smith's TypeScript port of
// Hairer & Wanner's ODEX, the Gragg–Bulirsch–Stoer extrapolation code; HNW I, §II.9). Not used in hot
// paths: it allocates plain arrays on every call of the right-hand side.

import { createRequire } from 'node:module';
import type { Derivative } from './derivative.js';

// odex ships CommonJS without type declarations; describe the part we use.
interface OdexSolver {
  absoluteTolerance: number;
  relativeTolerance: number;
  maxSteps: number;
  initialStepSize: number;
  solve(f: (x: number, y: number[]) => number[], x0: number, y0: number[], x1: number):
    { y: number[]; outcome: number; nStep: number; nAccept: number; nReject: number; nEval: number; xEnd: number };
}
interface OdexModule {
  Solver: new (n: number) => OdexSolver;
  Outcome: { Converged: number; MaxStepsExceeded: number; EarlyReturn: number };
}

const odex = createRequire(import.meta.url)('odex') as OdexModule;

export interface OdexOptions {
  rtol?: number;
  atol?: number;
  maxSteps?: number;
}

export interface OdexResult {
  y: Float64Array;
  steps: number;
  evaluations: number;
}

/** Integrate y' = f(t, y) from t0 to t1 with odex 2.0.4; returns y(t1). Throws if odex does not converge. */
export function odexIntegrate(f: Derivative, t0: number, y0: ArrayLike<number>, t1: number, options: OdexOptions = {}): OdexResult {
  const n = y0.length;
  const solver = new odex.Solver(n);
  solver.relativeTolerance = options.rtol ?? 1e-12;
  solver.absoluteTolerance = options.atol ?? 1e-12;
  solver.maxSteps = options.maxSteps ?? 100000;
  const yIn = new Float64Array(n);
  const dOut = new Float64Array(n);
  const rhs = (x: number, y: number[]): number[] => {
    for (let i = 0; i < n; i++) yIn[i] = y[i];
    f(x, yIn, dOut);
    return Array.from(dOut);
  };
  const r = solver.solve(rhs, t0, Array.from(y0), t1);
  if (r.outcome !== odex.Outcome.Converged) {
    throw new Error(`odex did not converge (outcome ${r.outcome}) integrating to t = ${t1}`);
  }
  return { y: Float64Array.from(r.y), steps: r.nStep, evaluations: r.nEval };
}
