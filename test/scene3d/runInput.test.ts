// Reading a run folder for 3D: thinning and ion selection agree with the shared reader's own
// selection (sim/runfolder readTrajectories), and each ion's last point is always kept.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ionSegments, readTrajectories } from '../../sim/runfolder/index.js';
import { placeStages, readRunView } from '../../render/scene3d/runInput.js';
import { makeRunFolder } from './fixtures.js';

let tmp: string;
let dir: string;
beforeAll(async () => {
  tmp = mkdtempSync(join(tmpdir(), 'iontrail-runinput-'));
  // 101 points per ion over three record batches: ions straddle batch boundaries.
  dir = await makeRunFolder(join(tmp, 'run'), { kind: 'filter', ions: 7, points: 101 });
});
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

describe('readRunView', () => {
  it('every n-th point equals the shared reader’s everyNth selection, plus each ion’s last point', async () => {
    const every = 7;
    const view = await readRunView(dir, { everyNth: every, ions: [1, 4, 5] });
    const ref = await readTrajectories(dir, { everyNth: every, ions: [1, 4, 5] });
    const full = await readTrajectories(dir, { ions: [1, 4, 5] });
    const refSegs = ionSegments(ref.ion), fullSegs = ionSegments(full.ion);
    expect(view.traj.start.length - 1).toBe(3);
    refSegs.forEach((seg, k) => {
      const a = view.traj.start[k], b = view.traj.start[k + 1];
      const n = seg.end - seg.start;
      // 101 points, every 7th: indices 0, 7, …, 98 (15 points), then the last one (100).
      expect(b - a).toBe(n + 1);
      for (let i = 0; i < n; i++) {
        expect(view.traj.x[a + i]).toBe(ref.x[seg.start + i]);
        expect(view.traj.t[a + i]).toBe(ref.t[seg.start + i]);
      }
      expect(view.traj.z[b - 1]).toBe(full.z[fullSegs[k].end - 1]);
      expect(view.ionId[view.traj.ionRow[k]]).toBe(seg.ion);
    });
    expect(view.every).toBe(every);
    expect(view.autoThinned).toBe(false);
  });

  it('without thinning reads every recorded point of every ion', async () => {
    const view = await readRunView(dir);
    const full = await readTrajectories(dir);
    expect(view.traj.t.length).toBe(full.t.length);
    expect(view.every).toBe(1);
  });

  it('places stages end to end from z = 0 when positions are not stored, and names a bad type', () => {
    const st = placeStages([{ type: 'quadrupole', length: 0.1, r0: 4e-3 }, { type: 'drift', length: 0.05, aperture: null }], 'summary.json');
    expect(st[1].zStart).toBeCloseTo(0.1, 12);
    expect(st[1].zEnd).toBeCloseTo(0.15, 12);
    expect(st[1].aperture).toBeUndefined();
    expect(() => placeStages([{ type: 'lens', length: 1 }], 'summary.json')).toThrow(/stages\[0\]\.type 'lens'/);
  });
});
