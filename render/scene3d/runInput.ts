// What the 3D renderer needs from a run folder: the resolved stages (to rebuild electrodes), the
// ions' m/z and fate (to colour them) and the recorded points grouped per ion. Positions stay SI
// here; conversion to scene millimetres happens where geometry is built.

import { join } from 'node:path';
import { estimateTrajectoryRows, readRunFolder, trajectoryBatches, type RunSummary } from '../../sim/runfolder/index.js';
import { RenderError } from './errors.js';
import { kindNamed, STAGE_TYPES } from '../../sim/stages/registry.js';
import type { StageType } from '../../sim/stages/types.js';

/** One stage placed on the axis, SI (m, V). */
export interface PlacedStage {
  type: StageType;
  zStart: number;
  zEnd: number;
  r0?: number;
  z0?: number;
  /** Tube or cap-hole radius, m; undefined when the scene gives none (infinite). */
  aperture?: number;
  voltage?: number;
  /** For 'accelerate': 'gap' (two grids) or 'reflectron' (ring stack, closed end when `closed`). */
  role?: string;
  closed?: boolean;
  /** The stage as stored in provenance.scene (SI), for what its kind says about it (labels). */
  stored?: Readonly<Record<string, unknown>>;
}

export interface TrajectorySet {
  /** Row in the ions table of trajectory k. */
  ionRow: Int32Array;
  /** Points of trajectory k are start[k] .. start[k+1]-1. */
  start: Int32Array;
  t: Float64Array;
  x: Float64Array;
  y: Float64Array;
  z: Float64Array;
  /** Velocities, m/s, when asked for (RunViewOptions.velocities). */
  vx?: Float64Array;
  vy?: Float64Array;
  vz?: Float64Array;
}

export interface RunView {
  dir: string;
  sceneName: string;
  sceneFile?: string;
  seed: string;
  toolVersion: string;
  stages: PlacedStage[];
  ionId: Int32Array;
  mz: Float64Array;
  /** Charge number z per ion (ions table), signed. */
  charge: Int32Array;
  fate: string[];
  traj: TrajectorySet;
  /** Every n-th recorded point was kept (plus each ion's last). */
  every: number;
  /** True when `every` was chosen here to stay under MAX_3D_POINTS, not asked for. */
  autoThinned: boolean;
}

/** Points the 3D outputs read at most before thinning on their own (a PNG of 4e6 points takes seconds). */
export const MAX_3D_POINTS = 4_000_000;

export interface RunViewOptions {
  /** Ion ids to keep (default all). */
  ions?: readonly number[];
  /** Keep every n-th recorded point of each ion (its last point is always kept). */
  everyNth?: number;
  /** Also read the recorded velocities (for colouring by kinetic energy). */
  velocities?: boolean;
}

const finiteOrUndefined = (v: unknown): number | undefined =>
  typeof v === 'number' && Number.isFinite(v) && v > 0 ? v : undefined;

/** Stages as stored in provenance.scene, placed end to end along +z from z = 0 when not given. */
export function placeStages(raw: unknown, where: string): PlacedStage[] {
  if (!Array.isArray(raw)) throw new RenderError(`${where}: provenance.scene.stages is missing`);
  const out: PlacedStage[] = [];
  let z = 0;
  raw.forEach((s: Record<string, unknown>, i) => {
    const kind = kindNamed(s.type);
    if (kind === undefined) {
      throw new RenderError(`${where}: provenance.scene.stages[${i}].type '${String(s.type)}' is not ${STAGE_TYPES.join('|')}`);
    }
    const type = kind.type;
    const z0 = finiteOrUndefined(s.z0);
    // A trap written without its length spans its end caps.
    let length = typeof s.length === 'number' && s.length > 0 ? s.length : undefined;
    if (length === undefined && z0 !== undefined) length = 2 * z0;
    if (length === undefined) throw new RenderError(`${where}: provenance.scene.stages[${i}].length must be a positive length in m`);
    const zStart = typeof s.zStart === 'number' ? s.zStart : z;
    const zEnd = typeof s.zEnd === 'number' ? s.zEnd : zStart + length;
    out.push({
      type, zStart, zEnd,
      r0: finiteOrUndefined(s.r0), z0,
      aperture: finiteOrUndefined(s.aperture),
      voltage: typeof s.voltage === 'number' ? s.voltage : undefined,
      role: typeof s.role === 'string' ? s.role : undefined,
      closed: s.closed === true ? true : undefined,
      stored: s,
    });
    z = zEnd;
  });
  return out;
}

/** Read a run folder through the shared reader (sim/runfolder) and group its points per ion. */
export async function readRunView(dir: string, opts: RunViewOptions = {}): Promise<RunView> {
  const folder = await readRunFolder(dir);
  if (!folder.hasTrajectories) throw new RenderError(`${dir}: the run recorded no trajectories (nothing to draw in 3D)`);
  const summary = folder.summary;
  const prov = (summary.provenance ?? {}) as Partial<RunSummary['provenance']>;
  const scene = (prov.scene ?? {}) as { stages?: unknown; name?: string; seed?: number };
  const stages = placeStages(scene.stages, join(dir, 'summary.json'));
  const { ion: ionId, mz, fate, charge } = folder.ions;
  const rowOf = new Map<number, number>();
  ionId.forEach((id, row) => rowOf.set(id, row));

  // Thin automatically only when no --every was given and the selection would exceed the cap.
  const nIons = Math.max(1, ionId.length);
  const share = opts.ions ? Math.min(1, new Set(opts.ions).size / nIons) : 1;
  const estimate = estimateTrajectoryRows(dir) * share;
  const every = opts.everyNth !== undefined ? Math.max(1, Math.floor(opts.everyNth))
    : estimate > MAX_3D_POINTS ? Math.ceil(estimate / MAX_3D_POINTS) : 1;
  const traj = await readThinned(dir, opts.ions ? new Set(opts.ions) : null, every, rowOf, opts.velocities === true);
  return {
    dir,
    sceneName: String(summary.scene_name ?? scene.name ?? 'unnamed scene'),
    sceneFile: typeof prov.scene_file === 'string' ? prov.scene_file : undefined,
    seed: String(prov.seed ?? scene.seed ?? '?'),
    toolVersion: String(prov.tool_version ?? (summary as Record<string, unknown>).tool_version ?? '?'),
    stages, ionId, mz, charge: Int32Array.from(charge as ArrayLike<number>), fate, traj,
    every, autoThinned: opts.everyNth === undefined && every > 1,
  };
}

/** Growable Float64 column (amortised doubling), so a streamed read never holds the whole file. */
class Column {
  a = new Float64Array(1 << 14);
  n = 0;
  push(v: number): void {
    if (this.n === this.a.length) { const b = new Float64Array(2 * this.a.length); b.set(this.a); this.a = b; }
    this.a[this.n++] = v;
  }
  done(): Float64Array { return this.a.slice(0, this.n); }
}

/**
 * Stream trajectories.arrow batch by batch, keeping the chosen ions, every n-th point of each and
 * always its last point (so a struck ion still ends on the electrode).
 */
async function readThinned(dir: string, keep: Set<number> | null, every: number, rowOf: Map<number, number>, withV: boolean): Promise<TrajectorySet> {
  const t = new Column(), x = new Column(), y = new Column(), z = new Column();
  const vx = new Column(), vy = new Column(), vz = new Column();
  const rows: number[] = [], starts: number[] = [];
  let cur = -1, k = 0, wanted = false;
  // The newest point of the current ion that was skipped; written if it turns out to be its last.
  let pend = false, pt = 0, px = 0, py = 0, pz = 0, pvx = 0, pvy = 0, pvz = 0;
  const closeIon = () => {
    if (!pend) return;
    t.push(pt); x.push(px); y.push(py); z.push(pz);
    if (withV) { vx.push(pvx); vy.push(pvy); vz.push(pvz); }
    pend = false;
  };
  for await (const b of trajectoryBatches(dir)) {
    const n = b.ion.length;
    for (let r = 0; r < n; r++) {
      const id = b.ion[r];
      if (id !== cur) {
        if (wanted) closeIon();
        cur = id; k = 0;
        wanted = keep === null || keep.has(id);
        if (wanted) {
          const row = rowOf.get(id);
          if (row === undefined) throw new RenderError(`${join(dir, 'trajectories.arrow')}: ion ${id} is not in ions.arrow`);
          rows.push(row);
          starts.push(t.n);
        }
      }
      if (!wanted) continue;
      if (k++ % every === 0) {
        t.push(b.t[r]); x.push(b.x[r]); y.push(b.y[r]); z.push(b.z[r]);
        if (withV) { vx.push(b.vx[r]); vy.push(b.vy[r]); vz.push(b.vz[r]); }
        pend = false;
      } else {
        pend = true; pt = b.t[r]; px = b.x[r]; py = b.y[r]; pz = b.z[r];
        if (withV) { pvx = b.vx[r]; pvy = b.vy[r]; pvz = b.vz[r]; }
      }
    }
  }
  if (wanted) closeIon();
  starts.push(t.n);
  const out: TrajectorySet = { ionRow: Int32Array.from(rows), start: Int32Array.from(starts), t: t.done(), x: x.done(), y: y.done(), z: z.done() };
  if (withV) { out.vx = vx.done(); out.vy = vy.done(); out.vz = vz.done(); }
  return out;
}
