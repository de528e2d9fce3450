// Values of a solved 2D grid between nodes: bicubic Lagrange interpolation on the 4 × 4 nodes
// around the point (Abramowitz & Stegun 25.2.13 per axis, as a tensor product; error O(h⁴) where the
// potential is smooth over the 4 × 4 block). Mirror planes reflect the indices (even symmetry).

import type { FieldProblem, FieldSolution } from './problem.js';

/** The potential of the electrodes at their dc values, per node: Σ_e dc_e · unit_e. */
export function dcPotential(solution: FieldSolution, problem: FieldProblem): Float64Array {
  const out = new Float64Array(solution.units[0]?.length ?? 0);
  problem.electrodes.forEach((e, k) => {
    const u = solution.units[k], v = e.potential.dc;
    if (v !== 0) for (let n = 0; n < out.length; n++) out[n] += v * u[n];
  });
  return out;
}

function lagrange4(t: number, w: Float64Array): void {
  // Nodes at −1, 0, 1, 2 relative to the cell's lower node; t ∈ [0, 1).
  w[0] = (-t * (t - 1) * (t - 2)) / 6;
  w[1] = ((t + 1) * (t - 1) * (t - 2)) / 2;
  w[2] = (-(t + 1) * t * (t - 2)) / 2;
  w[3] = ((t + 1) * t * (t - 1)) / 6;
}

export class GridSampler {
  private readonly wa = new Float64Array(4);
  private readonly wb = new Float64Array(4);
  private readonly mirA: boolean;
  private readonly mirB: boolean;

  constructor(private readonly sol: FieldSolution, private readonly values: Float64Array) {
    const m = sol.grid.mirror, axial = sol.grid.symmetry === 'axial';
    this.mirA = axial || m.includes('x');
    this.mirB = axial ? m.includes('z') : m.includes('y');
  }

  /** The value at (a, b) in the grid's coordinates (planar x, y; axial r, z). */
  at(a: number, b: number): number {
    const g = this.sol.grid, h = g.spacing, [na, nb] = g.shape;
    if (this.mirA) a = g.origin[0] + Math.abs(a - g.origin[0]);
    if (this.mirB) b = g.origin[1] + Math.abs(b - g.origin[1]);
    const fa = (a - g.origin[0]) / h, fb = (b - g.origin[1]) / h;
    const ia = Math.min(Math.max(Math.floor(fa), 0), na - 2), ib = Math.min(Math.max(Math.floor(fb), 0), nb - 2);
    lagrange4(fa - ia, this.wa); lagrange4(fb - ib, this.wb);
    let s = 0;
    for (let q = 0; q < 4; q++) {
      const jb = this.index(ib - 1 + q, nb, this.mirB);
      let row = 0;
      for (let p = 0; p < 4; p++) row += this.wa[p] * this.values[this.index(ia - 1 + p, na, this.mirA) + na * jb];
      s += this.wb[q] * row;
    }
    return s;
  }

  private index(i: number, n: number, mirrored: boolean): number {
    if (i < 0) return mirrored ? -i : 0;
    return i >= n ? n - 1 : i;
  }
}
