// Concentric spheres on the axial (r, z) grid: inner sphere of radius a at V, outer of radius b
// grounded, φ(ρ) = V a (b − ρ) / (ρ (b − a)) (closed form; Jackson, Classical Electrodynamics, 3rd
// ed., §1.13, the spherical capacitor). Uses the on-axis stencil and the r-weighted operator, with a
// mirror plane at the centre. Tolerance: the error of a second-order scheme scales with h² and the
// solution's curvature, here 2ab/(ρ³(b − a)) ≈ 21 V/b² at ρ = a, 3.6× that of the coaxial test
// (where b/32 gives ≈ 1e-4 per volt); the largest error, on the axis, was 5.3e-4 per volt at b/32
// when this test was written, so 1e-3 leaves a factor 2 (a staircase boundary is off by ≈ h φ' ≈
// 3e-2 here). The order between b/32 and b/64 must be at least 1.8.
import { describe, expect, it } from 'vitest';
import { solveField, type FieldProblem } from '../../sim/fields/index.js';

const a = 0.4e-3, b = 1e-3, L = 2.5e-3, zc = L / 2;

async function maxError(cells: number): Promise<number> {
  const h = b / cells;
  const problem: FieldProblem = {
    grid: { symmetry: 'axial', spacing: h, radius: 1.2 * b, length: L, mirror: ['z'] },
    electrodes: [
      { name: 'inner', potential: { dc: 1, rf: 0, aux: 0 }, shapes: [{ kind: 'ball', center: zc, radius: a }], holes: [] },
      { name: 'outer', potential: { dc: 0, rf: 0, aux: 0 }, shapes: [{ kind: 'polygon', points: [[0, 0], [2 * b, 0], [2 * b, L], [0, L]] }], holes: [{ kind: 'ball', center: zc, radius: b }] },
    ],
  };
  const s = await solveField(problem, { workers: 1 });
  const [nr, nz] = s.grid.shape;
  let err = 0;
  for (let j = 0; j < nz; j++) for (let i = 0; i < nr; i++) {
    const n = i + nr * j, rho = Math.hypot(i * h, s.grid.origin[1] + j * h - zc);
    if (s.inside[n] >= 0 || rho >= b) continue;
    const e = Math.abs(s.units[0][n] - (a * (b - rho)) / (rho * (b - a))); err = Math.max(err, e);
  }
  return err;
}

describe('concentric spheres on the axial grid: φ = V a (b − ρ)/(ρ (b − a))', () => {
  it('within 1e-3 per volt at b/32, second order to b/64', async () => {
    const e32 = await maxError(32), e64 = await maxError(64);
    expect(e32).toBeLessThanOrEqual(1e-3);
    expect(Math.log2(e32 / e64)).toBeGreaterThanOrEqual(1.8);
  });
});
