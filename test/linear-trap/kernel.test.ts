// The linear trap's kernel against closed forms, called directly through its registry entry:
// - axial well alone (RF and rod DC off): z̈ = −ω_z² z with ω_z² = 2κqU_end/(m z0²) (the ideal
//   well κU_end(2z² − x² − y²)/(2z0²) differentiated), so z(t) = z0' cos ω_z t;
// - rod DC with the well: ẍ = −(2qU/(m r0²) − κqU_end/(m z0²)) x, which is the radial Mathieu a
//   shifted by −4qκU_end/(m z0² Ω²) (ω_x² = a_x Ω²/4 at q = 0): x(t) = x0 cos ω_x t, and the
//   y rods' coordinate grows as cosh (both defocused: ÿ = +(2qU/(m r0²) + κqU_end/(m z0²)) y).
// RK4's global error ~ (ωh)⁴ ωt/120 (Hairer, Nørsett & Wanner I, §II.3; constant from memory):
// here ωh < 0.02, ωt < 40, so < 1e-8 of the amplitude; 1e-6 is the bound.
import { describe, expect, it } from 'vitest';
import { allocateBatch } from '../../sim/core/batch.js';
import { Exit, type IonCursor, type StepContext } from '../../sim/core/cursor.js';
import { kindOf } from '../../sim/stages/registry.js';
import type { LinearTrapStage } from '../../sim/stages/types.js';
import { linearTrapAShift, linearTrapAx, linearTrapAxialOmega } from '../../sim/mathieu/linear-trap.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';

const mz = 300, m = mz * ATOMIC_MASS_UNIT, q = ELEMENTARY_CHARGE;
const cursor = (x: number, y: number, z: number): IonCursor => ({ ion: 0, slot: 0, m, q, tau: 0, t: 0, x, y, z, vx: 0, vy: 0, vz: 0, steps: 0, sinceRecord: 0, nextHist: 0 });
const context = (maxTime: number): StepContext => ({ batch: allocateBatch(1), maxTime, recordEvery: 0, rec: null, hist: null, gas: null, gasField: null, hardSphere: null });
const track = (st: LinearTrapStage, c: IonCursor, t: number) => kindOf(st).track(st, c, context(t), { integrator: 'rk4', stepsPerCycle: 50, tolerance: 1e-10, stepNoRf: 1e-8 });

// A Skerry LQ-2-like section (fictional): r0 4 mm, rods 40 mm, end electrodes at 8 V, κ = 0.06.
const base: LinearTrapStage = { type: 'linear-trap', r0: 4e-3, z0: 0.02, length: 0.04, rf: { amplitude: 0, frequency: 1e6, phase: 0 }, dc: 0, endDc: 8, kappa: 0.06, zStart: 0.1, zEnd: 0.14 };

describe('linear trap kernel', () => {
  it('axial well: z(t) = z0 cos ω_z t, ω_z² = 2κqU_end/(m z0²)', () => {
    const wz = Math.sqrt((2 * base.kappa * q * base.endDc) / (m * base.z0 * base.z0));
    expect(linearTrapAxialOmega({ z0: base.z0, endDc: base.endDc, kappa: base.kappa, mz })).toBeCloseTo(wz, 6);
    const a = 5e-3, t = 6.3 * (2 * Math.PI / wz);
    const c = cursor(0, 0, 0.12 + a);
    expect(track(base, c, t)).toBe(Exit.time);
    expect(Math.abs(c.z - 0.12 - a * Math.cos(wz * c.t)) / a).toBeLessThan(1e-6);
    expect(c.x).toBe(0);
  });
  it('rod DC with the well: x oscillates at ω_x² = 2qU/(m r0²) − κqU_end/(m z0²) = a_x Ω²/4 (the shifted a), y grows as cosh', () => {
    const st = { ...base, dc: 1.5 };
    const W = 2 * Math.PI * st.rf.frequency;
    const wx2 = (2 * q * st.dc) / (m * st.r0 ** 2) - (q * st.kappa * st.endDc) / (m * st.z0 ** 2);
    const ax = linearTrapAx({ r0: st.r0, z0: st.z0, freq: st.rf.frequency, dc: st.dc, endDc: st.endDc, kappa: st.kappa, mz });
    expect(Math.abs((ax * W * W) / 4 / wx2 - 1)).toBeLessThan(1e-12);
    expect(linearTrapAShift({ r0: st.r0, z0: st.z0, freq: st.rf.frequency, endDc: st.endDc, kappa: st.kappa, mz })).toBeLessThan(0);
    const wx = Math.sqrt(wx2), x0 = 5e-4, t = 4.2 * (2 * Math.PI / wx);
    const cx = cursor(x0, 0, 0.12);
    expect(track(st, cx, t)).toBe(Exit.time);
    expect(Math.abs(cx.x - x0 * Math.cos(wx * cx.t)) / x0).toBeLessThan(1e-6);
    const ky = Math.sqrt((2 * q * st.dc) / (m * st.r0 ** 2) + (q * st.kappa * st.endDc) / (m * st.z0 ** 2));
    const y0 = 1e-6, ty = 3 / ky;
    const cy = cursor(0, y0, 0.12);
    expect(track(st, cy, ty)).toBe(Exit.time);
    expect(Math.abs(cy.y / (y0 * Math.cosh(ky * cy.t)) - 1)).toBeLessThan(1e-6);
  });
  it('an ion reaching r0 at an x rod is detected (slot), at a y rod it is lost', () => {
    const st = { ...base, dc: -3 }; // x defocused: leaves along x
    expect(track(st, cursor(1e-4, 0, 0.12), 1e-3)).toBe(Exit.detected);
    const st2 = { ...base, dc: 3 }; // y defocused
    expect(track(st2, cursor(0, 1e-4, 0.12), 1e-3)).toBe(Exit.hit);
  });
});
