// The field models of the multipole and linear-trap kinds against two outside facts:
// - an electrostatic potential in free space satisfies Laplace's equation ∇²Φ = 0 (Jackson,
//   Classical Electrodynamics, 3rd ed., eq. 1.23 with ρ = 0): checked by central differences of
//   each unit solution, h = 1e-5 r0; rounding gives ~ε·|Φ|/h² ≈ 4e-7 of the 1/r0² scale of
//   |∂²Φ/∂x²| and truncation ~h²Φ''''/12 far less, so 1e-5 is the bound (a wrong factor in any
//   term, e.g. z² for 2z² in the well, misses it by order 1);
// - E = −∇Φ (same book, eq. 1.16): each term's unit field against central differences (1e-7).
// Plus the rod potentials the convention fixes: Φ = ±(U + V cos Ωt) on the rods' tips, r = r0 at
// θ = kπ/n (Gerlich 1992, eq. for the ideal multipole).
import { describe, expect, it } from 'vitest';
import { kindOf } from '../../sim/stages/registry.js';
import type { FieldModel } from '../../sim/core/field-model.js';
import type { LinearTrapStage, MultipoleStage } from '../../sim/stages/types.js';

const r0 = 3e-3;
const multipole = (poles: number): MultipoleStage => ({ type: 'multipole', poles, r0, rf: { amplitude: 120, frequency: 2e6, phase: 0 }, dc: 7, length: 0.1, zStart: 0, zEnd: 0.1 });
const linear: LinearTrapStage = { type: 'linear-trap', r0, z0: 0.02, length: 0.04, rf: { amplitude: 200, frequency: 1e6, phase: 0 }, dc: 3, endDc: 10, kappa: 0.07, aux: { amplitude: 2, frequency: 2e5, phase: 0 }, zStart: 0, zEnd: 0.04 };

function checkTerms(fm: FieldModel, points: [number, number, number][]) {
  const h = 1e-5 * r0, e = new Float64Array(3);
  for (const term of fm.terms) {
    const phi = term.unitPotential;
    for (const [x, y, z] of points) {
      const c = phi(x, y, z);
      const d2 = [[h, 0, 0], [0, h, 0], [0, 0, h]].map(([a, b, g]) => (phi(x + a, y + b, z + g) - 2 * c + phi(x - a, y - b, z - g)) / (h * h));
      const scale = Math.max(...d2.map(Math.abs), 1 / (r0 * r0));
      expect(Math.abs(d2[0] + d2[1] + d2[2]) / scale, `${term.name} Laplacian at ${x},${y},${z}`).toBeLessThan(1e-5);
      term.unitField(x, y, z, e);
      const g = [(phi(x + h, y, z) - phi(x - h, y, z)) / (2 * h), (phi(x, y + h, z) - phi(x, y - h, z)) / (2 * h), (phi(x, y, z + h) - phi(x, y, z - h)) / (2 * h)];
      const gs = Math.max(...g.map(Math.abs), 1 / r0);
      for (let k = 0; k < 3; k++) expect(Math.abs(e[k] + g[k]) / gs, `${term.name} E${'xyz'[k]}`).toBeLessThan(1e-7);
    }
  }
}

const pts: [number, number, number][] = [[0.4e-3, 0.7e-3, 0.002], [-1.1e-3, 0.3e-3, -0.004], [0.9e-3, -1.6e-3, 0.006]];

describe('multipole field model', () => {
  for (const poles of [4, 6, 8, 12]) {
    it(`${poles} rods: Laplace, E = −∇Φ, and ±(U + V) on the rod tips`, () => {
      const st = multipole(poles), fm = kindOf(st).field(st);
      checkTerms(fm, pts);
      const n = poles / 2;
      for (let k = 0; k < poles; k++) {
        const th = (k * Math.PI) / n;
        expect(fm.potential(r0 * Math.cos(th), r0 * Math.sin(th), 0, 0)).toBeCloseTo((k % 2 === 0 ? 1 : -1) * (7 + 120), 9);
      }
      expect(fm.outside(0.99 * r0, 0, 0)).toBe(false);
      expect(fm.outside(0, 1.01 * r0, 0)).toBe(true);
    });
  }
});

describe('linear-trap field model', () => {
  it('rods, end-electrode well and supplementary AC: Laplace and E = −∇Φ', () => {
    const fm = kindOf(linear).field(linear);
    checkTerms(fm, pts);
    // Rod tips at ±(U + V) with the well's own contribution −κU_end r0²/(2 z0²) at z = 0.
    const well = (-linear.kappa * linear.endDc * r0 * r0) / (2 * linear.z0 ** 2);
    expect(fm.dcPotential(r0, 0, 0)).toBeCloseTo(3 + well, 12);
    expect(fm.dcPotential(0, r0, 0)).toBeCloseTo(-3 + well, 12);
    // On the axis at the end electrodes the well reaches κ·U_end (the depth it is named for).
    expect(fm.dcPotential(0, 0, linear.z0)).toBeCloseTo(linear.kappa * linear.endDc, 12);
    expect(fm.outside(0, 0, 1.001 * linear.z0)).toBe(true);
  });
});
