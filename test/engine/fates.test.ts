// Fate rules of the engine (sim/engine/track.ts) and the quadrupole's entrance and exit plates
// (sim/stages/quadrupole/apertures.ts) against straight-line geometry: with U = V = 0 the filter
// is field free, so an ion moves as x(t) = x0 + vx·t, z(t) = z0 + vz·t, and where it meets each plane
// and at what time is closed form (common practice, no source). A uniform retarding field gives
// the turning ion's return time 2·v0/a, a = qE/m (Newton's second law, constant force).

import { describe, expect, it } from 'vitest';
import { parseScene } from '../../sim/scene/load.js';
import { trackBatch } from '../../sim/engine/track.js';
import { gasFactory } from '../../sim/engine/gas-hooks.js';
import { allocateBatch, Fate, FATE_NAMES } from '../../sim/core/batch.js';
import { Exit, type IonCursor, type StepContext } from '../../sim/core/cursor.js';
import { kindOf } from '../../sim/stages/registry.js';
import type { QuadrupoleStage } from '../../sim/scene/types.js';
import { ELEMENTARY_CHARGE, ELECTRONVOLT, ionMassKg } from '../../sim/units/constants.js';

const MASS = ionMassKg(100, 1);
const V0 = Math.sqrt((2 * 10 * ELECTRONVOLT) / MASS); // 10 eV, m/z 100
// Straight lines under RK4 (the field is zero) and the closed-form drift: exact but for rounding.
const REL = 1e-12;

/** A field-free filter (100 mm, r0 4 mm) with the given plate keys, a 50 mm drift, a detector. */
function freeFilter(plates: string, detector: string, x0: string, drift = true): string {
  return `
seed: 1
stages:
  - { type: quadrupole, length: 100 mm, r0: 4 mm, rf: { amplitude: 0 V, frequency: 1 MHz }, dc: 0 V${plates} }
${drift ? '  - { type: drift, length: 50 mm }\n' : ''}${detector}
ions:
  - { mz: 100, count: 1, position: { x: ${x0} }, energy: 10 eV, direction: axial }
run: { steps_per_cycle: 40, max_time: 1 ms, record_every: 0 }
`;
}

/** One axial 10 eV ion of m/z 100 from z = 0 through the given stage lines. */
const axial = (stages: string) => `stages:\n${stages}\nions:\n  - { mz: 100, count: 1, energy: 10 eV, direction: axial }\nrun: { max_time: 1 ms, record_every: 0 }\n`;

function one(text: string) {
  const scene = parseScene(text, 'fates.yaml');
  const r = trackBatch(scene, 0, 0, 1, gasFactory(scene));
  return { fate: FATE_NAMES[r.fate[0]], t: r.end_time[0], x: r.end_x[0], z: r.end_z[0], phase: r.entry_rf_phase[0], scene };
}

describe('fates: detected, hit, missed, returned', () => {
  it('entrance plate: an axial ion at x = 1.6 mm strikes a 1.5 mm hole at z = 0; at 1.4 mm it passes', () => {
    const blocked = one(freeFilter(', entrance_aperture: 1.5 mm', '', '1.6 mm'));
    expect(blocked.fate).toBe('hit');
    expect(blocked.z).toBe(0);
    expect(blocked.t).toBe(0);
    const passes = one(freeFilter(', entrance_aperture: 1.5 mm', '', '1.4 mm'));
    // Default detector: the r0 of the filter (4 mm); x stays 1.4 mm, so it is detected at 150 mm.
    expect(passes.fate).toBe('detected');
    expect(passes.z).toBeCloseTo(0.15, 15);
    expect(Math.abs(passes.t - 0.15 / V0) / (0.15 / V0)).toBeLessThan(REL);
  });

  it('exit plate: x = 2 mm passes a 3 mm entrance and strikes a 1.5 mm exit hole at z = 100 mm, t = L/v', () => {
    const r = one(freeFilter(', entrance_aperture: 3 mm, exit_aperture: 1.5 mm', '', '2 mm'));
    expect(r.fate).toBe('hit');
    expect(r.z).toBe(0.1);
    expect(Math.abs(r.t - 0.1 / V0) / (0.1 / V0)).toBeLessThan(REL);
    expect(r.x).toBeCloseTo(0.002, 15);
  });

  it('detector: x = 1 mm misses a 0.8 mm detector at 150 mm and is detected by a 1.2 mm one', () => {
    const missed = one(freeFilter('', 'detector: { radius: 0.8 mm }', '1 mm'));
    expect(missed.fate).toBe('missed');
    expect(missed.z).toBeCloseTo(0.15, 15);
    expect(missed.x).toBeCloseTo(0.001, 15);
    expect(one(freeFilter('', 'detector: { radius: 1.2 mm }', '1 mm')).fate).toBe('detected');
    // The rods as the last stage: the detector sits in their exit plane (z = 100 mm).
    const last = one(freeFilter('', 'detector: { radius: 0.8 mm }', '1 mm', false));
    expect(last.fate).toBe('missed');
    expect(last.z).toBe(0.1);
  });

  it('exit plate and detector on a slanted line: x_exit = x0 + vx·L/vz, through the kind', () => {
    // The kind's track() directly, on a cursor in the entrance plane moving at 1° to the axis.
    const scene = parseScene(freeFilter(', exit_aperture: 2 mm', '', '0 mm'), 'fates.yaml');
    const st = scene.stages[0] as QuadrupoleStage;
    const kind = kindOf(st);
    const ctx: StepContext = { batch: allocateBatch(1), maxTime: 1e-3, recordEvery: 0, rec: null, hist: null, gas: null, gasField: null };
    const settings = { integrator: 'rk4' as const, stepsPerCycle: 40, tolerance: 1e-8, stepNoRf: 1e-7 };
    const vz = V0 * Math.cos(0.0175), vx = V0 * Math.sin(0.0175);
    for (const [x0, want] of [[0.0002, Exit.forward], [0.00028, Exit.hit]] as const) {
      // x_exit = x0 + vx·0.1/vz = x0 + 1.750 mm: 1.95 mm (passes 2 mm), 2.03 mm (strikes the plate).
      const c: IonCursor = { ion: 0, slot: 0, m: MASS, q: ELEMENTARY_CHARGE, tau: 0, t: 0, x: x0, y: 0, z: 0, vx, vy: 0, vz, steps: 0, sinceRecord: 0, nextHist: 0 };
      expect(kind.track(st, c, ctx, settings)).toBe(want);
      expect(c.z).toBe(0.1);
      const xExit = x0 + (vx * 0.1) / vz;
      expect(Math.abs(c.x - xExit) / xExit).toBeLessThan(REL);
    }
    // Coming back through the exit plane (vz < 0) outside the exit hole: the plate stops it.
    const back: IonCursor = { ion: 0, slot: 0, m: MASS, q: ELEMENTARY_CHARGE, tau: 0, t: 0, x: 0.0021, y: 0, z: 0.1, vx: 0, vy: 0, vz: -V0, steps: 0, sinceRecord: 0, nextHist: 0 };
    expect(kind.track(st, back, ctx, settings)).toBe(Exit.hit);
    expect(back.t).toBe(0);
  });

  it('returned: turned back by a 20 V retarding gap, the ion leaves the first entrance at t = 2·v0/a', () => {
    const r = one(axial('  - { type: accelerate, length: 10 mm, voltage: -20 V }\n  - { type: drift, length: 50 mm }'));
    expect(r.fate).toBe('returned');
    expect(r.z).toBe(0);
    const a = (ELEMENTARY_CHARGE * 20) / (0.01 * MASS);
    expect(Math.abs(r.t - (2 * V0) / a) / ((2 * V0) / a)).toBeLessThan(1e-12);
    // No RF stage: no entry phase.
    expect(r.phase).toBeNaN();
  });

  it('a reflectron instrument: the ion back through the drift with detect_returning stays detected', () => {
    const r = one(axial('  - { type: drift, length: 50 mm, detect_returning: true }\n  - { type: reflectron, length: 20 mm, voltage: 20 V }'));
    expect(r.fate).toBe('detected');
    expect(r.z).toBe(0);
    const a = (ELEMENTARY_CHARGE * 20) / (0.02 * MASS);
    const t = 2 * (0.05 / V0) + (2 * V0) / a;
    expect(Math.abs(r.t - t) / t).toBeLessThan(1e-12);
  });

  it('entry_rf_phase: Ω·t_entry + rf_phase + φ mod 2π after a 10 mm drift (t_entry = L/v)', () => {
    const text = `
stages:
  - { type: drift, length: 10 mm }
  - { type: quadrupole, length: 100 mm, r0: 4 mm, rf: { amplitude: 0 V, frequency: 1 MHz, phase: 30 deg }, dc: 0 V }
ions:
  - { mz: 100, count: 1, energy: 10 eV, direction: axial, rf_phase: 10 deg }
run: { max_time: 1 ms, record_every: 0 }
`;
    const r = one(text);
    const raw = 2 * Math.PI * 1e6 * (0.01 / V0) + (40 * Math.PI) / 180;
    const want = raw - 2 * Math.PI * Math.floor(raw / (2 * Math.PI));
    // Ω·t ≈ 4.5e2 rad: rounding of t (1e-16 relative) gives ~1e-13 rad.
    expect(Math.abs(r.phase - want)).toBeLessThan(1e-9);
    expect(r.phase).toBeGreaterThanOrEqual(0);
    expect(r.phase).toBeLessThan(2 * Math.PI);
    expect(Fate.missed).toBe(FATE_NAMES.indexOf('missed'));
    expect(Fate.returned).toBe(FATE_NAMES.indexOf('returned'));
  });
});
