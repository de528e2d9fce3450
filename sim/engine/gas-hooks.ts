// The gas step of each stage: the stage's own gas block, else the scene's, else none. The drag
// model also gives an exact step in a uniform field for drift and acceleration stages.

import type { Scene } from '../scene/types.js';
import { makeGasStep } from '../gas/step.js';
import { makeDragFieldStep } from '../gas/drag.js';
import { makeHardSphereKernel, type HardSphereKernel } from '../gas/hardsphere.js';
import type { GasFieldStep, GasStep } from '../core/cursor.js';
import { kindOf } from '../stages/registry.js';

export interface StageGas {
  step: GasStep | null;
  field: GasFieldStep | null;
  hardSphere: HardSphereKernel | null;
}

export type GasFactory = (stage: number) => StageGas;

export function gasFactory(scene: Scene): GasFactory {
  const steps: StageGas[] = scene.stages.map((st) => {
    const g = st.gas ?? scene.gas;
    if (!g) return { step: null, field: null, hardSphere: null };
    const kind = kindOf(st);
    const uniform = kind.uniformField;
    if (g.model === 'hard-sphere') {
      // One kernel object serves both forms, so an ion's collision state is shared between them.
      const k = makeHardSphereKernel(g, scene.seed);
      return { step: k.step, field: null, hardSphere: kind.gasPieces ? k : null };
    }
    return { step: makeGasStep(g, scene.seed), field: uniform ? makeDragFieldStep(g, scene.seed) : null, hardSphere: null };
  });
  return (stage) => steps[stage];
}
