// `iontrail field SCENE --vary KEY=a,b,c [--shard I/N] -o DIR`: one field folder per geometry
// variant, DIR/variant-K, beside DIR/variants.json (sim/sweeps/field-variants.ts). Shards write
// into the same DIR, each its own variants, so a job array needs no merge: the folders are those
// one machine writes. The field command gives the solve and the folder writer (it owns them);
// this module plans, checks every variant before any solve, and writes.

import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { UsageError } from './errors.js';
import { loadSceneFile } from '../sim/scene/load.js';
import type { Scene } from '../sim/scene/types.js';
import { parseShard } from '../sim/runs/shard.js';
import { parseVariantAxis, planVariants, variantsJson, variantsOf } from '../sim/sweeps/field-variants.js';
import { writeFileAtomic } from '../sim/core/atomic.js';

export interface VariantRequest {
  file: string;
  out: string;
  vary: string[];
  shard?: string;
  force: boolean;
}

/**
 * `prepare` checks one variant's scene (the stages to solve) and throws a one-line error;
 * `write` solves it and writes its field folder whole, its cache beside DIR.
 */
export async function writeVariants<T>(req: VariantRequest, prepare: (scene: Scene, text: string) => T,
  write: (dir: string, prepared: T, scene: Scene, text: string, cacheParent: string) => Promise<unknown>): Promise<number> {
  const { text } = loadSceneFile(req.file);
  const plan = planVariants(req.vary.map((v) => parseVariantAxis(v, text, req.file)));
  const mine = variantsOf(plan, req.shard === undefined ? undefined : parseShard(req.shard));
  const target = resolve(req.out);
  const parent = dirname(target);
  if (!existsSync(parent) || !statSync(parent).isDirectory()) throw new UsageError(`-o ${req.out}: parent folder ${parent} does not exist`);
  if (existsSync(target) && !statSync(target).isDirectory()) throw new UsageError(`-o ${req.out}: exists and is not a folder`);
  const index = variantsJson(plan, req.file);
  const indexPath = join(target, 'variants.json');
  // A DIR of another plan is not mixed into: its variant-K would mean other values.
  if (existsSync(indexPath) && readFileSync(indexPath, 'utf8') !== index && !req.force) {
    throw new UsageError(`-o ${req.out}: holds the variants of another --vary plan (its variants.json differs; give --force to replace them)`);
  }
  // Every variant's scene loads and has its stages before anything is solved or written.
  const checked = mine.map((v) => {
    if (existsSync(join(target, v.folder)) && !req.force) throw new UsageError(`-o ${req.out}: ${v.folder} already exists (give --force to replace it)`);
    const { scene, text: t } = loadSceneFile(req.file, { set: v.set });
    return { v, scene, text: t, prepared: prepare(scene, t) };
  });
  mkdirSync(target, { recursive: true });
  writeFileAtomic(indexPath, index);
  // Replacing another plan (--force): its variant folders that this plan does not have go, so DIR
  // holds this plan's variants only (no task of this job writes those names).
  const planned = new Set(plan.variants.map((v) => v.folder));
  for (const name of readdirSync(target)) {
    if (/^variant-\d+$/.test(name) && !planned.has(name)) rmSync(join(target, name), { recursive: true, force: true });
  }
  for (const c of checked) await write(join(target, c.v.folder), c.prepared, c.scene, c.text, parent);
  process.stderr.write(`field: ${checked.length} of ${plan.variants.length} variants in ${req.out} (${checked.map((c) => c.v.folder).join(', ')})\n`);
  return 0;
}
