// The gas step of each stage: the stage's own gas block, else the scene's, else none.

import type { Scene } from '../scene/types.js';
import { makeGasStep } from '../gas/step.js';
import type { GasFactory } from './track.js';
import type { GasStep } from './context.js';

export function gasFactory(scene: Scene): GasFactory {
  const steps: (GasStep | null)[] = scene.stages.map((st) => {
    const g = st.gas ?? scene.gas;
    return g ? makeGasStep(g, scene.seed) : null;
  });
  return (stage) => steps[stage];
}
