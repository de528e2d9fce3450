// Node values inside electrodes near their surface, replaced by the smooth continuation of the
// free-space solution, so the cubic interpolant (interpolate.ts) of a cell that straddles a surface
// follows the Laplace solution up to the surface instead of bending into the flat value the
// electrode holds (a kink there would give the last cell a spurious field).
//
// Layer by layer (first the inside nodes with a known neighbour, then the next layer from those),
// each node takes the mean over the grid directions with known nodes of the polynomial
// extrapolation through them: quadratic 3φ₁ − 3φ₂ + φ₃ with three known nodes in a row, linear
// 2φ₁ − φ₂ with two (Newton's forward-difference formula, e.g. Abramowitz & Stegun 25.2.5
// truncated). Two layers cover the reach of a six-node interpolation window from a free cell
// (its nodes i−2..i+3; the nodes of an outer ring beyond two cells do not enter a cell whose own
// corners are free). Deterministic: each layer reads the values of the layers before it only.

import type { SolvedGrid } from './problem.js';

/** Layers of inside nodes replaced (issue 13: within two cells of a surface). */
export const EXTRAPOLATED_LAYERS = 2;

/**
 * A copy of `values` (one unit solution) whose inside nodes within `layers` grid steps of a free
 * node hold extrapolated values. `inside`: per node the electrode index, or −1 where free.
 */
export function extendIntoElectrodes(grid: SolvedGrid, values: ArrayLike<number>, inside: Int16Array, layers = EXTRAPOLATED_LAYERS): Float64Array {
  const [n0, n1, n2] = grid.shape;
  const N = n0 * n1 * n2;
  const out = Float64Array.from(values as ArrayLike<number>);
  // known[n]: 0 not yet, 1 free, 2 + layer for a node filled in that layer.
  const known = new Uint8Array(N);
  for (let n = 0; n < N; n++) if (inside[n] < 0) known[n] = 1;
  const strides = [1, n0, n0 * n1];
  const dims = [n0, n1, n2];
  const axes = n2 > 1 ? 3 : 2;
  const fill: number[] = [];
  const vals: number[] = [];
  for (let layer = 0; layer < layers; layer++) {
    fill.length = 0; vals.length = 0;
    for (let k = 0; k < n2; k++) for (let j = 0; j < n1; j++) for (let i = 0; i < n0; i++) {
      const n = i + n0 * (j + n1 * k);
      if (known[n] !== 0) continue;
      let sum = 0, count = 0;
      for (let a = 0; a < axes; a++) {
        const at = a === 0 ? i : a === 1 ? j : k, sa = strides[a], na = dims[a];
        for (let dir = -1; dir <= 1; dir += 2) {
          // Known nodes in a row from this one (at most three).
          let m = 0, f0 = 0, f1 = 0, f2 = 0;
          for (let s = 1; s <= 3; s++) {
            const c = at + dir * s;
            if (c < 0 || c >= na) break;
            const q = n + dir * s * sa;
            if (known[q] === 0) break;
            if (s === 1) f0 = out[q]; else if (s === 2) f1 = out[q]; else f2 = out[q];
            m++;
          }
          if (m >= 3) { sum += 3 * f0 - 3 * f1 + f2; count++; }
          else if (m === 2) { sum += 2 * f0 - f1; count++; }
        }
      }
      if (count > 0) { fill.push(n); vals.push(sum / count); }
    }
    for (let q = 0; q < fill.length; q++) { out[fill[q]] = vals[q]; known[fill[q]] = 2 + layer; }
  }
  return out;
}
