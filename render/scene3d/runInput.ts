// What the 3D renderer needs from a run folder: the resolved stages (to rebuild electrodes), the
// ions' m/z and fate (to colour them) and the recorded points grouped per ion. Positions stay SI
// here; conversion to scene millimetres happens where geometry is built.

import { existsSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { tableFromIPC, type Table } from 'apache-arrow';
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

function need(dir: string, name: string): string {
  const p = join(dir, name);
  if (!existsSync(p)) throw new RenderError(`not a run folder: ${dir} (no ${name})`);
  return p;
}

function readTable(path: string) {
  try {
    return tableFromIPC(readFileSync(path)) as Table;
  } catch (err) {
    throw new RenderError(`cannot read ${path}: not a complete Arrow IPC file (${String((err as Error).message).split('\n')[0]})`);
  }
}

function column(table: Table, path: string, name: string): ArrayLike<unknown> {
  const col = table.getChild(name);
  if (!col) throw new RenderError(`${path}: missing column '${name}'`);
  return col.toArray() as ArrayLike<unknown>;
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
    });
    z = zEnd;
  });
  return out;
}

export function readRunView(dir: string, opts: RunViewOptions = {}): RunView {
  if (!existsSync(dir) || !statSync(dir).isDirectory()) throw new RenderError(`not a run folder: ${dir} (no such folder)`);
  const summaryPath = need(dir, 'summary.json');
  const ionsPath = need(dir, 'ions.arrow');
  const trajPath = need(dir, 'trajectories.arrow');
  let summary: Record<string, any>;
  try {
    summary = JSON.parse(readFileSync(summaryPath, 'utf8'));
  } catch (err) {
    throw new RenderError(`${summaryPath}: not valid JSON (${(err as Error).message.split('\n')[0]})`);
  }
  const prov = summary.provenance ?? {};
  const scene = prov.scene ?? {};
  const stages = placeStages(scene.stages, summaryPath);

  const ions = readTable(ionsPath);
  const ionId = Int32Array.from(column(ions, ionsPath, 'ion') as ArrayLike<number>);
  const mz = Float64Array.from(column(ions, ionsPath, 'mz') as ArrayLike<number>);
  const fateCol = column(ions, ionsPath, 'fate');
  const fate = Array.from({ length: ionId.length }, (_, i) => String(fateCol[i]));
  const rowOf = new Map<number, number>();
  ionId.forEach((id, row) => rowOf.set(id, row));

  const tr = readTable(trajPath);
  const tIon = column(tr, trajPath, 'ion') as ArrayLike<number>;
  const cols = ['t', 'x', 'y', 'z'].map((n) => column(tr, trajPath, n) as ArrayLike<number>);
  const keep = opts.ions ? new Set(opts.ions) : undefined;
  const every = Math.max(1, Math.floor(opts.everyNth ?? 1));

  // Two passes: count kept points per run of equal ion ids, then copy (no growing arrays for 1e6 rows).
  const n = tIon.length;
  let runs = 0, points = 0;
  for (let i = 0; i < n; ) {
    let j = i;
    while (j < n && tIon[j] === tIon[i]) j++;
    if (!keep || keep.has(tIon[i])) {
      if (!rowOf.has(tIon[i])) throw new RenderError(`${trajPath}: ion ${tIon[i]} is not in ions.arrow`);
      runs++;
      points += Math.ceil((j - i) / every) + (((j - i - 1) % every) !== 0 ? 1 : 0);
    }
    i = j;
  }
  const traj: TrajectorySet = {
    ionRow: new Int32Array(runs), start: new Int32Array(runs + 1),
    t: new Float64Array(points), x: new Float64Array(points), y: new Float64Array(points), z: new Float64Array(points),
  };
  let k = 0, p = 0;
  const dst = [traj.t, traj.x, traj.y, traj.z];
  for (let i = 0; i < n; ) {
    let j = i;
    while (j < n && tIon[j] === tIon[i]) j++;
    if (!keep || keep.has(tIon[i])) {
      traj.ionRow[k] = rowOf.get(tIon[i])!;
      traj.start[k] = p;
      for (let q = i; q < j; q++) {
        if ((q - i) % every !== 0 && q !== j - 1) continue;
        for (let c = 0; c < 4; c++) dst[c][p] = cols[c][q];
        p++;
      }
      k++;
    }
    i = j;
  }
  traj.start[runs] = p;

  return {
    dir,
    sceneName: String(summary.scene_name ?? scene.name ?? 'unnamed scene'),
    sceneFile: typeof prov.scene_file === 'string' ? prov.scene_file : undefined,
    seed: String(prov.seed ?? scene.seed ?? '?'),
    toolVersion: String(summary.tool_version ?? prov.tool_version ?? '?'),
    stages, ionId, mz, fate, traj,
  };
}
