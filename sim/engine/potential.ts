// Electrostatic potential of the scene at a point (DC parts only), for the energy-conservation
// check: in a scene without RF or gas, ½mv² + qΦ must stay constant along each trajectory. Each
// stage's field model (sim/stages/<kind>/field.ts) gives its potential; this file chains them.

import type { Scene } from '../scene/types.js';
import type { FieldModel } from '../core/field-model.js';
import { kindOf } from '../stages/registry.js';

/** Each stage's field model, in stage order. */
export function stageFields(scene: Scene): FieldModel[] {
  return scene.stages.map((s) => kindOf(s).field(s));
}

/** Potential of each stage's entrance relative to z = 0: each stage's drop lowers what follows. */
export function stageBasePotentials(scene: Scene, fields = stageFields(scene)): number[] {
  const base: number[] = [];
  let phi = 0;
  for (const f of fields) {
    base.push(phi);
    phi += f.drop;
  }
  return base;
}

/** True when nothing in the scene varies in time or dissipates: no RF amplitude, no gas. */
export function isElectrostatic(scene: Scene, fields = stageFields(scene)): boolean {
  if (scene.gas) return false;
  return scene.stages.every((s, i) => !s.gas && fields[i].steady);
}

export function dcPotential(fields: readonly FieldModel[], base: number[], stage: number, x: number, y: number, z: number): number {
  const k = Math.max(0, Math.min(stage, fields.length - 1));
  const f = fields[k];
  return base[k] + f.dcPotential(x, y, z - f.zRef);
}
