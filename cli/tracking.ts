// run, sweep and report track ions: a scene with a stage that cannot be tracked yet is refused in one
// line before anything is written (the stage kind says why, sim/stages/kind.ts trackingUnavailable).

import { trackingRefusal } from '../sim/stages/registry.js';
import type { Stage } from '../sim/stages/types.js';
import { UsageError } from './errors.js';

export function refuseUntracked(file: string, stages: readonly Stage[]): void {
  const why = trackingRefusal(stages);
  if (why !== undefined) throw new UsageError(`${file}: ${why}`);
}
