// The trackers' working memory (LinearScratch in sim/fastpath/linear-path.ts) is owned by whoever
// runs a sweep and lives from point to point: row buffers, stamps, the growing-axis hint and the
// spare tables a later point rebuilds in place. A fate must be a function of the scene and the ion
// only, so the same points tracked in any order through one scratch give, ion by ion, the fates
// of trackers that each start from an empty one. The points straddle the Skerry QF-4 window
// (≈ 499.2–504.6): below it x is the growing axis, above it y, so the hint flips; two step counts
// per cycle make the row buffers both grow and be reused larger than needed.

import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseScene } from '../../sim/scene/load.js';
import { LinearScratch, LinearTracker, StartStates } from '../../sim/fastpath/linear-path.js';
import type { Scene } from '../../sim/scene/types.js';
import { repoRoot } from '../bench/cbuild.js';

const PEAK_SCAN = readFileSync(join(repoRoot(), 'scenes/qf4-peak-scan.yaml'), 'utf8');
const N = 150;

function points(): Scene[] {
  const out: Scene[] = [];
  for (const steps of [24, 40]) {
    for (const mz of [490, 499.25, 502, 504.45, 512]) {
      out.push(parseScene(PEAK_SCAN, 'qf4-peak-scan.yaml', { set: [`ions.0.mz=${mz}`, `ions.0.count=${N}`, `run.steps_per_cycle=${steps}`] }));
    }
  }
  return out;
}

/** Fates by the batch pass (reused draws) and by the per-ion tiers (no draws), in one array. */
function fates(scene: Scene, scratch?: LinearScratch): Int8Array {
  const out = new Int8Array(2 * N);
  const batch = new LinearTracker(scene, { scratch });
  batch.track(0, N, out.subarray(0, N), undefined, new StartStates(scene));
  batch.release();
  const perIon = new LinearTracker(scene, { scratch });
  perIon.track(0, N, out.subarray(N));
  perIon.release();
  return out;
}

describe('linear trackers sharing one scratch', () => {
  it('give every ion the fate that a fresh scratch gives, whatever the order of the points', () => {
    const scenes = points();
    const fresh = scenes.map((s) => fates(s));
    const order = [...scenes.keys()];
    for (const seq of [order, [...order].reverse()]) {
      const shared = new LinearScratch();
      let hintFlips = 0, last = shared.growingHint;
      for (const i of seq) {
        expect({ point: i, fates: Array.from(fates(scenes[i], shared)) }).toEqual({ point: i, fates: Array.from(fresh[i]) });
        if (shared.growingHint !== last) { hintFlips++; last = shared.growingHint; }
      }
      // The sharing was exercised: the hint changed and released tables were kept for reuse.
      expect(hintFlips).toBeGreaterThan(0);
      expect(shared.spareTables.length).toBeGreaterThan(0);
    }
  });
});
