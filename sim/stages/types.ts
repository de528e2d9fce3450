// The resolved stage of any kind. A new kind adds its stage type here and its kind to registry.ts.

import type { QuadrupoleStage } from './quadrupole/stage.js';
import type { TrapStage } from './trap/stage.js';
import type { DriftStage } from './drift/stage.js';
import type { AccelerateStage } from './accelerate/stage.js';
import type { ElectrodesStage } from './electrodes/stage.js';
import type { MultipoleStage } from './multipole/stage.js';
import type { LinearTrapStage } from './linear-trap/stage.js';

export type { QuadrupoleStage, TrapStage, DriftStage, AccelerateStage, ElectrodesStage, MultipoleStage, LinearTrapStage };
export type { RfDrive, StageBase } from './base.js';

export type Stage = QuadrupoleStage | DriftStage | AccelerateStage | TrapStage | ElectrodesStage | MultipoleStage | LinearTrapStage;
/** The resolved kinds' names (Stage.type). */
export type StageType = Stage['type'];
