// The Laplace solver's entry points (sim/fields/index.ts, built beside this command on its own
// branch), loaded when a solve is asked for. The signatures are the contract of sim/fields.

import type { FieldProblem, FieldSolution } from '../sim/fields/problem.js';
import { UsageError } from './errors.js';

export interface Multipole { n: number; cos_v: number; sin_v: number }

export interface SolverApi {
  estimateMemory(problem: FieldProblem): number;
  checkProblem(problem: FieldProblem, opts: { freeMemoryBytes: number }): void;
  solveField(problem: FieldProblem, opts: { workers?: number; tolerance?: number; maxIterations?: number }): Promise<FieldSolution>;
  fitMultipoles(solution: FieldSolution, problem: FieldProblem, opts: { nMax: number; referenceRadius: number }): Multipole[];
  axisLegendre(solution: FieldSolution, problem: FieldProblem, opts?: Record<string, unknown>): unknown;
}

export async function solverApi(): Promise<SolverApi> {
  const where = '../sim/fields/index.js';
  try {
    return (await import(where)) as SolverApi;
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ERR_MODULE_NOT_FOUND') throw new UsageError('field: this build has no Laplace solver (sim/fields/index.ts)');
    throw e;
  }
}
