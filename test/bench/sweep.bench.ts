// Sweep speed: the transfer-matrix path against direct RK4 integration (40 steps per cycle) on the
// same ions, on the Skerry QF-4 peak-scan scene (scenes/qf4-peak-scan.yaml: 150 mm rods, 5 eV,
// ~130 RF cycles in the rods, U/V = 0.1665, window ≈ 499.2–504.6), 2,000 ions per point, one
// thread each, both timed in this one run. Two 201-point m/z sweeps:
//   A. 480..520 (the example range): most points lie outside the window, where ions are
//      lost within ~10 RF cycles and direct integration is cheap too;
//   B. 497..507 across the peak: about half the points inside the window, where ions travel the
//      whole rod and the direct cost grows with the number of cycles (the matrix path's does not);
//   C. as B with 346 mm rods (~300 RF cycles, resolution ~ n²): the same scan on a longer filter,
//      to show how the ratio scales with the time in the field.
// Direct integration of 201 points takes minutes on a shared machine, so it runs on every 10th
// point (21 points with the same m/z spread) and is scaled by 201/21; the output says so. Both
// paths are warmed up on every sweep first; each timing is the fastest of three repeats (the
// machine is shared; the minimum is the least disturbed). Agreement of the two methods on the shared points is printed in binomial σ.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { runSweep, type SweepResult } from '../../sim/sweeps/sweep.js';
import { repoRoot } from './cbuild.js';

async function fastest(n: number, f: () => Promise<SweepResult>): Promise<SweepResult> {
  let best: SweepResult | null = null;
  for (let i = 0; i < n; i++) {
    const r = await f();
    if (best === null || r.wallSeconds < best.wallSeconds) best = r;
  }
  return best!;
}

export async function bench(): Promise<void> {
  const file = join(repoRoot(), 'scenes/qf4-peak-scan.yaml');
  const sceneText = readFileSync(file, 'utf8');
  const base = { sceneText, sceneFile: file, set: ['ions.0.count=2000'], workers: 1 };
  console.log('caution: simulated ideal fields; verify operating points on the bench. RF/DC supplies are lethal: local electrical-safety codes and qualified staff first.');
  const long = ['stages.0.length=346 mm', 'run.max_time=1 ms'];
  const sweeps = [['A (480..520)', 480, 520, []], ['B (497..507)', 497, 507, []], ['C (497..507, 346 mm rods)', 497, 507, long]] as const;
  // Warm-up (JIT) of both paths on every sweep, so that each is timed in its steady state.
  for (const [, lo, hi, extra] of sweeps) {
    const set = [...base.set, ...extra];
    await runSweep({ ...base, set, vary: [`mz=${lo}..${hi}:201`], method: 'matrix' });
    await runSweep({ ...base, set: [...set, 'ions.0.count=256'], vary: [`mz=${lo}..${hi}:11`], method: 'direct' });
  }
  for (const [label, lo, hi, extra] of sweeps) {
    const set = [...base.set, ...extra];
    const m = await fastest(3, () => runSweep({ ...base, set, vary: [`mz=${lo}..${hi}:201`], method: 'matrix' }));
    const d = await fastest(3, () => runSweep({ ...base, set, vary: [`mz=${lo}..${hi}:21`], method: 'direct' }));
    const directScaled = d.wallSeconds * (201 / 21);
    const ions = 201 * 2000;
    console.log(`sweep ${label}, 201 points × 2000 ions`);
    console.log(`  matrix, 1 thread: ${m.wallSeconds.toFixed(3)} s (${(ions / m.wallSeconds / 1e3).toFixed(0)} k ions/s)`);
    console.log(`  direct RK4, 1 thread, 21 of the 201 points (every 10th): ${d.wallSeconds.toFixed(2)} s; scaled to 201 points: ${directScaled.toFixed(1)} s`);
    console.log(`  speed-up matrix vs direct (scaled): ${(directScaled / m.wallSeconds).toFixed(0)}×  (goal >= 50×)`);
    let worst = 0;
    for (const p of d.points) {
      const q = m.points.find((x) => Math.abs(x.values[0] - p.values[0]) < 1e-9)!;
      const pp = 0.5 * (p.transmission + q.transmission);
      const sigma = Math.sqrt(Math.max(pp * (1 - pp), 1 / 2000) / 2000);
      worst = Math.max(worst, Math.abs(p.transmission - q.transmission) / sigma);
    }
    console.log(`  agreement on the 21 shared points: largest |T_direct − T_matrix| = ${worst.toFixed(2)} binomial σ`);
    const pk = m.peak;
    if (pk) console.log(`  peak (matrix): m/z ${pk.mz.toFixed(3)}, FWHM ${pk.fwhm_mz?.toFixed(3) ?? 'n/a'}, R50 ${pk.resolution_50?.toFixed(1) ?? 'n/a'}, R10 ${pk.resolution_10?.toFixed(1) ?? 'n/a'}, T ${(100 * pk.transmission).toFixed(1)} %`);
  }
}
