// The Legendre axis series of an axial solution, against a field known in closed form: plates at
// z = 0 (0 V) and z = L (V) across a box of radius 3L give φ(0, z) = V z / L near the axis, whose
// series about L/2 with scale L/2 is c0 = V/2, c1 = V/2 and nothing else. The grounded side wall
// at R = 3L adds Σ_n (2V/nπ)(−1)^n sin(nπz/L) I₀(nπr/L)/I₀(nπR/L) (separation of variables in a
// cylinder between plates, e.g. Jackson §3.8; worked out here, not quoted), at most
// (2/π)/I₀(3π) ≈ 4e-4 V per volt on the axis; the stencils are exact for linear functions, so the
// grid adds nothing near the axis. Bound 5e-4 V per volt on each coefficient. (The V plate's face
// must be at z = L exactly: a plate centred on L would put its face a quarter cell closer.)
import { describe, expect, it } from 'vitest';
import { axisLegendre, solveField, type FieldProblem } from '../../sim/fields/index.js';

describe('axis Legendre series', () => {
  it('uniform field between plates: c0 = c1 = V/2, higher terms 0', async () => {
    const L = 10e-3, h = 0.2e-3, V = 50;
    const problem: FieldProblem = {
      grid: { symmetry: 'axial', spacing: h, radius: 3 * L, length: L, mirror: [] },
      electrodes: [
        { name: 'plate', potential: { dc: V, rf: 0, aux: 0 }, shapes: [{ kind: 'disc', at: L + h / 4, thickness: h / 2, radius: 4 * L, hole: 0 }], holes: [] },
      ],
    };
    const s = await solveField(problem, { workers: 1 });
    const terms = axisLegendre(s, problem, { nMax: 6 });
    expect(terms.map((t) => t.n)).toEqual([0, 1, 2, 3, 4, 5, 6]);
    expect(Math.abs(terms[0].c_v - V / 2)).toBeLessThanOrEqual(5e-4 * V);
    expect(Math.abs(terms[1].c_v - V / 2)).toBeLessThanOrEqual(5e-4 * V);
    for (const t of terms.slice(2)) expect(Math.abs(t.c_v)).toBeLessThanOrEqual(5e-4 * V);
  });
});
