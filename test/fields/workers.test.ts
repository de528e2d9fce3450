// Same problem, same bytes, whatever the number of threads (DESIGN.md): the unit solutions computed
// on worker threads equal those computed on the main thread bit for bit.
import { describe, expect, it } from 'vitest';
import { solveField, type FieldProblem } from '../../sim/fields/index.js';

describe('unit solutions on worker threads', () => {
  it('are identical to the single-thread ones', async () => {
    const rod = (x: number, y: number) => ({ kind: 'circle' as const, center: [x, y] as const, radius: 1.1e-3 });
    const p: FieldProblem = {
      grid: { symmetry: 'planar', spacing: 0.05e-3, halfWidth: 5e-3, length: 0.1, mirror: ['x'] },
      electrodes: [
        { name: 'x-pair', potential: { dc: 1, rf: 0, aux: 0 }, shapes: [rod(2.1e-3, 0), rod(-2.1e-3, 0)], holes: [] },
        { name: 'y-pair', potential: { dc: -1, rf: 0, aux: 0 }, shapes: [rod(0, 2.1e-3), rod(0, -2.1e-3)], holes: [] },
        { name: 'shield', potential: { dc: 0, rf: 0, aux: 0 }, shapes: [{ kind: 'rectangle', min: [-5e-3, -5e-3], max: [5e-3, -4.5e-3] }], holes: [] },
      ],
    };
    const one = await solveField(p, { workers: 1 }), two = await solveField(p, { workers: 3 });
    for (let e = 0; e < 3; e++) expect(Buffer.compare(Buffer.from(one.units[e].slice().buffer), Buffer.from(two.units[e].slice().buffer))).toBe(0);
    const [nx, ny] = one.grid.shape, mid = nx * (ny >> 1) + (nx >> 2);
    expect(Math.abs(one.units[0][mid])).toBeGreaterThan(0.01); // a solved field, not zeros
  });
});
