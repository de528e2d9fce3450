// Multipole content of a planar solution: Φ(r, θ) = Σ_n (cos_v cos nθ + sin_v sin nθ)(r / r_ref)^n,
// electrodes at their dc values, volts. The circle r = r_ref (inside the free region) is sampled at
// 720 equally spaced angles by bicubic interpolation of the grid (sample.ts), and each coefficient
// is the discrete Fourier projection of those samples (the trapezoidal rule, exact for the
// harmonics below 360 of a periodic function: Trefethen & Weideman, SIAM Review 56 (2014) 385).

import { FieldInputError, type FieldProblem, type FieldSolution } from './problem.js';
import { dcPotential, GridSampler } from './sample.js';

export interface MultipoleTerm { n: number; cos_v: number; sin_v: number }

const ANGLES = 720;

export function fitMultipoles(solution: FieldSolution, problem: FieldProblem, opts: { nMax?: number; referenceRadius?: number } = {}): MultipoleTerm[] {
  if (solution.grid.symmetry !== 'planar') throw new FieldInputError('grid.symmetry', `multipoles need a planar grid, not ${solution.grid.symmetry}`);
  const rRef = opts.referenceRadius ?? problem.grid.referenceRadius;
  if (rRef === undefined || !(rRef > 0)) throw new FieldInputError('grid.reference_radius', 'multipoles need grid.reference_radius (m), the radius of a circle inside the free region');
  const nMax = opts.nMax ?? 20;
  const sampler = new GridSampler(solution, dcPotential(solution, problem));
  const phi = new Float64Array(ANGLES);
  for (let m = 0; m < ANGLES; m++) {
    const th = (2 * Math.PI * m) / ANGLES;
    phi[m] = sampler.at(rRef * Math.cos(th), rRef * Math.sin(th));
  }
  const out: MultipoleTerm[] = [];
  for (let n = 0; n <= nMax; n++) {
    let c = 0, s = 0;
    for (let m = 0; m < ANGLES; m++) {
      const th = (2 * Math.PI * m * n) / ANGLES;
      c += phi[m] * Math.cos(th); s += phi[m] * Math.sin(th);
    }
    const k = n === 0 ? 1 / ANGLES : 2 / ANGLES;
    out.push({ n, cos_v: k * c, sin_v: n === 0 ? 0 : k * s });
  }
  return out;
}
