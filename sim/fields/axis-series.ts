// Axis potential of an axial solution as a Legendre series about the stage centre, the axial
// counterpart of the planar multipoles: φ(0, z) ≈ Σ_n c_n P_n(u), u = (z − about)/scale ∈ [−1, 1],
// scale = grid.reference_radius (else half the stage length), electrodes at their dc values, volts. The coefficients are the least-squares fit to the axis nodes
// in [about − scale, about + scale] (normal equations, solved by Gaussian elimination with partial
// pivoting), P_n by Bonnet's recurrence (n+1) P_{n+1} = (2n+1) u P_n − n P_{n−1} (Abramowitz & Stegun
// 22.7.10). A mirror plane z gives the other half by reflection.

import { FieldInputError, type FieldProblem, type FieldSolution } from './problem.js';
import { dcPotential } from './sample.js';

export interface AxisTerm { n: number; c_v: number }

function legendre(u: number, nMax: number, out: Float64Array): void {
  out[0] = 1;
  if (nMax >= 1) out[1] = u;
  for (let n = 1; n < nMax; n++) out[n + 1] = ((2 * n + 1) * u * out[n] - n * out[n - 1]) / (n + 1);
}

/** The default frame of the fit: centre and half-width of the axis span (see axisLegendre). */
export function axisSeriesFrame(problem: FieldProblem): { about: number; scale: number } {
  return { about: problem.grid.length / 2, scale: problem.grid.referenceRadius ?? problem.grid.length / 2 };
}

export function axisLegendre(solution: FieldSolution, problem: FieldProblem, opts: { nMax?: number; about?: number; scale?: number } = {}): AxisTerm[] {
  const g = solution.grid;
  if (g.symmetry !== 'axial') throw new FieldInputError('grid.symmetry', `the axis series needs an axial grid, not ${g.symmetry}`);
  // The fit spans the free region about the centre (grid.reference_radius when given): over the whole
  // stage it would also fit the fall-off beyond the electrodes, and a trap's hexapole and octopole
  // would come out as large as its quadrupole.
  const frame = axisSeriesFrame(problem);
  const nMax = opts.nMax ?? 10, about = opts.about ?? frame.about, scale = opts.scale ?? frame.scale;
  const phi = dcPotential(solution, problem), [nr, nz] = g.shape, h = g.spacing, K = nMax + 1;
  const mirrored = g.mirror.includes('z');
  const A = new Float64Array(K * K), rhs = new Float64Array(K), P = new Float64Array(K);
  let samples = 0;
  for (let j = 0; j < nz; j++) {
    const z = g.origin[1] + j * h;
    for (const zz of mirrored && j > 0 ? [z, 2 * g.origin[1] - z] : [z]) {
      const u = (zz - about) / scale;
      if (u < -1 - 1e-12 || u > 1 + 1e-12) continue;
      legendre(u, nMax, P);
      samples++;
      for (let a = 0; a < K; a++) { rhs[a] += P[a] * phi[nr * j]; for (let b = 0; b < K; b++) A[a * K + b] += P[a] * P[b]; }
    }
  }
  if (samples < 2 * K) throw new FieldInputError('grid.spacing', `the axis series of order ${nMax} needs at least ${2 * K} axis nodes within ±scale of the centre, the grid has ${samples}`);
  // Gaussian elimination with partial pivoting.
  for (let p = 0; p < K; p++) {
    let best = p;
    for (let i = p + 1; i < K; i++) if (Math.abs(A[i * K + p]) > Math.abs(A[best * K + p])) best = i;
    if (best !== p) {
      for (let c = 0; c < K; c++) { const t = A[p * K + c]; A[p * K + c] = A[best * K + c]; A[best * K + c] = t; }
      const t = rhs[p]; rhs[p] = rhs[best]; rhs[best] = t;
    }
    for (let i = p + 1; i < K; i++) {
      const l = A[i * K + p] / A[p * K + p];
      for (let c = p; c < K; c++) A[i * K + c] -= l * A[p * K + c];
      rhs[i] -= l * rhs[p];
    }
  }
  const c = new Float64Array(K);
  for (let i = K - 1; i >= 0; i--) {
    let s = rhs[i];
    for (let q = i + 1; q < K; q++) s -= A[i * K + q] * c[q];
    c[i] = s / A[i * K + i];
  }
  return [...c].map((c_v, n) => ({ n, c_v }));
}
