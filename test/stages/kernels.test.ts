// Each stage kind's kernel, called directly through its registry entry (no YAML, no engine), on a
// field with a closed-form solution:
//  - uniform field: z(t) = z0 + v t + a t²/2, exit speed from energy conservation ½mv² = ½mv0² + qV;
//  - a DC-only quadrupole and trap: ẍ = −ω² x with ω² = 2qU/(m r0²) (filter) or 2qU/(m (r0² + 2z0²))
//    (trap), so x(t) = x0 cos ωt (harmonic oscillator; equations of motion as in DESIGN.md).
// Fixed-step RK4's global error is about (ωh)⁴·ωt/120 (Hairer, Nørsett & Wanner I, §II.3 for the
// order; the constant from memory): ωh ≈ 8e-3, ωt ≈ 60 gives ~2e-9, so 1e-7 of x0 is a safe bound.
// Dormand–Prince at rtol 1e-10 is held to 1e-7 as well.
import { describe, it, expect } from 'vitest';
import { allocateBatch } from '../../sim/core/batch.js';
import { Exit, type IonCursor, type StepContext } from '../../sim/core/cursor.js';
import { kindOf } from '../../sim/stages/registry.js';
import type { AccelerateStage, QuadrupoleStage, TrapStage, Stage } from '../../sim/stages/types.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE, ELECTRONVOLT } from '../../sim/units/constants.js';

const m = 200 * ATOMIC_MASS_UNIT, q = ELEMENTARY_CHARGE;

function cursor(x: number, y: number, z: number, vx: number, vy: number, vz: number): IonCursor {
  return { ion: 0, slot: 0, m, q, tau: 0, t: 0, x, y, z, vx, vy, vz, steps: 0, sinceRecord: 0, nextHist: 0 };
}
function context(maxTime: number): StepContext {
  return { batch: allocateBatch(1), maxTime, recordEvery: 0, rec: null, hist: null, gas: null, gasField: null, hardSphere: null };
}
const run = (integrator: 'rk4' | 'dopri5') => ({ integrator, stepsPerCycle: 40, tolerance: 1e-10, stepNoRf: 1e-8 });
const track = (st: Stage, c: IonCursor, ctx: StepContext, integrator: 'rk4' | 'dopri5' = 'rk4') => kindOf(st).track(st, c, ctx, run(integrator));

describe('uniform-field kernel (accelerate kind)', () => {
  it('crosses a 1 kV gap in the closed-form time with the closed-form speed', () => {
    const L = 0.01, V = 1000;
    const st: AccelerateStage = { type: 'accelerate', role: 'gap', voltage: V, aperture: Infinity, length: L, zStart: 0.02, zEnd: 0.02 + L };
    const v0 = Math.sqrt((2 * 5 * ELECTRONVOLT) / m), a = (q * V) / (m * L);
    const c = cursor(1e-4, 0, 0.02, 10, 0, v0);
    expect(track(st, c, context(1))).toBe(Exit.forward);
    const t = (-v0 + Math.sqrt(v0 * v0 + 2 * a * L)) / a;
    expect(c.t / t - 1).toBeLessThan(1e-12);
    expect(Math.abs(c.vz / Math.sqrt(v0 * v0 + (2 * q * V) / m) - 1)).toBeLessThan(1e-12);
    expect(c.x).toBeCloseTo(1e-4 + 10 * t, 15);
    expect(c.z).toBe(st.zEnd);
  });
  it('turns an ion round in a reflectron and the kind calls the closed back plate a loss', () => {
    const st: AccelerateStage = { type: 'accelerate', role: 'reflectron', closed: true, voltage: -2000, aperture: Infinity, length: 0.1, zStart: 0, zEnd: 0.1 };
    const v0 = Math.sqrt((2 * 1000 * ELECTRONVOLT) / m);
    const c = cursor(0, 0, 0, 0, 0, v0);
    expect(track(st, c, context(1))).toBe(Exit.backward);
    // Deceleration a = qV/(mL): back at the entrance after 2 v0/|a|.
    expect(c.t / ((2 * v0 * m * 0.1) / (q * 2000)) - 1).toBeLessThan(1e-12);
    expect(kindOf(st).exitFate(st, true)).toBe(2);
    expect(kindOf(st).exitFate(st, false)).toBeUndefined();
  });
});

describe('quadrupole kernel, DC only', () => {
  const r0 = 4e-3, U = 2, L = 0.05;
  const st: QuadrupoleStage = { type: 'quadrupole', r0, rf: { amplitude: 0, frequency: 1e6, phase: 0 }, dc: U, length: L, zStart: 0, zEnd: L };
  const w = Math.sqrt((2 * q * U) / (m * r0 * r0));
  for (const integrator of ['rk4', 'dopri5'] as const) {
    it(`x(t) = x0 cos ωt to the exit, ω² = 2qU/(m r0²) (${integrator})`, () => {
      const vz = 5e3, x0 = 1e-3;
      const c = cursor(x0, 0, 0, 0, 0, vz);
      expect(track(st, c, context(1), integrator)).toBe(Exit.forward);
      const t = L / vz;
      expect(c.t).toBeCloseTo(t, 15);
      expect(Math.abs(c.x - x0 * Math.cos(w * t)) / x0).toBeLessThan(1e-7);
      expect(Math.abs(c.vx + x0 * w * Math.sin(w * t)) / (x0 * w)).toBeLessThan(1e-7);
      expect(c.z).toBe(L);
    });
  }
});

describe('trap kernel, DC only', () => {
  const r0 = 7.07e-3, z0 = 5e-3, U = 1;
  const st: TrapStage = { type: 'trap', r0, z0, rf: { amplitude: 0, frequency: 1e6, phase: 0 }, dc: U, aperture: 1e-3, length: 2 * z0, zStart: 0, zEnd: 2 * z0 };
  const w = Math.sqrt((2 * q * U) / (m * (r0 * r0 + 2 * z0 * z0)));
  for (const integrator of ['rk4', 'dopri5'] as const) {
    it(`radial x(t) = x0 cos ωt until max_time, ω² = 2qU/(m (r0² + 2z0²)) (${integrator})`, () => {
      const x0 = 1e-3, T = 60 / w;
      const c = cursor(x0, 0, z0, 0, 0, 0);
      expect(track(st, c, context(T), integrator)).toBe(Exit.time);
      expect(c.t).toBeCloseTo(T, 12);
      expect(Math.abs(c.x - x0 * Math.cos(w * T)) / x0).toBeLessThan(1e-7);
      expect(c.z).toBeCloseTo(z0, 15);
    });
  }
  it('lets an ion out through the end-cap hole and onto the stage boundary', () => {
    const c = cursor(0, 0, z0, 0, 0, 2e3);
    const code = track({ ...st, dc: 0 }, c, context(1));
    expect(code).toBe(Exit.forward);
    expect(c.z).toBeCloseTo(2 * z0, 15);
    expect(c.t).toBeCloseTo(z0 / 2e3, 15);
  });
});
