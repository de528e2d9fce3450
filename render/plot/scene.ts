// The resolved scene as the engine stores it in summary.json provenance.scene: SI numbers, keys as
// in the scene file (issue 3). Only what the figures need is read here, defensively: a missing
// value gives undefined, never a throw.

import type { RunSummary } from '../../sim/runfolder/index.js';
import type { Analyzer } from '../../sim/mathieu/parameters.js';
import { kindNamed } from '../../sim/stages/registry.js';

export interface RfStage {
  index: number;
  /** Mathieu geometry of the stage (its kind's, sim/stages). */
  analyzer: Analyzer;
  r0: number;
  z0?: number;
  amplitude: number;
  frequency: number;
  dc: number;
  /** Linear RF ramp, when the stage has one: end amplitude, V, and its duration, s. */
  ramp?: { to: number; over: number };
}

const num = (v: unknown): number | undefined => (typeof v === 'number' && Number.isFinite(v) ? v : undefined);

export function sceneStages(summary: RunSummary): Record<string, unknown>[] {
  const scene = (summary.provenance as { scene?: unknown } | undefined)?.scene;
  const stages = (scene as { stages?: unknown } | undefined)?.stages;
  return Array.isArray(stages) ? (stages as Record<string, unknown>[]) : [];
}

/** Stages with an RF drive (quadrupole filters and traps), in scene order. */
export function rfStages(summary: RunSummary): RfStage[] {
  const out: RfStage[] = [];
  sceneStages(summary).forEach((s, index) => {
    const analyzer = kindNamed(s.type)?.analyzer;
    if (analyzer === undefined) return;
    const rf = (s.rf ?? {}) as Record<string, unknown>;
    const r0 = num(s.r0), amplitude = num(rf.amplitude), frequency = num(rf.frequency);
    if (r0 === undefined || amplitude === undefined || frequency === undefined) return;
    const ramp = (rf.ramp ?? {}) as Record<string, unknown>;
    const to = num(ramp.to), over = num(ramp.over);
    out.push({ index, analyzer, r0, z0: num(s.z0), amplitude, frequency, dc: num(s.dc) ?? 0, ...(to !== undefined && over !== undefined ? { ramp: { to, over } } : {}) });
  });
  return out;
}

/** RF frequency of the first RF stage, Hz, if any. */
export function firstRfFrequency(summary: RunSummary): number | undefined {
  return rfStages(summary)[0]?.frequency;
}

/** Type and z extent (zStart, zEnd, m) of scene stage `index`, if the resolved scene has them. */
export function stageExtent(summary: RunSummary, index: number): { type: string; zStart: number; zEnd: number } | undefined {
  const s = sceneStages(summary)[index];
  if (!s) return undefined;
  const zStart = num(s.zStart), zEnd = num(s.zEnd);
  if (zStart === undefined || zEnd === undefined) return undefined;
  return { type: String(s.type), zStart, zEnd };
}
