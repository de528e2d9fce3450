// What the 3D renderer needs from a run folder: the resolved stages (to rebuild electrodes), the
// ions' m/z and fate (to colour them) and the recorded points grouped per ion. Positions stay SI
// here; conversion to scene millimetres happens where geometry is built.

import { join } from 'node:path';
import { ionSegments, readRunFolder, readTrajectories, type RunSummary } from '../../sim/runfolder/index.js';
import { RenderError } from './errors.js';

export type StageKind = 'quadrupole' | 'drift' | 'accelerate' | 'trap';

/** One stage placed on the axis, SI (m, V). */
export interface PlacedStage {
  type: StageKind;
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
  fate: string[];
  traj: TrajectorySet;
}

export interface RunViewOptions {
  /** Ion ids to keep (default all). */
  ions?: readonly number[];
  /** Keep every n-th recorded point of each ion (its last point is always kept). */
  everyNth?: number;
}

const finiteOrUndefined = (v: unknown): number | undefined =>
  typeof v === 'number' && Number.isFinite(v) && v > 0 ? v : undefined;

/** Stages as stored in provenance.scene, placed end to end along +z from z = 0 when not given. */
export function placeStages(raw: unknown, where: string): PlacedStage[] {
  if (!Array.isArray(raw)) throw new RenderError(`${where}: provenance.scene.stages is missing`);
  const out: PlacedStage[] = [];
  let z = 0;
  raw.forEach((s: Record<string, unknown>, i) => {
    const type = s.type as StageKind;
    if (!['quadrupole', 'drift', 'accelerate', 'trap'].includes(type)) {
      throw new RenderError(`${where}: provenance.scene.stages[${i}].type '${String(s.type)}' is not quadrupole|drift|accelerate|trap`);
    }
    const z0 = finiteOrUndefined(s.z0);
    let length = typeof s.length === 'number' && s.length > 0 ? s.length : undefined;
    if (length === undefined && type === 'trap' && z0 !== undefined) length = 2 * z0;
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
  const { ion: ionId, mz, fate } = folder.ions;
  const rowOf = new Map<number, number>();
  ionId.forEach((id, row) => rowOf.set(id, row));

  const every = Math.max(1, Math.floor(opts.everyNth ?? 1));
  const cols = await readTrajectories(dir, { ions: opts.ions });
  const segs = ionSegments(cols.ion);
  // Keep every n-th point and always the last one, so a struck ion still ends on the electrode.
  let points = 0;
  for (const s of segs) {
    const len = s.end - s.start;
    points += Math.ceil(len / every) + ((len - 1) % every !== 0 ? 1 : 0);
  }
  const traj: TrajectorySet = {
    ionRow: new Int32Array(segs.length), start: new Int32Array(segs.length + 1),
    t: new Float64Array(points), x: new Float64Array(points), y: new Float64Array(points), z: new Float64Array(points),
  };
  let p = 0;
  segs.forEach((s, k) => {
    const row = rowOf.get(s.ion);
    if (row === undefined) throw new RenderError(`${join(dir, 'trajectories.arrow')}: ion ${s.ion} is not in ions.arrow`);
    traj.ionRow[k] = row;
    traj.start[k] = p;
    for (let q = s.start; q < s.end; q++) {
      if ((q - s.start) % every !== 0 && q !== s.end - 1) continue;
      traj.t[p] = cols.t[q]; traj.x[p] = cols.x[q]; traj.y[p] = cols.y[q]; traj.z[p] = cols.z[q];
      p++;
    }
  });
  traj.start[segs.length] = p;

  return {
    dir,
    sceneName: String(summary.scene_name ?? scene.name ?? 'unnamed scene'),
    sceneFile: typeof prov.scene_file === 'string' ? prov.scene_file : undefined,
    seed: String(prov.seed ?? scene.seed ?? '?'),
    toolVersion: String(prov.tool_version ?? (summary as Record<string, unknown>).tool_version ?? '?'),
    stages, ionId, mz, fate, traj,
  };
}
