// What leaving a stage means, the one rule of the uncoupled loop (track.ts) and the coupled
// stepper (coupled-flight.ts): the kind's own fate first (a reflectron's back plate, a detector at
// a drift's entrance), then the engine's: past the last stage's exit plane the detector (inside
// its radius: detected, outside: missed), back through the first stage's entrance: returned;
// otherwise the ion enters the neighbouring stage.

import type { FateCode } from '../core/batch.js';
import { Fate } from '../core/batch.js';
import type { StageKind } from '../stages/kind.js';
import type { Stage } from '../stages/types.js';
import { missesDetector } from '../scene/detector.js';

/**
 * The stage the ion enters on leaving stage `s` forward or backward at (x, y), as a number ≥ 0,
 * or its fate as −1 − code when its flight ends there.
 */
export function afterLeaving(stages: readonly Stage[], kinds: readonly StageKind[], s: number, forward: boolean,
  x: number, y: number, detectorRadius: number): number {
  const own = kinds[s].exitFate(stages[s], forward);
  if (own !== undefined) return ended(own);
  if (forward) {
    // The detector plane is the exit plane of the last stage (sim/scene/detector.ts).
    if (s === stages.length - 1) return ended(missesDetector(x, y, detectorRadius) ? Fate.missed : Fate.detected);
    return s + 1;
  }
  // Back out through the entrance of the first stage, towards the source.
  return s === 0 ? ended(Fate.returned) : s - 1;
}

const ended = (f: FateCode): number => -1 - f;

/** The fate encoded by afterLeaving (for a result below 0). */
export const fateOf = (next: number): FateCode => (-1 - next) as FateCode;
