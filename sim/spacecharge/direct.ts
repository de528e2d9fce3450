// Direct (pairwise) Coulomb field of an ion cloud with Plummer softening:
//   E_i = k Σ_{j≠i} Q_j (r_i − r_j) / (|r_i − r_j|² + ε²)^{3/2},   k = 1/(4π ε0)
// (Coulomb's law; the softened kernel is Plummer's, Aarseth, Gravitational N-Body Simulations,
// Cambridge 2003, eq. 2.5). Q_j is the source charge of ion j: w·q_j for macro-particles of weight w,
// and 0 for an ion that is no longer in the cloud. The stepper turns the field into acceleration
// with the ion's own q/m.
//
// Summation order. Each target's field is accumulated in ascending source index, starting from 0.
// The symmetric loop below (Newton's third law, one distance per pair) keeps that order: target j
// receives the pair (r, j) while row r < j runs, then its own row j. Cutting the loop into tiles
// (fieldTile) and running each target's tiles in ascending source order repeats exactly the same
// additions, so the parallel wavefront (parallel.ts) gives the bits of one serial pass whatever
// the number of threads.

import { VACUUM_PERMITTIVITY } from '../units/constants.js';

/** Coulomb constant k = 1/(4π ε0), N·m²/C² (ε0 CODATA 2018). */
export const COULOMB_K = 1 / (4 * Math.PI * VACUUM_PERMITTIVITY);

/** Positions and source charges of a cloud, struct of arrays, SI. */
export interface ChargeCloud {
  n: number;
  x: Float64Array; y: Float64Array; z: Float64Array;
  /** Source charge of each ion, C (weight × charge; 0 for removed ions). */
  qs: Float64Array;
}

/** Field output, V/m, one entry per ion. */
export interface FieldOut {
  ex: Float64Array; ey: Float64Array; ez: Float64Array;
}

/** Field, V/m, at every ion from all others (single thread). softening ε in m. */
export function directField(c: ChargeCloud, softening: number, out: FieldOut): void {
  const n = c.n;
  out.ex.fill(0, 0, n); out.ey.fill(0, 0, n); out.ez.fill(0, 0, n);
  fieldTile(c, softening * softening, 0, n, 0, n, out);
  scaleField(out, n, COULOMB_K);
}

export function scaleField(out: FieldOut, n: number, k: number): void {
  const { ex, ey, ez } = out;
  for (let i = 0; i < n; i++) { ex[i] *= k; ey[i] *= k; ez[i] *= k; }
}

/** Softened Coulomb energy k Σ_{i<j} Q_i Q_j / sqrt(r² + ε²), J, with Q the source charges. */
export function coulombEnergy(c: ChargeCloud, softening: number): number {
  const { n, x, y, z, qs } = c;
  const eps2 = softening * softening;
  let u = 0;
  for (let i = 0; i < n; i++) {
    let ui = 0;
    for (let j = i + 1; j < n; j++) {
      const dx = x[i] - x[j], dy = y[i] - y[j], dz = z[i] - z[j];
      ui += qs[j] / Math.sqrt(dx * dx + dy * dy + dz * dz + eps2);
    }
    u += qs[i] * ui;
  }
  return COULOMB_K * u;
}

/**
 * One tile of the symmetric pair loop: rows [i0, i1) against sources [j0, j1), j0 ≥ i1, or the
 * triangle of block [i0, i1) itself when j0 = i0 (then j1 = i1). Row targets accumulate their
 * sources in ascending order, column targets receive rows in ascending order, each into its running
 * sum in out — so running the tiles of every target in ascending source order (parallel.ts) gives
 * the bits of directField.
 */
export function fieldTile(c: ChargeCloud, eps2: number, i0: number, i1: number, j0: number, j1: number, out: FieldOut): void {
  const { x, y, z, qs } = c;
  const { ex, ey, ez } = out;
  const diag = j0 === i0;
  for (let i = i0; i < i1; i++) {
    const xi = x[i], yi = y[i], zi = z[i], qi = qs[i];
    let fx = ex[i], fy = ey[i], fz = ez[i];
    for (let j = diag ? i + 1 : j0; j < j1; j++) {
      const dx = xi - x[j], dy = yi - y[j], dz = zi - z[j];
      const r2 = dx * dx + dy * dy + dz * dz + eps2;
      const inv3 = 1 / (r2 * Math.sqrt(r2));
      const gx = dx * inv3, gy = dy * inv3, gz = dz * inv3;
      const qj = qs[j];
      fx += gx * qj; fy += gy * qj; fz += gz * qj;
      ex[j] -= gx * qi; ey[j] -= gy * qi; ez[j] -= gz * qi;
    }
    ex[i] = fx; ey[i] = fy; ez[i] = fz;
  }
}
