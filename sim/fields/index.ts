// The electrode field solver: geometry, finite-volume Laplace operator with Shortley–Weller
// curved-boundary rows, multigrid-preconditioned BiCGSTAB, unit solutions on
// worker threads, and the multipole and axis-series fits of a solution.

export * from './problem.js';
export { solveField, DEFAULT_TOLERANCE, type SolveOptions } from './solve.js';
export { GridSampler, dcPotential } from './sample.js';
export { fitMultipoles, type MultipoleTerm } from './multipoles.js';
export { axisLegendre, axisSeriesFrame, type AxisTerm } from './axis-series.js';
export { checkProblem, estimateMemory } from './check.js';
