// run, sweep and report track ions: a scene with a stage that cannot be tracked yet is refused in one
// line before anything is written (the stage kind says why, sim/stages/kind.ts trackingUnavailable),
// and the electrode fields of solved stages are read from the field cache or solved first
// (sim/engine/solved-fields.ts; refused under --no-solve).

import { trackingRefusal } from '../sim/stages/registry.js';
import type { Stage } from '../sim/stages/types.js';
import type { Scene } from '../sim/scene/types.js';
import { prepareSolvedFields } from '../sim/engine/solved-fields.js';
import { UsageError } from './errors.js';

export function refuseUntracked(file: string, stages: readonly Stage[]): void {
  const why = trackingRefusal(stages);
  if (why !== undefined) throw new UsageError(`${file}: ${why}`);
}

/** Help lines of the flag that keeps a run from solving fields, the text starting at column `col`. */
export function noSolveHelp(col = 21): string {
  const pad = ' '.repeat(col);
  return `  ${'--no-solve'.padEnd(col - 2)}refuse a stage whose electrode field is not in the field cache\n${pad}instead of solving it first ($XDG_CACHE_HOME/iontrail, else ~/.cache/iontrail)\n`;
}

/** Refuse what cannot be tracked, then make every solved field of the scene ready for its kernels. */
export async function prepareTracking(file: string, scene: Scene, opts: { noSolve?: boolean; workers?: number }): Promise<void> {
  refuseUntracked(file, scene.stages);
  await prepareSolvedFields(scene, file, {
    noSolve: opts.noSolve, workers: opts.workers,
    onSolve: (stage, cached) => { if (!cached) process.stderr.write(`solving the electrode field of stage ${stage} (cached for later runs)\n`); },
  });
}
