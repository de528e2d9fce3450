// The merge of a run's shards into the folder one machine would have written. It streams: each
// part's record batches are read in order (sim/runfolder/reader.ts columnBatches: sequential
// reads, one batch in memory) and written on unchanged, their Arrow data never decoded into rows;
// the reducers read the few numeric columns they need as typed-array views and the fates from the
// utf8 bytes (fate-codes.ts). Ions and trajectories go in ion order, the ensemble history from
// each batch's own sums added in batch order, so memory stays at one batch whatever the number of
// parts, and the tables' bytes are the unsharded run's. summary.json differs from the unsharded run's only in stats.wall_s,
// stats.ion_steps_per_s (the parts' wall times added), provenance.command_line, .workers,
// .started_at, and provenance.shards (the parts, their slices and wall times), which it adds.

import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { parseScene } from '../scene/load.js';
import type { Scene } from '../scene/types.js';
import type { Data } from 'apache-arrow';
import { RunFolderWriter, FILES } from '../runfolder/writer.js';
import { columnBatches } from '../runfolder/reader.js';
import { fateCodes } from '../runfolder/fate-codes.js';
import { ION_COLUMNS, TRAJECTORY_COLUMNS } from '../runfolder/columns.js';
import type { RunSummary } from '../runfolder/summary.js';
import type { BatchResult } from '../engine/track.js';
import { planBatches } from '../engine/batches.js';
import { sceneWarnings } from '../engine/checks.js';
import { estimateRun } from './estimate.js';
import { runSummary, runTallies } from './run-summary.js';
import { HISTORY_BATCH_COLUMNS } from './run-scene.js';
import { HISTORY_BATCHES_FILE, ShardError, sceneHash, type SceneSource, type ShardManifest } from './shard.js';

export interface MergeOptions { out: string; force?: boolean; csv?: boolean; commandLine?: string }

/** The scene the parts were run with, rebuilt from the first part's source and checked by hash. */
export function partScene(dir: string, m: ShardManifest): Scene {
  const src = m.source as SceneSource;
  const scene = parseScene(src.text, src.file, { set: src.set, seed: src.seed ?? undefined });
  if (sceneHash(scene) !== m.scene_sha256) {
    throw new ShardError(`${dir}: its scene resolves to another hash here than when the part was written; the parts are not of this tool`);
  }
  return scene;
}

const ION_INDEX = Object.fromEntries(ION_COLUMNS.map((c, k) => [c.name, k])) as Record<string, number>;

/** A numeric column's values as a view (offset applied). */
function view(d: Data): Float64Array | Int32Array {
  return (d.values as Float64Array | Int32Array).subarray(d.offset, d.offset + d.length);
}

/** The ion rows of a record batch as the reducers read a batch result. */
function asBatchResult(cols: readonly Data[], rows: number, path: string): BatchResult {
  const c = (name: string) => view(cols[ION_INDEX[name]]);
  return {
    count: rows, population: c('population'), collisions: c('collisions'), end_ke_ev: c('end_ke_ev'), end_time: c('end_time'),
    fate: fateCodes(cols[ION_INDEX.fate], path), steps: 0, energyError: 0,
  } as unknown as BatchResult;
}

export async function mergeRun(parts: { dir: string; m: ShardManifest }[], opts: MergeOptions): Promise<RunSummary> {
  const t0 = performance.now();
  const scene = partScene(parts[0].dir, parts[0].m);
  const plan = planBatches(scene);
  if (plan.count !== parts[0].m.units.total) throw new ShardError(`${parts[0].dir}: the scene has ${plan.count} batches here, the parts ${parts[0].m.units.total}`);
  const writer = await RunFolderWriter.create(opts.out, { force: opts.force, csv: opts.csv });
  const t = runTallies(scene);
  let done = 0;
  try {
    for (const { dir, m } of parts) {
      const before = writer.ionRows;
      const ionsPath = join(dir, FILES.ions);
      for (const { rows, columns } of columnBatches(ionsPath, ION_COLUMNS)) {
        writer.appendIonData(columns, rows);
        const r = asBatchResult(columns, rows, ionsPath);
        t.tally.add(r);
        t.arrivals?.add(r);
        done += r.count;
      }
      const [from, to] = m.ions as [number, number];
      if (writer.ionRows - before !== to - from) throw new ShardError(`${dir}: ${FILES.ions} holds ${writer.ionRows - before} rows, its slice ${to - from} ions (${from}..${to - 1})`);
      if (existsSync(join(dir, FILES.trajectories))) {
        for (const { rows, columns } of columnBatches(join(dir, FILES.trajectories), TRAJECTORY_COLUMNS)) writer.appendTrajectoryData(columns, rows);
      }
      const sumAt = HISTORY_BATCH_COLUMNS.findIndex((c) => c.name === 'sum');
      for (const { columns } of columnBatches(join(dir, HISTORY_BATCHES_FILE), HISTORY_BATCH_COLUMNS)) t.hist.merge(view(columns[sumAt]) as Float64Array);
      t.stepTally.steps += m.steps as number;
      t.stepTally.energyError = Math.max(t.stepTally.energyError, m.energy_error as number);
    }
  } catch (e) {
    await writer.abort();
    throw e;
  }
  const wall = parts.reduce((a, p) => a + p.m.wall_s, 0);
  const src = parts[0].m.source as SceneSource;
  const { summary, histCols, speciesCols } = runSummary(scene, t, {
    done, total: plan.total, stoppedBy: '', warnings: sceneWarnings(scene),
    workers: Math.max(...parts.map((p) => p.m.workers)), started: new Date(parts.map((p) => p.m.started_at).sort()[0]), wallS: wall,
    estimate: estimateRun(scene, { csv: opts.csv }), batchSize: plan.size, sceneFile: src.file, commandLine: opts.commandLine ?? '',
  });
  summary.provenance.shards = {
    count: parts.length,
    merge_wall_s: (performance.now() - t0) / 1000,
    parts: parts.map(({ dir, m }) => ({ dir, index: m.shard.index, batches: [m.units.from, m.units.to], ions: m.ions, wall_s: m.wall_s, workers: m.workers, started_at: m.started_at })),
  };
  try {
    writer.writeHistory(histCols);
    if (speciesCols) writer.writeSpeciesHistory(speciesCols);
  } catch (e) {
    await writer.abort();
    throw e;
  }
  await writer.finish(summary);
  return summary;
}
