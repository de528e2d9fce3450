// Shared pieces of the solved-field checks: a scene's solved stages made ready in this thread
// (field cache in a temporary folder, so no test writes to the user's cache), and one ion
// through a stage's kernel, called directly (no run folder).

import { allocateBatch } from '../../sim/core/batch.js';
import type { IonCursor, StepContext } from '../../sim/core/cursor.js';
import { parseScene } from '../../sim/scene/load.js';
import type { Scene } from '../../sim/scene/types.js';
import { prepareSolvedFields } from '../../sim/engine/solved-fields.js';
import { kindOf } from '../../sim/stages/registry.js';
import type { Stage } from '../../sim/stages/types.js';
import { tempDir } from '../helpers/temp.js';

/**
 * The static two-tube lens of lens.test.ts and space-charge.test.ts as a YAML stage list entry:
 * 0 V and −100 V tubes of 3 mm bore, 2 mm apart at z = 30 mm, on an axial grid of 0.1 mm.
 */
export const TWO_TUBE_LENS_STAGE = `  - type: electrodes
    length: 120 mm
    grid: { symmetry: axial, spacing: 0.1 mm, radius: 5 mm }
    electrodes:
      - name: tube 1
        potential: { dc: 0 V }
        shapes: [ { tube: { inner_radius: 3 mm, outer_radius: 4 mm, from: 0 mm, to: 29 mm } } ]
      - name: tube 2
        potential: { dc: -100 V }
        shapes: [ { tube: { inner_radius: 3 mm, outer_radius: 4 mm, from: 31 mm, to: 120 mm } } ]
`;

/**
 * A one-stage scene of a solved trap: a hyperbolic ring (r0 = 7.07 mm) about z = `center` on an
 * axial grid with a mirror plane at mid-length, driven by the stage RF, and the end caps given as
 * YAML shape entries (`caps`, a flow list's items), for one ion of m/z `mz`.
 */
export function solvedTrapScene(o: { name: string; length: string; radius: string; center: string; truncate: string; rf: string; caps: string; mz: number }): string {
  return `name: ${o.name}
stages:
  - type: electrodes
    length: ${o.length}
    grid: { symmetry: axial, spacing: 0.1 mm, radius: ${o.radius}, mirror: [z] }
    rf: ${o.rf}
    electrodes:
      - name: ring
        potential: { rf: 1 }
        shapes: [ { hyperboloid: { sheet: ring, vertex: 7.07 mm, center: ${o.center}, truncate: ${o.truncate} } } ]
      - name: end caps
        shapes: [ ${o.caps} ]
ions:
  - { mz: ${o.mz}, count: 1 }
`;
}

/** Point the field cache at a fresh temporary folder (removed after the test file). */
export function privateFieldCache(): string {
  const d = tempDir('iontrail-fieldcache-');
  process.env.XDG_CACHE_HOME = d;
  return d;
}

export async function solvedScene(yaml: string, file = 'check.yaml'): Promise<Scene> {
  const scene = parseScene(yaml, file);
  await prepareSolvedFields(scene, file, { workers: 1 });
  return scene;
}

export function cursor(m: number, q: number, x: number, y: number, z: number, vx: number, vy: number, vz: number, tau = 0): IonCursor {
  return { ion: 0, slot: 0, m, q, tau, t: 0, x, y, z, vx, vy, vz, steps: 0, sinceRecord: 0, nextHist: 0 };
}

export function context(maxTime: number): StepContext {
  return { batch: allocateBatch(1), maxTime, recordEvery: 0, rec: null, hist: null, gas: null, gasField: null, hardSphere: null };
}

/** One ion through a stage's own kernel with fixed RK4 steps. */
export function trackIon(st: Stage, c: IonCursor, ctx: StepContext, stepsPerCycle: number, stepNoRf: number): number {
  return kindOf(st).track(st, c, ctx, { integrator: 'rk4', stepsPerCycle, tolerance: 1e-10, stepNoRf });
}
