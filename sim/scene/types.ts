// A scene resolved to SI: what the engine runs. Built from YAML by load.ts; also stored verbatim in
// every run folder's provenance, so the renderer can redraw electrodes and stability points.

export type { RfDrive, StageBase, Stage, StageType, QuadrupoleStage, TrapStage, DriftStage, AccelerateStage } from '../stages/types.js';
export type { GasSettings } from '../gas/settings.js';
import type { Stage } from '../stages/types.js';
import type { GasSettings } from '../gas/settings.js';
import type { Targets } from './targets.js';

export interface Population {
  mz: number;
  charge: number;
  count: number;
  position: { x: number; y: number; z: number; spread: number; spreadZ: number };
  /** Kinetic energy at the start, eV, and its Gaussian sigma, eV. */
  energy: number;
  energySpread: number;
  /** Gaussian sigma of the direction about +z, rad. */
  angleSpread: number;
  direction: 'axial' | 'isotropic';
  /** 'uniform', or a fixed RF phase at the ion's start, rad. */
  rfPhase: 'uniform' | number;
}

export interface RunSettings {
  integrator: 'rk4' | 'dopri5';
  stepsPerCycle: number;
  /** Relative tolerance of the adaptive integrator. */
  tolerance: number;
  maxTime: number;
  recordEvery: number;
  /** Spacing of the ensemble history (mean energy, cloud size), s. */
  historyEvery: number;
  /** Step for stages without RF when they must be stepped (gas), s. */
  stepNoRf: number;
  /** run.step_without_rf was given in the scene (not the default). */
  stepNoRfSet?: true;
  /**
   * Trajectory points inside closed-form stages (drift, acceleration, reflectron) at this time
   * spacing, s, from the exact motion, besides the stage crossings; unset: crossings only. No scene
   * key: the report's trajectory sample sets it so a reflectron turn is drawn. The ion's motion
   * and end state do not depend on it.
   */
  recordSpacing?: number;
}

export interface Scene {
  name: string;
  seed: number;
  stages: Stage[];
  ions: Population[];
  run: RunSettings;
  gas?: GasSettings;
  spaceCharge?: { method: 'direct' | 'tree'; weight: number; softening?: number; theta?: number };
  /** Design targets for the report's verdict (sim/scene/targets.ts); absent when the scene gives none. */
  targets?: Targets;
  /**
   * The detector in the exit plane of the last stage, when the scene file gives one; otherwise
   * sim/scene/detector.ts derives it from the stages (so that a sweep of r0 moves it too).
   */
  detector?: { radius: number };
}
