// Run folder format (issue 3, "Run folder"). The outside references: the Apache Arrow IPC file
// format specification ("Columnar format", section IPC File Format: a file starts with the magic
// "ARROW1" padded to 8 bytes and ends with "ARROW1"), and apache-arrow 21.2.0's own tableFromIPC as
// an independent reader of what our streaming writer produced.

import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, readdirSync, truncateSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { tableFromIPC } from 'apache-arrow';
import {
  ION_COLUMNS, RunFolderError, RunFolderWriter, readHistory, readRunFolder, readTrajectories, trajectoryBatches,
  ionSegments, formatSummary, estimateTrajectoryRows, type RunSummary,
} from '../../sim/runfolder/index.js';
import { tempRoot, writeSyntheticRun } from './synthetic.js';

function fullTrajectories(dir: string) {
  return readTrajectories(dir);
}

describe('run folder round trip', () => {
  it('reads back exactly what was written (ions, trajectories, history, summary)', async () => {
    const root = tempRoot('rf');
    const dir = join(root, 'run');
    const summary = await writeSyntheticRun(dir, { mz: [502, 219, 1000], perPopulation: 5, pointsPerIon: 300, batchPoints: 777, history: true });
    const run = await readRunFolder(dir);
    expect(run.summary).toEqual(summary);
    expect(run.hasTrajectories).toBe(true);
    expect(run.hasHistory).toBe(true);
    expect(Array.from(run.ions.ion)).toEqual(Array.from({ length: 15 }, (_, i) => i));
    expect(run.ions.fate.filter((f) => f === 'hit').length).toBe(summary.ions.hit);
    expect(run.ions.mz[14]).toBe(1000);
    expect(run.ions.end_stage).toBeInstanceOf(Int32Array);
    const tr = await fullTrajectories(dir);
    expect(tr.t.length).toBe(15 * 300);
    // Batches of 777 points: headers (~0.3 kB a batch) are under 1 % of the 47 kB bodies; 5 % margin.
    expect(Math.abs(estimateTrajectoryRows(dir) - tr.t.length) / tr.t.length).toBeLessThan(0.05);
    // Points of each ion contiguous and in ion order.
    const segs = ionSegments(tr.ion);
    expect(segs.map((s) => s.ion)).toEqual(Array.from({ length: 15 }, (_, i) => i));
    expect(segs.every((s) => s.end - s.start === 300)).toBe(true);
    const h = readHistory(dir)!;
    expect(h.t.length).toBe(200);
    expect(h.mean_ke_ev[0]).toBeCloseTo(3, 12);
  });

  it('writes the Arrow IPC file magic at both ends (Arrow columnar format spec, IPC File Format)', async () => {
    const dir = join(tempRoot('rf'), 'run');
    await writeSyntheticRun(dir);
    for (const f of ['ions.arrow', 'trajectories.arrow']) {
      const b = readFileSync(join(dir, f));
      expect(b.subarray(0, 8)).toEqual(Buffer.from('ARROW1\0\0', 'latin1'));
      expect(b.subarray(b.length - 6).toString('latin1')).toBe('ARROW1');
    }
  });

  it('streams many record batches; apache-arrow 21.2.0 tableFromIPC reads the same values', async () => {
    const dir = join(tempRoot('rf'), 'run');
    // 8 ions × 2000 points in batches of 64 points: 250 record batches, some ions spanning batches.
    await writeSyntheticRun(dir, { perPopulation: 4, pointsPerIon: 2000, batchPoints: 64 });
    const table = tableFromIPC(readFileSync(join(dir, 'trajectories.arrow')));
    expect(table.batches.length).toBe(250);
    const ours = await fullTrajectories(dir);
    expect(Array.from(ours.x)).toEqual(Array.from(table.getChild('x')!.toArray() as Float64Array));
    expect(Array.from(ours.ion)).toEqual(Array.from(table.getChild('ion')!.toArray() as Int32Array));
    let n = 0, batches = 0;
    for await (const b of trajectoryBatches(dir)) { n += b.t.length; batches++; }
    expect(n).toBe(16000);
    expect(batches).toBe(250);
    // The size-based estimate (60 body bytes a row) only errs upwards: batch headers and padding
    // add bytes, never remove them (so the plotting memory guard is conservative).
    expect(estimateTrajectoryRows(dir)).toBeGreaterThanOrEqual(n);
  });

  it('selects ions and decimates the same as filtering everything (binary search over batches)', async () => {
    const dir = join(tempRoot('rf'), 'run');
    await writeSyntheticRun(dir, { perPopulation: 6, pointsPerIon: 500, batchPoints: 333 });
    const all = await fullTrajectories(dir);
    const want = [3, 7, 11];
    const sel = await readTrajectories(dir, { ions: [11, 3, 7], everyNth: 7 });
    const expectT: number[] = [];
    for (const s of ionSegments(all.ion)) {
      if (!want.includes(s.ion)) continue;
      for (let r = s.start; r < s.end; r += 7) expectT.push(all.t[r] + s.ion); // ion folded in to check pairing
    }
    const got = Array.from(sel.t, (t, r) => t + sel.ion[r]);
    expect(got).toEqual(expectT);
    expect((await readTrajectories(dir, { ions: [] })).t.length).toBe(0);
    // Without decimation the selected ions are copied in bulk; same points as filtering.
    const bulk = await readTrajectories(dir, { ions: [7, 3] });
    const expectX: number[] = [];
    for (const s of ionSegments(all.ion)) if (s.ion === 3 || s.ion === 7) expectX.push(...all.x.subarray(s.start, s.end));
    expect(Array.from(bulk.x)).toEqual(expectX);
    expect(new Set(bulk.ion)).toEqual(new Set([3, 7]));
  });

  it('writes CSV that parses back to the exact float64 values', async () => {
    const dir = join(tempRoot('rf'), 'run');
    await writeSyntheticRun(dir, { csv: true, history: true, pointsPerIon: 50 });
    for (const f of ['ions.csv', 'trajectories.csv', 'history.csv']) expect(existsSync(join(dir, f))).toBe(true);
    const lines = readFileSync(join(dir, 'ions.csv'), 'utf8').trim().split('\n');
    expect(lines[0]).toBe(ION_COLUMNS.map((c) => c.name).join(','));
    const run = await readRunFolder(dir);
    const xi = ION_COLUMNS.findIndex((c) => c.name === 'x0');
    lines.slice(1).forEach((line, r) => expect(Number(line.split(',')[xi])).toBe(run.ions.x0[r]));
    const tl = readFileSync(join(dir, 'trajectories.csv'), 'utf8').trim().split('\n');
    const tr = await fullTrajectories(dir);
    expect(tl.length - 1).toBe(tr.t.length);
    expect(Number(tl[123].split(',')[2])).toBe(tr.x[122]);
  });

  it('same data ⇒ same bytes (Arrow, CSV and summary.json), as the determinism rule requires', async () => {
    const root = tempRoot('rf');
    await writeSyntheticRun(join(root, 'a'), { csv: true, history: true, batchPoints: 500 });
    await writeSyntheticRun(join(root, 'b'), { csv: true, history: true, batchPoints: 500 });
    for (const f of ['ions.arrow', 'trajectories.arrow', 'history.arrow', 'summary.json', 'ions.csv', 'trajectories.csv']) {
      expect(readFileSync(join(root, 'a', f)).equals(readFileSync(join(root, 'b', f)))).toBe(true);
    }
  });

  it('writes summary.json with the fixed key order, extra keys kept after the known ones', () => {
    const s = { warnings: [], extra_key: 1, complete: false, scene_name: 'x', ions: { alive: 0, hit: 0, detected: 0, total: 0 } } as unknown as RunSummary;
    const text = formatSummary(s);
    expect(Object.keys(JSON.parse(text))).toEqual(['complete', 'scene_name', 'ions', 'warnings', 'extra_key']);
    expect(Object.keys(JSON.parse(text).ions)).toEqual(['total', 'detected', 'hit', 'alive']);
    expect(text.endsWith('}\n')).toBe(true);
  });
});

describe('run folder atomicity', () => {
  it('refuses an existing folder without force, replaces it with force', async () => {
    const root = tempRoot('rf');
    const dir = join(root, 'run');
    await writeSyntheticRun(dir, { mz: [502] });
    await expect(RunFolderWriter.create(dir)).rejects.toThrow(/already exists.*--force/);
    await writeSyntheticRun(dir, { mz: [502, 219, 1000], force: true });
    expect((await readRunFolder(dir)).ions.ion.length).toBe(12);
    expect(readdirSync(root)).toEqual(['run']); // no temp or old folder left behind
  });

  it('abort leaves nothing, and an existing folder untouched', async () => {
    const root = tempRoot('rf');
    const dir = join(root, 'run');
    await writeSyntheticRun(dir, { mz: [502] });
    const before = readFileSync(join(dir, 'summary.json'), 'utf8');
    const w = await RunFolderWriter.create(dir, { force: true });
    w.appendTrajectory({ ion: [0], t: [0], x: [0], y: [0], z: [0], vx: [0], vy: [0], vz: [0] });
    await w.abort();
    expect(readdirSync(root)).toEqual(['run']);
    expect(readFileSync(join(dir, 'summary.json'), 'utf8')).toBe(before);
    const dir2 = join(root, 'other');
    const w2 = await RunFolderWriter.create(dir2);
    await w2.abort();
    expect(readdirSync(root)).toEqual(['run']);
  });

  it('an interrupted run (finish with complete:false and no trajectories) is still a valid folder', async () => {
    const dir = join(tempRoot('rf'), 'run');
    const w = await RunFolderWriter.create(dir);
    const summary = { complete: false, scene_name: 'Skerry QF-4 partial', ions: { total: 0, detected: 0, hit: 0, alive: 0 },
      species: [], stats: { steps: 0, wall_s: 0 }, warnings: ['interrupted'], provenance: {} as RunSummary['provenance'], units: {} };
    await w.finish(summary);
    const run = await readRunFolder(dir);
    expect(run.summary.complete).toBe(false);
    expect(run.ions.ion.length).toBe(0);
    expect(run.hasTrajectories).toBe(false);
  });

  it('rejects rows out of ion order and unknown fates', async () => {
    const w = await RunFolderWriter.create(join(tempRoot('rf'), 'run'));
    w.appendTrajectory({ ion: [2, 2], t: [0, 1], x: [0, 0], y: [0, 0], z: [0, 0], vx: [0, 0], vy: [0, 0], vz: [0, 0] });
    expect(() => w.appendTrajectory({ ion: [1], t: [0], x: [0], y: [0], z: [0], vx: [0], vy: [0], vz: [0] })).toThrow(RunFolderError);
    await w.abort();
  });
});

describe('run folder bad input', () => {
  it('names the path for a folder that is not a run folder', async () => {
    const root = tempRoot('rf');
    await expect(readRunFolder(join(root, 'nope'))).rejects.toThrow(/nope: no such folder/);
    mkdirSync(join(root, 'empty'));
    await expect(readRunFolder(join(root, 'empty'))).rejects.toThrow(/empty: not a run folder \(no summary.json\)/);
  });

  it('detects truncated Arrow files', async () => {
    const dir = join(tempRoot('rf'), 'run');
    await writeSyntheticRun(dir);
    const p = join(dir, 'trajectories.arrow');
    truncateSync(p, Math.floor(statSync(p).size / 2));
    await expect(readTrajectories(dir)).rejects.toThrow(RunFolderError);
    await expect(readTrajectories(dir)).rejects.toThrow(/trajectories.arrow: truncated/);
    const q = join(dir, 'ions.arrow');
    truncateSync(q, statSync(q).size - 3);
    const err = await readRunFolder(dir).catch((e) => e);
    expect(err).toBeInstanceOf(RunFolderError);
    expect(err.name).toBe('RunFolderError');
    expect(err.message).toMatch(/ions.arrow: truncated/);
    expect(err.message.includes('\n')).toBe(false);
  });

  it('reports summary.json that is not JSON', async () => {
    const dir = join(tempRoot('rf'), 'run');
    await writeSyntheticRun(dir);
    writeFileSync(join(dir, 'summary.json'), '{ "complete": tru');
    await expect(readRunFolder(dir)).rejects.toThrow(/summary.json: not valid JSON/);
  });
});

describe('pyarrow round trip', () => {
  let hasPyarrow = false;
  try { execFileSync('python3', ['-c', 'import pyarrow'], { stdio: 'ignore' }); hasPyarrow = true; } catch { /* absent */ }
  if (!hasPyarrow) console.warn('SKIPPED: pyarrow round trip — python3 cannot import pyarrow on this machine');
  it.skipIf(!hasPyarrow)('pyarrow.ipc.open_file reads our files with the same values', async () => {
    const dir = join(tempRoot('rf'), 'run');
    await writeSyntheticRun(dir, { pointsPerIon: 100, batchPoints: 90 });
    const script = [
      'import pyarrow.ipc as ipc, json, sys',
      `t = ipc.open_file(${JSON.stringify(join(dir, 'trajectories.arrow'))}).read_all()`,
      `i = ipc.open_file(${JSON.stringify(join(dir, 'ions.arrow'))}).read_all()`,
      'print(json.dumps({"n": t.num_rows, "x": t.column("x").to_pylist()[:50], "fate": i.column("fate").to_pylist()}))',
    ].join('\n');
    const out = JSON.parse(execFileSync('python3', ['-c', script], { encoding: 'utf8' }));
    const ours = await readTrajectories(dir);
    const run = await readRunFolder(dir);
    expect(out.n).toBe(ours.t.length);
    expect(out.x).toEqual(Array.from(ours.x.subarray(0, 50)));
    expect(out.fate).toEqual(run.ions.fate);
  });
});
