// What kind of analyzer a scene describes, which decides the figures and tables of its report.

import type { Scene } from '../scene/types.js';
import { isTimeOfFlight } from '../analysis/tof-summary.js';
import { scanTrap } from '../analysis/trap-scan.js';
import { tofLayout } from '../stages/accelerate/tof-layout.js';
import { isQuadrupole, isTrap } from '../stages/guards.js';
import { hasRf } from '../stages/registry.js';

/** The report's class of analyzer (not a stage kind: a scene of several stages has one). */
export type SceneKind = 'quadrupole' | 'trap' | 'trap-scan' | 'tof-linear' | 'tof-reflectron' | 'other';

export interface SceneTraits {
  kind: SceneKind;
  /** Buffer gas anywhere in the scene. */
  gas: boolean;
  /** Any stage with an RF drive. */
  rf: boolean;
  /** Two-field (Wiley–McLaren) source present. */
  twoFieldSource: boolean;
  spaceCharge: boolean;
  /** The scene records trajectories itself (record_every > 0). */
  recordsTrajectories: boolean;
}

export function sceneTraits(scene: Scene): SceneTraits {
  const st = scene.stages;
  const layout = tofLayout(st);
  let kind: SceneKind = 'other';
  if (scanTrap(scene) !== undefined) kind = 'trap-scan';
  else if (st.some(isTrap)) kind = 'trap';
  else if (st.some(isQuadrupole)) kind = 'quadrupole';
  else if (isTimeOfFlight(scene)) kind = layout.reflectron ? 'tof-reflectron' : 'tof-linear';
  return {
    kind,
    gas: scene.gas !== undefined || st.some((s) => s.gas !== undefined),
    rf: st.some(hasRf),
    twoFieldSource: layout.source !== undefined,
    spaceCharge: scene.spaceCharge !== undefined,
    recordsTrajectories: scene.run.recordEvery > 0,
  };
}
