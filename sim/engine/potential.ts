// Electrostatic potential of the scene at a point (DC parts only), for the energy-conservation
// check: in a scene without RF or gas, ½mv² + qΦ must stay constant along each trajectory.

import type { Scene } from '../scene/types.js';

/** Potential of each stage's entrance relative to z = 0: accelerate stages lower what follows. */
export function stageBasePotentials(scene: Scene): number[] {
  const base: number[] = [];
  let phi = 0;
  for (const s of scene.stages) {
    base.push(phi);
    if (s.type === 'accelerate') phi -= s.voltage;
  }
  return base;
}

/** True when nothing in the scene varies in time or dissipates: no RF amplitude, no gas. */
export function isElectrostatic(scene: Scene): boolean {
  if (scene.gas) return false;
  return scene.stages.every((s) => !s.gas && !((s.type === 'quadrupole' || s.type === 'trap') && (s.rf.amplitude !== 0 || s.rf.ramp || (s.type === 'trap' && s.aux && s.aux.amplitude !== 0))));
}

export function dcPotential(scene: Scene, base: number[], stage: number, x: number, y: number, z: number): number {
  const s = scene.stages[Math.max(0, Math.min(stage, scene.stages.length - 1))];
  const b = base[Math.max(0, Math.min(stage, scene.stages.length - 1))];
  switch (s.type) {
    case 'quadrupole': return b + (s.dc * (x * x - y * y)) / (s.r0 * s.r0);
    case 'trap': {
      const zr = z - 0.5 * (s.zStart + s.zEnd);
      return b + (s.dc * (x * x + y * y - 2 * zr * zr)) / (s.r0 * s.r0 + 2 * s.z0 * s.z0);
    }
    case 'accelerate': return b - (s.voltage * Math.min(Math.max(z - s.zStart, 0), s.length)) / s.length;
    case 'drift': return b;
  }
}
