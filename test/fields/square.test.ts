// A square box whose top side is at V and the other three grounded: by symmetry (the four rotations
// of the problem add up to the box at V everywhere) the centre is at V/4 exactly, also for the
// discrete 5-point operator, whose corner nodes no interior stencil reaches. Tests the linear solver
// alone: the only error left is the solver's, bounded by the 1e-10 relative residual times the
// condition number (≈ 4n²/π² ≈ 1.7e3 here), so 1e-6 V per volt is a safe bound.
import { describe, expect, it } from 'vitest';
import { solveField, type FieldProblem } from '../../sim/fields/index.js';

describe('square with one side at V (symmetry)', () => {
  it('centre at V/4', async () => {
    const problem: FieldProblem = {
      grid: { symmetry: 'planar', spacing: 1 / 32, halfWidth: 1, length: 1, mirror: [] },
      electrodes: [{ name: 'top', potential: { dc: 1, rf: 0, aux: 0 }, shapes: [{ kind: 'rectangle', min: [-1, 1], max: [1, 1.5] }], holes: [] }],
    };
    const sol = await solveField(problem, { workers: 1 });
    const [nx] = sol.grid.shape, c = 32 + nx * 32;
    expect(sol.grid.shape).toEqual([65, 65, 1]);
    expect(Math.abs(sol.units[0][c] - 0.25)).toBeLessThan(1e-6);
    expect(sol.stats.residual[0]).toBeLessThanOrEqual(1e-10);
  });
});
