// What kind of analyzer a scene describes, which decides the figures and tables of its report.

import type { Scene } from '../scene/types.js';
import { isTimeOfFlight } from '../analysis/tof-summary.js';
import { scanTrap } from '../analysis/trap-scan.js';

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
  const reflectron = st.some((s) => s.type === 'accelerate' && s.role === 'reflectron');
  let kind: SceneKind = 'other';
  if (scanTrap(scene) !== undefined) kind = 'trap-scan';
  else if (st.some((s) => s.type === 'trap')) kind = 'trap';
  else if (st.some((s) => s.type === 'quadrupole')) kind = 'quadrupole';
  else if (isTimeOfFlight(scene)) kind = reflectron ? 'tof-reflectron' : 'tof-linear';
  return {
    kind,
    gas: scene.gas !== undefined || st.some((s) => s.gas !== undefined),
    rf: st.some((s) => s.type === 'quadrupole' || s.type === 'trap'),
    twoFieldSource: st.some((s) => s.type === 'accelerate' && s.role === 'source-extraction'),
    spaceCharge: scene.spaceCharge !== undefined,
    recordsTrajectories: scene.run.recordEvery > 0,
  };
}
