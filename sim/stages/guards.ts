// Typed questions about one stage for the workflows that belong to one kind (a filter's m/z sweep
// and scan lines, a trap's mass scan and space-charge cloud), so that they need not compare names.

import type { Stage } from './types.js';
import type { QuadrupoleStage } from './quadrupole/stage.js';
import type { TrapStage } from './trap/stage.js';
import type { MultipoleStage } from './multipole/stage.js';
import { STAGE_ENTRIES } from './registry.js';
import { quadrupoleKind } from './quadrupole/index.js';
import { trapKind } from './trap/index.js';
import { multipoleKind } from './multipole/index.js';

export const isQuadrupole = (s: Stage | undefined): s is QuadrupoleStage => s?.type === quadrupoleKind.type;
export const isTrap = (s: Stage | undefined): s is TrapStage => s?.type === trapKind.type;
export const isMultipole = (s: Stage | undefined): s is MultipoleStage => s?.type === multipoleKind.type;

/** Whether a scene-file `type:` value makes a quadrupole filter stage. */
export const entryMakesQuadrupole = (type: unknown): boolean =>
  typeof type === 'string' && (STAGE_ENTRIES.get(type)?.kind as unknown) === quadrupoleKind;

/** A field-free drift with no aperture and no gas: flight through it cannot change a fate. */
export const isOpenDrift = (s: Stage): boolean => s.type === 'drift' && !Number.isFinite(s.aperture) && !s.gas;
