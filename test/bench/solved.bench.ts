// Ions through solved electrode fields (issue 13), single thread, kernels called directly:
//  1. the interpolating kernel (tricubic Hermite, two interleaved fields, RK4) on the Skerry QF-4R
//     3D field (scenes/qf4r-round-rods.yaml: round rods between entrance and exit plates, run RF
//     only so that every ion passes) against a
//     plain C kernel of the same arithmetic (test/bench/c/solved_tricubic_rk4.c, cc -O2) on the same
//     grid values and ions, in this one run (goal ≥ 0.7); the final positions agree as a check that
//     both did the same work;
//  2. the multipole path (field_path: multipole, 20 orders) of the QF-4R cross-section as a 150 mm
//     planar rod set against the ideal quadrupole kernel on the same ions (goal ≥ 0.5). The ideal
//     kernel's field is linear, so its RK4 step is a precomputed 2×2 map per axis (8 products,
//     sim/stages/quadrupole/kernel.ts); the series path evaluates a nonlinear field four times a
//     step, so the two differ by more than the arithmetic of the same method.
//  3. the issue's sweep: 101 m/z points × 2,000 ions through a 150 mm round-rod filter at 1.2 MHz
//     (the QF-4R cross-section as a planar rod set, the QF-4 peak-scan source, 2 workers) with
//     `iontrail sweep` as a user types it, on the multipole path (goal ≤ 2 min), and the grid
//     path on a tenth of the ions (scaled ×10, said so).
// The field cache goes to a temporary folder, removed at the end.

import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseScene } from '../../sim/scene/load.js';
import { prepareSolvedFields } from '../../sim/engine/solved-fields.js';
import { solvedFieldOf } from '../../sim/stages/electrodes/solution.js';
import type { ElectrodesStage } from '../../sim/stages/electrodes/stage.js';
import { kindOf } from '../../sim/stages/registry.js';
import type { QuadrupoleStage, Stage } from '../../sim/stages/types.js';
import { allocateBatch } from '../../sim/core/batch.js';
import type { IonCursor, StepContext } from '../../sim/core/cursor.js';
import { ATOMIC_MASS_UNIT, ELECTRONVOLT, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';
import { buildC, repoRoot, runC } from './cbuild.js';
import { roundRodStage } from '../helpers/round-rods.js';
import { execFileSync } from 'node:child_process';
import { loadavg } from 'node:os';

const m = 502 * ATOMIC_MASS_UNIT, q = ELEMENTARY_CHARGE;
const SPC = 40;

interface Start { x: number; y: number; z: number; vx: number; vy: number; vz: number; tau: number }

function starts(n: number): Start[] {
  const v = Math.sqrt((2 * 5 * ELECTRONVOLT) / m);
  return Array.from({ length: n }, (_, i) => ({
    x: 1e-4 * Math.sin(1.7 * i + 0.3), y: 1e-4 * Math.cos(2.3 * i), z: 0, vx: 5 * Math.sin(i), vy: 5 * Math.cos(3 * i), vz: v, tau: (i % 40) * 2e-8,
  }));
}

function trackAll(st: Stage, ions: Start[], maxTime: number): { steps: number; seconds: number; checksum: number } {
  const ctx: StepContext = { batch: allocateBatch(1), maxTime, recordEvery: 0, rec: null, hist: null, gas: null, gasField: null, hardSphere: null };
  const run = { integrator: 'rk4' as const, stepsPerCycle: SPC, tolerance: 1e-10, stepNoRf: 1e-8 };
  const kind = kindOf(st);
  let steps = 0, checksum = 0;
  const t0 = performance.now();
  for (let i = 0; i < ions.length; i++) {
    const s = ions[i];
    const c: IonCursor = { ion: i, slot: 0, m, q, tau: s.tau, t: 0, x: s.x, y: s.y, z: st.zStart + s.z, vx: s.vx, vy: s.vy, vz: s.vz, steps: 0, sinceRecord: 0, nextHist: 0 };
    kind.track(st, c, ctx, run);
    steps += c.steps; checksum += c.x + c.y + (c.z - st.zStart);
  }
  return { steps, seconds: (performance.now() - t0) / 1e3, checksum };
}

/** The C kernel's input: header (24 doubles), ion starts, the interleaved [dc, rf] grid values. */
function writeCInput(path: string, st: ElectrodesStage, ions: Start[], maxTime: number): void {
  const F = solvedFieldOf(st);
  const g = F.grid;
  const values = (F.interp as unknown as { f: Float64Array }).f;
  if (F.interp.components !== 2 || g.symmetry !== 'none') throw new Error('the C kernel takes a 3D grid with dc and rf sums');
  const mir = (p: 'x' | 'y' | 'z') => (g.mirror.includes(p) ? 1 : 0);
  const lowerHalf = Math.abs(g.origin[2]) < g.spacing / 2;
  if (mir('z') && lowerHalf) throw new Error('the C kernel folds a z mirror with the upper half stored');
  const hd = new Float64Array(24);
  hd.set([g.shape[0], g.shape[1], g.shape[2], g.origin[0], g.origin[1], g.origin[2], g.spacing, st.length, st.rf!.frequency, st.rf!.amplitude, q / m, SPC, maxTime, ions.length], 0);
  hd.set([mir('x'), mir('y'), mir('z'), 0, 0, 0, g.origin[2], mir('x'), mir('y'), mir('z')], 14);
  const ionData = new Float64Array(7 * ions.length);
  ions.forEach((s, i) => ionData.set([s.x, s.y, s.z, s.vx, s.vy, s.vz, s.tau], 7 * i));
  writeFileSync(path, Buffer.concat([Buffer.from(hd.buffer), Buffer.from(ionData.buffer), Buffer.from(values.buffer, values.byteOffset, values.byteLength)]));
}

/** The sweep of part 3: the QF-4R rods (R/r0 = 1.13) as a planar set with the QF-4 peak-scan source. */
const ROUND_ROD_SWEEP = `name: bench round-rod peak scan (Skerry QF-4R cross-section)
seed: 42
stages:
${roundRodStage({ length: '150 mm', spacing: '0.05 mm', dc: '138.528 V', rf: '{ amplitude: 832 V, frequency: 1.2 MHz, phase: 0 deg }' })}detector: { radius: 4 mm }
ions:
  - { mz: 502, count: 2000, position: { x: 0 mm, y: 0 mm, z: 0 mm, spread: 0.1 mm }, energy: 5 eV, energy_spread: 0.2 eV, angle_spread: 1 deg, direction: axial, rf_phase: uniform }
run: { steps_per_cycle: 40, max_time: 300 us, record_every: 0 }
`;

export async function bench(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'iontrail-bench-solved-'));
  const saved = process.env.XDG_CACHE_HOME;
  process.env.XDG_CACHE_HOME = dir;
  try {
    // RF only (the rods' dc set to 0 V): every ion of the bench passes the filter, so neither kernel
    // meets an electrode and both do the same steps (the C kernel has no inside test).
    const text = readFileSync(join(repoRoot(), 'scenes/qf4r-round-rods.yaml'), 'utf8').replace(/dc: -?138\.3 V/g, 'dc: 0 V');
    const scene = parseScene(text, 'qf4r-round-rods.yaml');
    let t0 = performance.now();
    await prepareSolvedFields(scene, 'qf4r-round-rods.yaml', { workers: 1 });
    const st = scene.stages[0] as ElectrodesStage;
    solvedFieldOf(st);
    console.log(`QF-4R 3D field solved and prepared in ${((performance.now() - t0) / 1e3).toFixed(1)} s (${st.field_path?.nodes} nodes)`);
    const ions = starts(120), maxTime = 60e-6;
    trackAll(st, ions.slice(0, 20), maxTime); // warm-up: compile the kernel
    const ts = trackAll(st, ions, maxTime);
    const input = join(dir, 'c-input.bin');
    writeCInput(input, st, ions, maxTime);
    const [cSteps, cSec, cSum] = runC(buildC('solved_tricubic_rk4'), [input]).split(' ').map(Number);
    console.log(`C tricubic + RK4 (cc -O2, 1 thread):  ${(cSteps / cSec / 1e6).toFixed(3)} M ion-steps/s (${cSteps} steps in ${cSec.toFixed(3)} s)`);
    console.log(`iontrail electrodes kernel, 1 thread:  ${(ts.steps / ts.seconds / 1e6).toFixed(3)} M ion-steps/s (${ts.steps} steps in ${ts.seconds.toFixed(3)} s)`);
    console.log(`same work: steps ${ts.steps === cSteps ? 'equal' : `differ (${ts.steps} vs ${cSteps})`}, final-position checksum |Δ| ${Math.abs(ts.checksum - cSum).toExponential(2)} m`);
    console.log(`ratio vs plain C tricubic + RK4: ${((ts.steps / ts.seconds) / (cSteps / cSec)).toFixed(2)}  (goal >= 0.7)`);

    // Multipole path against the ideal quadrupole kernel: the QF-4R cross-section as a 150 mm rod set.
    const rf = st.rf!;
    const planar = parseScene(`name: bench multipole path
stages:
${roundRodStage({ length: '150 mm', spacing: '0.05 mm', dc: '138.3 V', rf: `{ amplitude: ${rf.amplitude} V, frequency: ${rf.frequency} Hz }` })}ions:
  - { mz: 502, count: 1 }
`, 'bench.yaml');
    t0 = performance.now();
    await prepareSolvedFields(planar, 'bench.yaml', { workers: 1 });
    console.log(`planar rod set solved in ${((performance.now() - t0) / 1e3).toFixed(1)} s`);
    const rods = planar.stages[0];
    const ideal: QuadrupoleStage = { type: 'quadrupole', r0: 4e-3, length: 0.15, rf: { ...rf }, dc: 138.3, zStart: 0, zEnd: 0.15 } as QuadrupoleStage;
    const many = starts(400);
    trackAll(rods, many.slice(0, 20), 300e-6); trackAll(ideal, many.slice(0, 20), 300e-6);
    const mp = trackAll(rods, many, 300e-6), iq = trackAll(ideal, many, 300e-6);
    console.log(`multipole path, 1 thread:       ${(mp.steps / mp.seconds / 1e6).toFixed(2)} M ion-steps/s (${mp.steps} steps)`);
    console.log(`ideal quadrupole kernel:        ${(iq.steps / iq.seconds / 1e6).toFixed(2)} M ion-steps/s (${iq.steps} steps)`);
    console.log(`ratio multipole path / ideal quadrupole kernel: ${((mp.steps / mp.seconds) / (iq.steps / iq.seconds)).toFixed(2)}  (goal >= 0.5; the ideal kernel is RK4 as a transfer matrix of its linear field)`);

    // 3. The round-rod sweep through the command line (its own process, both workers).
    const sweepScene = join(dir, 'qf4r-sweep.yaml');
    writeFileSync(sweepScene, ROUND_ROD_SWEEP);
    const cli = join(repoRoot(), 'cli/iontrail.js');
    const sweep = (path: 'multipole' | 'grid', ions: number) => {
      const file = join(dir, `${path}.yaml`);
      writeFileSync(file, ROUND_ROD_SWEEP.replace('field_path: multipole', `field_path: ${path}`));
      execFileSync(process.execPath, [cli, 'field', file, '-o', join(dir, `${path}-field`), '--force'], { env: process.env }); // solved outside the timing
      const load = loadavg()[0];
      const t = performance.now();
      const outText = execFileSync(process.execPath, [cli, 'sweep', file, '--vary', 'mz=496..508:101', '--set', `ions.0.count=${ions}`, '-o', join(dir, `${path}-sweep`), '--workers', '2'], { env: process.env, encoding: 'utf8' });
      const wall = (performance.now() - t) / 1e3;
      const peak = outText.split('\n').find((l) => l.includes('peak m/z'))?.trim() ?? '';
      return { wall, peak, load };
    };
    const mpSweep = sweep('multipole', 2000);
    console.log(`round-rod sweep, 101 m/z × 2000 ions, 150 mm at 1.2 MHz, multipole path, 2 workers: ${mpSweep.wall.toFixed(1)} s wall (goal ≤ 120 s; load ${mpSweep.load.toFixed(1)} at start); ${mpSweep.peak}`);
    const grid = sweep('grid', 200);
    console.log(`  the same on the grid path with 200 ions a point: ${grid.wall.toFixed(1)} s, so about ${(10 * grid.wall).toFixed(0)} s for 2000 (scaled); ${grid.peak}`);
  } finally {
    if (saved === undefined) delete process.env.XDG_CACHE_HOME; else process.env.XDG_CACHE_HOME = saved;
    rmSync(dir, { recursive: true, force: true });
  }
}
