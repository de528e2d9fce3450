// The gas step of each stage: the stage's own gas block, else the scene's, else none. The drag
// model also gives an exact step in a uniform field for drift and acceleration stages.

import type { Scene } from '../scene/types.js';
import { makeGasStep } from '../gas/step.js';
import { makeDragFieldStep } from '../gas/drag.js';
import type { GasFieldStep, GasStep } from './context.js';

export interface StageGas {
  step: GasStep | null;
  field: GasFieldStep | null;
}

export type GasFactory = (stage: number) => StageGas;

export function gasFactory(scene: Scene): GasFactory {
  const steps: StageGas[] = scene.stages.map((st) => {
    const g = st.gas ?? scene.gas;
    if (!g) return { step: null, field: null };
    const uniform = st.type === 'drift' || st.type === 'accelerate';
    return { step: makeGasStep(g, scene.seed), field: uniform && g.model === 'drag' ? makeDragFieldStep(g, scene.seed) : null };
  });
  return (stage) => steps[stage];
}
