// Each stage kind's field model (sim/stages/<kind>/field.ts) against its closed form, directly:
// the potential, E = −∇Φ of every unit solution, Laplace's equation, electrode potentials and the
// batch acceleration the coupled stepper uses. Gradients and Laplacians by central differences
// (a general numerical method, no project code): with step δ = 1e-4·r0 the truncation error of a
// first derivative is O(δ²) ≈ 1e-8 relative and of a second O(δ²) over a rounding floor of
// ε·|φ|/δ² ≈ 1e-8/r0²; the tolerances below sit above both.
import { describe, it, expect } from 'vitest';
import type { FieldModel } from '../../sim/core/field-model.js';
import { sumPotential } from '../../sim/core/field-model.js';
import { quadrupoleField } from '../../sim/stages/quadrupole/field.js';
import { trapField } from '../../sim/stages/trap/field.js';
import { uniformField } from '../../sim/stages/shared/uniform-field.js';
import { kindOf } from '../../sim/stages/registry.js';
import { mathieuParameters } from '../../sim/mathieu/parameters.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';
import type { QuadrupoleStage, TrapStage } from '../../sim/stages/types.js';

const r0 = 4e-3, U = 118, V = 830, f = 1.2e6, phase = 0.3, omega = 2 * Math.PI * f;
const quad: QuadrupoleStage = { type: 'quadrupole', r0, rf: { amplitude: V, frequency: f, phase }, dc: U, length: 0.15, zStart: 0.01, zEnd: 0.16 };
const z0 = 5e-3, rT = 7.07e-3;
const trap: TrapStage = { type: 'trap', r0: rT, z0, rf: { amplitude: 400, frequency: 1.05e6, phase: 0 }, dc: -20, aperture: 1e-3, zStart: 0, zEnd: 2 * z0, length: 2 * z0, aux: { amplitude: 3, frequency: 90e3, phase: 0.5 } };

const points = [[0.3e-3, -0.8e-3, 0.2e-3], [1.1e-3, 0.4e-3, -0.6e-3], [-0.5e-3, -1.2e-3, 1.0e-3]];

function checkTerms(m: FieldModel, scale: number) {
  const d = 1e-4 * scale, out = new Float64Array(3);
  for (const term of m.terms) {
    for (const [x, y, z] of points) {
      term.unitField(x, y, z, out);
      const gx = (term.unitPotential(x + d, y, z) - term.unitPotential(x - d, y, z)) / (2 * d);
      const gy = (term.unitPotential(x, y + d, z) - term.unitPotential(x, y - d, z)) / (2 * d);
      const gz = (term.unitPotential(x, y, z + d) - term.unitPotential(x, y, z - d)) / (2 * d);
      const size = Math.max(1 / scale, Math.hypot(gx, gy, gz));
      expect(Math.abs(out[0] + gx) / size).toBeLessThan(1e-6);
      expect(Math.abs(out[1] + gy) / size).toBeLessThan(1e-6);
      expect(Math.abs(out[2] + gz) / size).toBeLessThan(1e-6);
      // Laplace's equation ∇²φ = 0 for a field in vacuum (Jackson, Classical Electrodynamics, eq. 1.23).
      const p0 = term.unitPotential(x, y, z);
      const lap = (term.unitPotential(x + d, y, z) + term.unitPotential(x - d, y, z) + term.unitPotential(x, y + d, z)
        + term.unitPotential(x, y - d, z) + term.unitPotential(x, y, z + d) + term.unitPotential(x, y, z - d) - 6 * p0) / (d * d);
      expect(Math.abs(lap) * scale * scale).toBeLessThan(1e-5);
    }
  }
}

function checkAcceleration(m: FieldModel, t: number) {
  const n = points.length, qm = new Float64Array(n).fill(ELEMENTARY_CHARGE / (500 * ATOMIC_MASS_UNIT));
  const x = Float64Array.from(points.map((p) => p[0])), y = Float64Array.from(points.map((p) => p[1])), z = Float64Array.from(points.map((p) => p[2]));
  const ax = new Float64Array(n), ay = new Float64Array(n), az = new Float64Array(n);
  m.addAcceleration(t, n, x, y, z, qm, ax, ay, az);
  const e = new Float64Array(3);
  for (let i = 0; i < n; i++) {
    let ex = 0, ey = 0, ez = 0;
    // The coupled stepper runs every term, the supplementary AC included, on the run clock.
    for (const k of m.terms) { k.unitField(x[i], y[i], z[i], e); const c = k.drive(t); ex += c * e[0]; ey += c * e[1]; ez += c * e[2]; }
    const size = Math.hypot(ex, ey, ez) * qm[i];
    expect(Math.abs(ax[i] - qm[i] * ex) / size).toBeLessThan(1e-12);
    expect(Math.abs(ay[i] - qm[i] * ey) / size).toBeLessThan(1e-12);
    expect(Math.abs(az[i] - qm[i] * ez) / size).toBeLessThan(1e-12);
  }
}

describe('quadrupole field model', () => {
  const m = quadrupoleField(quad);
  it('is Φ = (U + V cos(Ω(t + τ) + φ))(x² − y²)/r0² (Dawson 1976, ch. 2), the sum of its terms', () => {
    for (const [x, y, z] of points) for (const [t, tau] of [[0, 0], [3.1e-7, 1e-8], [5e-6, -2e-7]]) {
      const closed = ((U + V * Math.cos(omega * (t + tau) + phase)) * (x * x - y * y)) / (r0 * r0);
      expect(m.potential(x, y, z, t, tau)).toBeCloseTo(closed, 10);
      expect(sumPotential(m.terms, x, y, z, t, tau)).toBeCloseTo(closed, 10);
    }
    // Rod surfaces x² − y² = ±r0²: the rods sit at ±(U + V cos θ).
    expect(m.potential(r0, 0, 0, 0, 0)).toBeCloseTo(U + V * Math.cos(phase), 9);
    expect(m.potential(0, r0, 0, 0, 0)).toBeCloseTo(-(U + V * Math.cos(phase)), 9);
  });
  it('has E = −∇φ for each unit solution, which solves Laplace’s equation', () => checkTerms(m, r0));
  it('gives the batch acceleration (q/m)·Σ c_k E_k', () => checkAcceleration(m, 1.7e-7));
  it('is linear, time-dependent, with the rods at x² + y² = r0² and no potential step', () => {
    expect(m.linear).toBe(true);
    expect(m.steady).toBe(false);
    expect(m.drop).toBe(0);
    expect(m.outside(0.99 * r0, 0, 0)).toBe(false);
    expect(m.outside(0.8 * r0, 0.61 * r0, 0)).toBe(true);
    expect(quadrupoleField({ ...quad, rf: { ...quad.rf, amplitude: 0 } }).steady).toBe(true);
  });
});

describe('trap field model', () => {
  const m = trapField(trap);
  const d2 = rT * rT + 2 * z0 * z0;
  it('puts U + V cos θ between ring and end caps (March & Todd 2005, ch. 2: ring r² − 2z² = r0², caps 2z² − r² = 2z0²)', () => {
    const plain = trapField({ ...trap, aux: undefined });
    for (const t of [0, 2.2e-7, 9e-7]) {
      expect(plain.potential(rT, 0, 0, t) - plain.potential(0, 0, z0, t)).toBeCloseTo(-20 + 400 * Math.cos(omegaT(t)), 9);
      // The supplementary AC adds −A cos(ω t + φ)·z/(2 z0): A between the caps (uniform-field approximation).
      const aux = 3 * Math.cos(2 * Math.PI * 90e3 * t + 0.5);
      expect(m.potential(0, 0, -z0, t) - m.potential(0, 0, z0, t)).toBeCloseTo(aux, 9);
    }
  });
  it('has E = −∇φ for each unit solution (ring, caps and the supplementary dipole), each solving Laplace’s equation', () => checkTerms(m, rT));
  it('gives the batch acceleration (q/m)·Σ c_k E_k', () => checkAcceleration(m, 4.4e-7));
  it('measures z from the trap centre and finds ions past ring or caps', () => {
    expect(m.zRef).toBe(z0);
    expect(m.outside(0, 0, 0.99 * z0)).toBe(false);
    expect(m.outside(0, 0, 1.01 * z0)).toBe(true);
    expect(m.outside(1.01 * rT, 0, 0)).toBe(true);
    expect(m.linear).toBe(false);
  });
  it('gives the kind’s Mathieu q_z = 8zeV/(m (r0² + 2z0²) Ω²) (DESIGN.md; March & Todd 2005, ch. 2)', () => {
    const g = kindOf(trap).operatingPoint!(trap);
    const [zAxis] = mathieuParameters({ ...g, mz: 609, charge: 1 });
    const w = 2 * Math.PI * 1.05e6;
    const qz = (8 * ELEMENTARY_CHARGE * 400) / (609 * ATOMIC_MASS_UNIT * d2 * w * w);
    expect(zAxis.axis).toBe('z');
    expect(zAxis.q).toBeCloseTo(qz, 12);
  });
});

function omegaT(t: number): number { return 2 * Math.PI * 1.05e6 * t; }

describe('uniform-field model (acceleration gaps, reflectrons, source regions, drifts)', () => {
  const L = 0.02, Vg = 1500;
  const m = uniformField(0.1, L, Vg, 5e-3);
  it('falls by V over L: Φ(exit) − Φ(entrance) = −V, E_z = V/L inside (uniform field between grids)', () => {
    expect(m.drop).toBe(-Vg);
    expect(m.dcPotential(0, 0, L) - m.dcPotential(0, 0, 0)).toBeCloseTo(-Vg, 9);
    expect(m.dcPotential(0, 0, L / 4)).toBeCloseTo(-Vg / 4, 9);
    const out = new Float64Array(3);
    m.terms[0].unitField(0, 0, L / 2, out);
    expect(m.terms[0].drive(0) * out[2]).toBeCloseTo(Vg / L, 6);
    expect(m.steady).toBe(true);
    expect(m.outside(4.9e-3, 0, 0)).toBe(false);
    expect(m.outside(5e-3, 0, 0)).toBe(true);
  });
  it('is field-free at zero voltage, with no aperture when none is given', () => {
    const drift = uniformField(0, 0.3, 0, Infinity);
    expect(drift.terms.length).toBe(0);
    expect(drift.linear).toBe(true);
    expect(drift.dcPotential(1e-3, 2e-3, 0.1)).toBe(0);
    expect(drift.outside(1, 1, 0)).toBe(false);
  });
});
