// Shards of a sweep and their merge. The work units are the plan's points (in run order) × B ion
// blocks per point, B = ⌈N / points⌉ (1 when there are at least as many points as shards, and
// always 1 with --collect, whose figures need the whole point). Shard I runs units
// ⌊I·U/N⌋..⌊(I+1)·U/N⌋−1 and keeps each piece's counts (integers) in shard.json; the merge adds the
// pieces of each point and hands the points to reduceSweep, which gives the whole sweep's bytes.
// summary.json of the merge differs from the unsharded sweep's only in provenance.command_line,
// .workers, .started_at, .wall_s, and provenance.shards (the parts, their slices and wall times).

import { rmSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { folderBeside, swapFolderIntoPlace } from '../core/atomic.js';
import { TOOL_VERSION } from '../version.js';
import { finiteOrNull } from '../core/json.js';
import { SHARD_FILE, SHARD_FORMAT, ShardError, sceneHash, sliceRange, type ShardManifest, type ShardSpec } from '../runs/shard.js';
import { sceneForJson } from '../runs/run-summary.js';
import { planSweep, reduceSweep, runPieces, sweepSummary, SWEEP_FILES, type SweepPiece, type SweepPlan, type SweepPoint, type SweepRequest } from './sweep.js';
import { checkSweepFolder, writeSweepFolder } from './sweep-folder.js';
import { SweepError } from './vary.js';

/** What a sweep part keeps of its request (the merge plans the same sweep from it). */
type StoredRequest = Pick<SweepRequest, 'sceneText' | 'sceneFile' | 'set' | 'seed' | 'vary' | 'scanLines' | 'method' | 'collect' | 'maxOutput'>;

interface StoredPiece { task: number; ions: [number, number]; total: number; detected: number; method: SweepPoint['method']; figures?: (number | null)[] }

/** Ion blocks per point for N shards. */
function blocksPerPoint(plan: SweepPlan, count: number): number {
  return plan.collect.length > 0 ? 1 : Math.max(1, Math.ceil(count / plan.tasks.length));
}

/** The pieces of units from..to−1 (point k's block j holds ions ⌊j·n/B⌋..⌊(j+1)·n/B⌋−1). */
function pieces(plan: SweepPlan, B: number, from: number, to: number): SweepPiece[] {
  const out: SweepPiece[] = [];
  for (let u = from; u < to; u++) {
    const task = Math.floor(u / B), j = u % B;
    const t = plan.tasks[task];
    const n = plan.scenes.scene(plan.axes, t.idx, t.extra).ions.reduce((a, p) => a + p.count, 0);
    out.push({ task, ions: [Math.floor((j * n) / B), Math.floor(((j + 1) * n) / B)] });
  }
  return out;
}

/** Run shard `spec` of the plan into the part folder `out` (shard.json, summary.json, sweep-part.csv). */
/** Units [from, to) of shard `spec`, and the ion blocks per point; refuses an N the sweep cannot take. */
export function sweepSlice(plan: SweepPlan, spec: ShardSpec): { B: number; from: number; to: number } {
  const B = blocksPerPoint(plan, spec.count);
  const what = plan.collect.length > 0
    ? `the sweep has ${plan.tasks.length} points and --collect runs each point whole`
    : `the sweep has ${plan.tasks.length} points`;
  const [from, to] = sliceRange(spec, plan.tasks.length * B, what);
  return { B, from, to };
}

export async function runSweepShard(plan: SweepPlan, spec: ShardSpec, out: string, opts: { force?: boolean; commandLine?: string; tick?: () => void } = {}): Promise<{ complete: boolean; pieces: number }> {
  const { B, from, to } = sweepSlice(plan, spec);
  checkSweepFolder(out, opts.force ?? false);
  const mine = pieces(plan, B, from, to);
  const points = await runPieces(plan, mine, opts.tick);
  const stored: StoredPiece[] = points.map((p, k) => ({ task: mine[k].task, ions: mine[k].ions!, total: p.total, detected: p.detected, method: p.method, ...(p.figures ? { figures: p.figures } : {}) }));
  const complete = stored.length === mine.length;
  const wall = (performance.now() - plan.t0) / 1000;
  const r = plan.req;
  const request: StoredRequest = { sceneText: r.sceneText, sceneFile: r.sceneFile, set: r.set ?? [], seed: r.seed, vary: r.vary, scanLines: r.scanLines, method: r.method, collect: r.collect ?? [], maxOutput: r.maxOutput };
  const manifest: ShardManifest = {
    format: SHARD_FORMAT, kind: 'sweep', tool_version: TOOL_VERSION, scene_sha256: sceneHash(plan.base), seed: plan.base.seed,
    shard: spec, units: { total: plan.tasks.length * B, from, to, unit: 'point × ion-block units' }, blocks_per_point: B,
    complete, wall_s: wall, workers: plan.workers, started_at: plan.startedAt.toISOString(),
    direct_because: plan.directBecause ?? null, request, pieces: stored,
  };
  const summary = {
    complete,
    scene_name: plan.base.name,
    shard: { index: spec.index, count: spec.count, units: [from, to], blocks_per_point: B, points: [mine[0]?.task ?? 0, (mine[mine.length - 1]?.task ?? -1) + 1] },
    pieces: stored.length,
    warnings: complete ? [] : [`interrupted: ${stored.length} of ${mine.length} pieces finished`],
    provenance: { tool_version: TOOL_VERSION, scene: sceneForJson(plan.base), scene_file: r.sceneFile, seed: plan.base.seed, command_line: opts.commandLine ?? '', workers: plan.workers, started_at: plan.startedAt.toISOString(), wall_s: wall },
  };
  const keys = plan.axes.map((a) => a.key);
  const csv = [[...keys, 'ion_from', 'ion_to', 'total', 'detected', 'method'].join(',')];
  for (const p of stored) csv.push([...plan.tasks[p.task].idx.map((i, a) => plan.axes[a].values[i]), p.ions[0], p.ions[1], p.total, p.detected, p.method].join(','));
  const target = resolve(out);
  const temp = folderBeside(target);
  try {
    writeFileSync(join(temp, SHARD_FILE), JSON.stringify(manifest, finiteOrNull, 2) + '\n');
    writeFileSync(join(temp, SWEEP_FILES.summary), JSON.stringify(summary, finiteOrNull, 2) + '\n');
    writeFileSync(join(temp, 'sweep-part.csv'), csv.join('\n') + '\n');
    swapFolderIntoPlace(temp, target, true);
  } catch (e) {
    rmSync(temp, { recursive: true, force: true });
    throw new SweepError(`${out}: could not write the part folder (${(e as Error).message.split('\n')[0]})`);
  }
  return { complete, pieces: stored.length };
}

/** The sweep folder of the whole sweep from its parts (in shard order, checked by orderParts). */
export function mergeSweep(parts: { dir: string; m: ShardManifest }[], opts: { out: string; force?: boolean; commandLine?: string }): Record<string, unknown> {
  const t0 = performance.now();
  const first = parts[0];
  const req = first.m.request as StoredRequest;
  const plan = planSweep({ ...req, workers: Math.max(...parts.map((p) => p.m.workers)) });
  if (sceneHash(plan.base) !== first.m.scene_sha256) throw new ShardError(`${first.dir}: its scene resolves to another hash here than when the part was written`);
  const B = first.m.blocks_per_point as number;
  if (plan.tasks.length * B !== first.m.units.total) throw new ShardError(`${first.dir}: the sweep has ${plan.tasks.length * B} units here, the parts ${first.m.units.total}`);
  const points: (SweepPoint | null)[] = plan.tasks.map(() => null);
  let directBecause: string | null = null;
  for (const { dir, m } of parts) {
    const ps = m.pieces as StoredPiece[];
    if (ps.length !== m.units.to - m.units.from) throw new ShardError(`${dir}: holds ${ps.length} pieces, its slice ${m.units.to - m.units.from}`);
    directBecause ??= (m.direct_because as string | null) ?? null;
    for (const p of ps) {
      const t = plan.tasks[p.task];
      const q = points[p.task] ??= { values: t.idx.map((i, a) => plan.axes[a].values[i]), total: 0, detected: 0, transmission: 0, method: p.method, ...(p.figures ? { figures: p.figures } : {}) };
      q.total += p.total;
      q.detected += p.detected;
    }
  }
  const all = points.map((p, k) => {
    if (p === null) throw new ShardError(`point ${k} of the sweep is in no part`);
    // The same expression as a point run whole (sweep.ts PointRunner.run).
    p.transmission = p.total > 0 ? p.detected / p.total : 0;
    return p;
  });
  plan.directBecause = directBecause;
  const result = reduceSweep(plan, all);
  result.wallSeconds = parts.reduce((a, p) => a + p.m.wall_s, 0);
  result.startedAt = parts.map((p) => p.m.started_at).sort()[0];
  const shards = {
    count: parts.length,
    merge_wall_s: (performance.now() - t0) / 1000,
    parts: parts.map(({ dir, m }) => ({ dir, index: m.shard.index, units: [m.units.from, m.units.to], wall_s: m.wall_s, workers: m.workers, started_at: m.started_at })),
  };
  writeSweepFolder(opts.out, result, { force: opts.force, commandLine: opts.commandLine, provenance: { shards } });
  return sweepSummary(result, { commandLine: opts.commandLine, provenance: { shards } });
}
