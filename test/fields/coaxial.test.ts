// Coaxial cylinders on a planar grid: inner conductor of radius a at V, outer of radius b grounded,
// φ(r) = V ln(b/r) / ln(b/a) (closed form; e.g. Jackson, Classical Electrodynamics, 3rd ed., §1.13,
// the coaxial capacitor). The bounds: error second order over three grids (observed order
// 1.8–2.2) and ≤ 2e-4 V per volt at spacing b/32. Max error over every free node with r < b.
import { describe, expect, it } from 'vitest';
import { solveField, type FieldProblem } from '../../sim/fields/index.js';

const a = 0.5e-3, b = 1e-3;

function coax(h: number): FieldProblem {
  return {
    grid: { symmetry: 'planar', spacing: h, halfWidth: 1.25 * b, length: b, mirror: ['x', 'y'] },
    electrodes: [
      { name: 'inner', potential: { dc: 1, rf: 0, aux: 0 }, shapes: [{ kind: 'circle', center: [0, 0], radius: a }], holes: [] },
      { name: 'outer', potential: { dc: 0, rf: 0, aux: 0 }, shapes: [{ kind: 'rectangle', min: [-2 * b, -2 * b], max: [2 * b, 2 * b] }], holes: [{ kind: 'circle', center: [0, 0], radius: b }] },
    ],
  };
}

async function maxError(cells: number): Promise<number> {
  const h = b / cells, s = await solveField(coax(h), { workers: 1 });
  const [nx, ny] = s.grid.shape;
  let err = 0;
  for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
    const n = i + nx * j, r = Math.hypot(s.grid.origin[0] + i * h, s.grid.origin[1] + j * h);
    if (s.inside[n] >= 0 || r >= b) continue;
    err = Math.max(err, Math.abs(s.units[0][n] - Math.log(b / r) / Math.log(b / a)));
  }
  return err;
}

describe('coaxial cylinders: φ = V ln(b/r)/ln(b/a)', () => {
  // Superposition and uniqueness: the two conductors enclose the field, so the sum of their unit
  // solutions solves the problem with every boundary at 1 V, whose solution is 1 everywhere. Bound:
  // the solver tolerance (1e-10 relative) times the condition number (≈ 1e4 at b/32): 1e-6.
  it('the unit solutions add up to 1', async () => {
    const s = await solveField(coax(b / 32), { workers: 1 });
    let worst = 0;
    for (let n = 0; n < s.inside.length; n++) worst = Math.max(worst, Math.abs(s.units[0][n] + s.units[1][n] - 1));
    expect(worst).toBeLessThanOrEqual(1e-6);
  });

  it('second order over b/16, b/32, b/64 and ≤ 2e-4 per volt at b/32', async () => {
    const [e16, e32, e64] = [await maxError(16), await maxError(32), await maxError(64)];
    const p1 = Math.log2(e16 / e32), p2 = Math.log2(e32 / e64);
    expect(p1).toBeGreaterThanOrEqual(1.8); expect(p1).toBeLessThanOrEqual(2.2);
    expect(p2).toBeGreaterThanOrEqual(1.8); expect(p2).toBeLessThanOrEqual(2.2);
    expect(e32).toBeLessThanOrEqual(2e-4);
  });
});
