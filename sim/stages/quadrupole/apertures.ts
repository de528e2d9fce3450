// Entrance and exit apertures of a filter stage: thin plates in the planes z = zStart and z = zEnd
// with a round hole centred on the axis (default radius r0, the rods' inscribed circle). An ion
// crossing either plane at or outside the hole strikes the plate: the same "x² + y² ≥ R²" rule as
// the rods' test, so an ion exactly on the rim is lost.

import { Exit, type ExitCode, type IonCursor } from '../../core/cursor.js';
import type { QuadrupoleStage } from './stage.js';

/** Hole radius of the entrance plate, m. */
export const entranceRadius = (st: QuadrupoleStage): number => st.entranceAperture ?? st.r0;
/** Hole radius of the exit plate, m. */
export const exitRadius = (st: QuadrupoleStage): number => st.exitAperture ?? st.r0;

/** Whether (x, y) lies outside a hole of radius R (on the rim counts as outside). */
export const outsideHole = (x: number, y: number, R: number): boolean => x * x + y * y >= R * R;

/**
 * Whether the ion, now on a boundary plane moving into the stage, strikes that plane's plate:
 * at zStart moving +z (entrance plate) or at zEnd moving −z (exit plate, an ion coming back).
 * An ion that starts inside the stage crosses no plate on the way in. `scale` multiplies the
 * radii (the fast path's loss-radius diagnostics; 1 everywhere else).
 */
export function blockedOnEntry(st: QuadrupoleStage, c: IonCursor, scale = 1): boolean {
  if (c.z === st.zStart && c.vz > 0) return outsideHole(c.x, c.y, scale * entranceRadius(st));
  if (c.z === st.zEnd && c.vz < 0) return outsideHole(c.x, c.y, scale * exitRadius(st));
  return false;
}

/** The kernel's exit code with the plate of the plane the ion leaves through applied. */
export function throughExitPlate(st: QuadrupoleStage, c: IonCursor, code: ExitCode, scale = 1): ExitCode {
  if (code === Exit.forward) return outsideHole(c.x, c.y, scale * exitRadius(st)) ? Exit.hit : code;
  if (code === Exit.backward) return outsideHole(c.x, c.y, scale * entranceRadius(st)) ? Exit.hit : code;
  return code;
}
