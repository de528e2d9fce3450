// The engine's rate on a scene, as the kernel benchmarks measure it: one `runScene` into a
// temporary run folder (batches, workers and the folder's writes included), removed after.

import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseScene } from '../../sim/scene/load.js';
import { runScene } from '../../sim/runs/run-scene.js';

export async function engineRate(sceneText: string, workers: number): Promise<{ rate: number; wall: number; steps: number; detected: number }> {
  const dir = mkdtempSync(join(tmpdir(), 'iontrail-bench-'));
  try {
    const scene = parseScene(sceneText, 'bench.yaml');
    const t0 = performance.now();
    const s = await runScene(scene, { out: join(dir, 'run'), workers });
    const wall = (performance.now() - t0) / 1000;
    return { rate: s.stats.steps / wall, wall, steps: s.stats.steps, detected: s.ions.detected };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
