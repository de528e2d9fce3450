// Shards: the I-th of N deterministic slices of a run or a sweep, and the manifest (shard.json)
// that lets `iontrail merge` check that parts belong together. A slice is a contiguous range of
// work units — engine batches for a run (sim/engine/batches.ts), point × ion ranges for a sweep —
// so every ion's random numbers (keyed by seed and ion index) and every per-batch sum are those of
// the unsharded run, and the merge can rebuild its bytes by adding the pieces in unit order.

import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Scene } from '../scene/types.js';

export class ShardError extends Error {
  override name = 'ShardError';
  readonly exitCode = 2;
}

export interface ShardSpec { index: number; count: number }

/** The manifest of a part folder. */
export const SHARD_FILE = 'shard.json';
/** A run part's ensemble-history sums, one record batch per engine batch (merged in batch order). */
export const HISTORY_BATCHES_FILE = 'history_batches.arrow';
export const SHARD_FORMAT = 'iontrail shard part 1';

/** "I/N" with 0 ≤ I < N (0-based, as Slurm array task ids and Kubernetes completion indexes run). */
export function parseShard(text: string): ShardSpec {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  if (!m) throw new ShardError(`--shard expects I/N with 0 ≤ I < N (for example --shard 0/4), got '${text}'`);
  const index = Number(m[1]), count = Number(m[2]);
  if (count < 1) throw new ShardError(`--shard ${text}: N must be at least 1`);
  if (index >= count) throw new ShardError(`--shard ${text}: the index runs from 0 to ${count - 1} (0-based)`);
  return { index, count };
}

/**
 * Units [from, to) of shard I of N over `units` work units: floor(I·U/N) to floor((I+1)·U/N), so
 * the slices are disjoint, cover every unit and differ in size by one at most.
 */
export function sliceRange(shard: ShardSpec, units: number, what: string): [number, number] {
  if (shard.count > units) {
    throw new ShardError(`--shard ${shard.index}/${shard.count}: ${what}; give at most ${units} shards`);
  }
  return [Math.floor((shard.index * units) / shard.count), Math.floor(((shard.index + 1) * units) / shard.count)];
}

/** JSON of a resolved scene with Infinity and NaN kept apart from null (the hash must see them). */
function sceneJson(scene: Scene): string {
  return JSON.stringify(scene, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? `#${String(v)}` : v));
}

/** SHA-256 of the resolved scene: parts of one job carry the same. */
export function sceneHash(scene: Scene): string {
  return createHash('sha256').update(sceneJson(scene)).digest('hex');
}

/** What a part needs to rebuild its scene: the scene file's text and the command's overrides. */
export interface SceneSource { text: string; file: string; set: string[]; seed: number | null }

export interface ShardManifest {
  format: string;
  kind: 'run' | 'sweep';
  tool_version: string;
  scene_sha256: string;
  seed: number;
  shard: ShardSpec;
  /** Work units of the whole job and the part's slice [from, to). */
  units: { total: number; from: number; to: number; unit: string };
  complete: boolean;
  wall_s: number;
  workers: number;
  started_at: string;
  [extra: string]: unknown;
}

/** The manifest of a part folder, or a one-line refusal naming the folder. */
export function readManifest(dir: string): ShardManifest {
  const path = join(dir, SHARD_FILE);
  if (!existsSync(dir)) throw new ShardError(`${dir}: no such folder`);
  if (!existsSync(path)) throw new ShardError(`${dir}: not a shard part (no ${SHARD_FILE}; write parts with --shard I/N)`);
  let m: ShardManifest;
  try {
    m = JSON.parse(readFileSync(path, 'utf8')) as ShardManifest;
  } catch (e) {
    throw new ShardError(`${path}: not valid JSON (${(e as Error).message.split('\n')[0]})`);
  }
  if (m?.format !== SHARD_FORMAT) throw new ShardError(`${path}: format '${String(m?.format)}', expected '${SHARD_FORMAT}'`);
  return m;
}

/**
 * Parts in shard order, after checking that they belong together: one kind, tool version (and
 * this tool's), scene hash, seed and shard count, each index once, none missing, every part
 * complete, and slices that tile the units. Refusals name the parts and the indexes.
 */
export function orderParts(dirs: string[], toolVersion: string): { dir: string; m: ShardManifest }[] {
  if (dirs.length === 0) throw new ShardError('give the part folders to merge (PART_DIR...)');
  const parts = dirs.map((dir) => ({ dir, m: readManifest(dir) }));
  const first = parts[0];
  for (const p of parts) {
    const same = (what: string, a: unknown, b: unknown) => {
      if (a !== b) throw new ShardError(`${p.dir}: ${what} ${String(b)} differs from ${first.dir} (${String(a)}); the parts are not of one job`);
    };
    same('kind', first.m.kind, p.m.kind);
    same('tool version', first.m.tool_version, p.m.tool_version);
    same('scene hash', first.m.scene_sha256, p.m.scene_sha256);
    same('seed', first.m.seed, p.m.seed);
    same('shard count', first.m.shard.count, p.m.shard.count);
    same('work units', first.m.units.total, p.m.units.total);
    if (!p.m.complete) throw new ShardError(`${p.dir}: shard ${p.m.shard.index}/${p.m.shard.count} is incomplete (interrupted); run it again`);
  }
  if (first.m.tool_version !== toolVersion) {
    throw new ShardError(`${first.dir}: written by iontrail ${first.m.tool_version}, this is ${toolVersion}; merge with the version that wrote the parts`);
  }
  const n = first.m.shard.count;
  const byIndex = new Map<number, string>();
  for (const p of parts) {
    const i = p.m.shard.index;
    if (!(i >= 0 && i < n)) throw new ShardError(`${p.dir}: shard index ${i} is outside 0..${n - 1}`);
    const seen = byIndex.get(i);
    if (seen !== undefined) throw new ShardError(`shard ${i}/${n} given twice (${seen} and ${p.dir})`);
    byIndex.set(i, p.dir);
  }
  const missing = [...Array(n).keys()].filter((i) => !byIndex.has(i));
  if (missing.length > 0) {
    throw new ShardError(`shard${missing.length > 1 ? 's' : ''} ${missing.map((i) => `${i}/${n}`).join(', ')} missing (have ${[...byIndex.keys()].sort((a, b) => a - b).join(', ')} of 0..${n - 1})`);
  }
  parts.sort((a, b) => a.m.shard.index - b.m.shard.index);
  let next = 0;
  for (const p of parts) {
    if (p.m.units.from !== next) throw new ShardError(`${p.dir}: its ${p.m.units.unit} start at ${p.m.units.from}, expected ${next} (the slices do not tile the job)`);
    next = p.m.units.to;
  }
  if (next !== first.m.units.total) throw new ShardError(`the parts cover ${first.m.units.unit} 0..${next - 1} of ${first.m.units.total}`);
  return parts;
}
