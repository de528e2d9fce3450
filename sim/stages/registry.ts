// The stage kinds the tool knows, in the order reports list them. Adding a kind: a folder beside
// these (stage.ts, field.ts, kernel.ts, index.ts with its StageKind), its stage type in types.ts,
// and one line here.

import type { StageEntry, StageKind } from './kind.js';
import type { RfDrive } from './base.js';
import type { Stage, StageType } from './types.js';
import { quadrupoleKind } from './quadrupole/index.js';
import { trapKind } from './trap/index.js';
import { accelerateKind } from './accelerate/index.js';
import { driftKind } from './drift/index.js';
import { electrodesKind } from './electrodes/index.js';
import { multipoleKind } from './multipole/index.js';
import { linearTrapKind } from './linear-trap/index.js';

export const STAGE_KINDS: readonly StageKind[] = [
  quadrupoleKind as unknown as StageKind,
  trapKind as unknown as StageKind,
  multipoleKind as unknown as StageKind,
  linearTrapKind as unknown as StageKind,
  accelerateKind as unknown as StageKind,
  driftKind as unknown as StageKind,
  electrodesKind as unknown as StageKind,
];

const byType = new Map<string, StageKind>(STAGE_KINDS.map((k) => [k.type, k]));

/** The kind of a resolved stage. */
export function kindOf(st: Stage): StageKind {
  const k = byType.get(st.type);
  if (k === undefined) throw new Error(`no stage kind '${String(st.type)}' in the registry`);
  return k;
}

/** The kind named `type` (a resolved stage's `type`, e.g. read back from a run folder), if any. */
export function kindNamed(type: unknown): StageKind | undefined {
  return typeof type === 'string' ? byType.get(type) : undefined;
}

/** The resolved kinds' names, in registry order. */
export const STAGE_TYPES: readonly StageType[] = STAGE_KINDS.map((k) => k.type);

/** Every scene-file `type:` entry with the kind that reads it, in registry order. */
export const STAGE_ENTRIES: ReadonlyMap<string, { kind: StageKind; entry: StageEntry }> = new Map(
  STAGE_KINDS.flatMap((k) => Object.entries(k.entries).map(([name, entry]) => [name, { kind: k, entry }] as const)));

/** The RF drive of a stage, or undefined. */
export function rfOf(st: Stage): RfDrive | undefined {
  return kindOf(st).rf(st);
}

/** Whether the stage has an RF drive. */
export function hasRf(st: Stage): boolean {
  return kindOf(st).rf(st) !== undefined;
}

/** The first stage with an RF drive and its drive, if any (ion start phases run on its clock). */
export function firstRf(stages: readonly Stage[]): { index: number; stage: Stage; rf: RfDrive } | undefined {
  for (let i = 0; i < stages.length; i++) {
    const rf = rfOf(stages[i]);
    if (rf !== undefined) return { index: i, stage: stages[i], rf };
  }
  return undefined;
}

/** Why ions cannot be tracked through the scene's stages yet (the first such stage), or undefined. */
export function trackingRefusal(stages: readonly Stage[]): string | undefined {
  for (let i = 0; i < stages.length; i++) {
    const why = kindOf(stages[i]).trackingUnavailable;
    if (why !== undefined) return `stage ${stages[i].sceneIndex ?? i} (${kindOf(stages[i]).describe(stages[i] as unknown as Record<string, unknown>)}): ${why}`;
  }
  return undefined;
}

/** The electrode field problem of a stage, when its kind solves one (sim/fields). */
export function fieldProblemOf(st: Stage): import('../fields/problem.js').FieldProblem | undefined {
  return kindOf(st).fieldProblem?.(st);
}

/** Give a stage its solved field (a kind with `fieldProblem` takes it through `useSolution`). */
export function useSolution(st: Stage, solution: import('../fields/problem.js').FieldSolution): void {
  kindOf(st).useSolution?.(st, solution);
}
