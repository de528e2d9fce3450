// Direct (pairwise) Coulomb field of an ion cloud with Plummer softening:
//   E_i = k Σ_{j≠i} Q_j (r_i − r_j) / (|r_i − r_j|² + ε²)^{3/2},   k = 1/(4π ε0)
// (Coulomb's law; the softened kernel is Plummer's, Aarseth, Gravitational N-Body Simulations,
// Cambridge 2003, eq. 2.5). Q_j is the source charge of ion j: w·q_j for macro-particles of weight w,
// and 0 for an ion that is no longer in the cloud. The stepper turns the field into acceleration
// with the ion's own q/m.
//
// Summation order. Each target's field is accumulated in ascending source index, starting from 0.
// The symmetric loop below (Newton's third law, one distance per pair) keeps that order: target j
// receives the pair (r, j) while row r < j runs, then its own row j. The pair term for (j, r) is the
// exact negation of the one for (r, j) in IEEE arithmetic, so any split of targets into blocks
// (fieldBlock) gives the same bits as one full pass — the result does not depend on worker count.
// Every pair term is written (d · inv3) · Q in all three loops so the bits match.

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

/**
 * Field at targets [a, b) from all n sources, written into out[a..b). Sources outside the block are
 * summed one-sided; pairs inside the block use the symmetric loop. Per target, sources are added in
 * ascending index (see header), so every block split gives identical bits.
 */
export function fieldBlock(c: ChargeCloud, eps2: number, a: number, b: number, out: FieldOut): void {
  const { n, x, y, z, qs } = c;
  const { ex, ey, ez } = out;
  // Sources below the block, one-sided.
  for (let i = a; i < b; i++) {
    const xi = x[i], yi = y[i], zi = z[i];
    let fx = 0, fy = 0, fz = 0;
    for (let j = 0; j < a; j++) {
      const dx = xi - x[j], dy = yi - y[j], dz = zi - z[j];
      const r2 = dx * dx + dy * dy + dz * dz + eps2;
      const inv3 = 1 / (r2 * Math.sqrt(r2));
      const qj = qs[j];
      fx += dx * inv3 * qj; fy += dy * inv3 * qj; fz += dz * inv3 * qj;
    }
    ex[i] = fx; ey[i] = fy; ez[i] = fz;
  }
  // Pairs inside the block, symmetric: one inverse distance per pair.
  for (let i = a; i < b; i++) {
    const xi = x[i], yi = y[i], zi = z[i], qi = qs[i];
    let fx = ex[i], fy = ey[i], fz = ez[i];
    for (let j = i + 1; j < b; j++) {
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
  // Sources above the block, one-sided.
  for (let i = a; i < b; i++) {
    const xi = x[i], yi = y[i], zi = z[i];
    let fx = ex[i], fy = ey[i], fz = ez[i];
    for (let j = b; j < n; j++) {
      const dx = xi - x[j], dy = yi - y[j], dz = zi - z[j];
      const r2 = dx * dx + dy * dy + dz * dz + eps2;
      const inv3 = 1 / (r2 * Math.sqrt(r2));
      const qj = qs[j];
      fx += dx * inv3 * qj; fy += dy * inv3 * qj; fz += dz * inv3 * qj;
    }
    ex[i] = fx; ey[i] = fy; ez[i] = fz;
  }
}

/** Field, V/m, at every ion from all others (single thread). softening ε in m. */
export function directField(c: ChargeCloud, softening: number, out: FieldOut): void {
  const n = c.n;
  fieldBlock(c, softening * softening, 0, n, out);
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
