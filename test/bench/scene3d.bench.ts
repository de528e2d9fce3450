// 3D rendering speed: 1,000 trajectories × 1,000 points (1e6 segment points) of a Skerry QF-4
// filter run. Figures: the polyline kernel (projection, decimation, anti-aliased coverage, depth
// blend) against the same algorithm in plain C (test/bench/c/scene3d_polylines.c, cc -O2), the whole
// PNG (scene, electrodes, trajectories, labels, encode), reading the run folder, .glb and .html.

import { rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import * as THREE from 'three';
import { makeCamera } from '../../render/scene3d/cameras.js';
import { renderGlb } from '../../render/scene3d/glb.js';
import { renderHtml } from '../../render/scene3d/html.js';
import { MARGINS, renderPng } from '../../render/scene3d/png.js';
import { Layers } from '../../render/scene3d/raster/layers.js';
import { rasteriseBatch } from '../../render/scene3d/raster/sceneRaster.js';
import { readRunView, type RunView } from '../../render/scene3d/runInput.js';
import { buildScene } from '../../render/scene3d/sceneGraph.js';
import { RunFolderWriter } from '../../sim/runfolder/index.js';
import { buildC, repoRoot, runC } from './cbuild.js';

const IONS = 1000, POINTS = 1000;

/** Secular motion with micromotion (March & Todd, 2nd ed., eq. 2.75 shape), demo amplitudes. */
async function writeRun(dir: string): Promise<void> {
  const n = IONS * POINTS;
  const cols = {
    ion: new Int32Array(n), t: new Float64Array(n), x: new Float64Array(n), y: new Float64Array(n),
    z: new Float64Array(n), vx: new Float64Array(n), vy: new Float64Array(n), vz: new Float64Array(n),
  };
  const mz = new Float64Array(IONS), fate: string[] = [];
  const L = 0.12, q = 0.6;
  for (let i = 0; i < IONS; i++) {
    mz[i] = [131, 219, 264, 414][i % 4];
    const ax = 1e-3 * (0.3 + 0.7 * ((i * 7919) % 1000) / 1000), ay = 1e-3 * (0.3 + 0.7 * ((i * 104729) % 1000) / 1000);
    const px = (i * 2.399) % (2 * Math.PI), py = (i * 1.133) % (2 * Math.PI);
    const bx = 0.3 + 0.2 * (i % 4) / 4, by = 0.15 + 0.1 * (i % 3) / 3;
    const grow = i % 5 === 0 ? 3 : 0; // every fifth ion unstable: grows and strikes a rod
    let end = POINTS;
    for (let k = 0; k < POINTS; k++) {
      const o = i * POINTS + k, s = k / (POINTS - 1), xi = 300 * s;
      const g = Math.exp(grow * s);
      cols.ion[o] = i; cols.t[o] = s * 60e-6;
      cols.x[o] = g * ax * Math.cos(bx * xi + px) * (1 - (q / 2) * Math.cos(2 * xi));
      cols.y[o] = g * ay * Math.cos(by * xi + py) * (1 + (q / 2) * Math.cos(2 * xi));
      cols.z[o] = s * (L + 0.04);
      if (end === POINTS && Math.hypot(cols.x[o], cols.y[o]) > 4e-3) end = k;
      if (k > end) { cols.x[o] = cols.x[o - 1]; cols.y[o] = cols.y[o - 1]; cols.z[o] = cols.z[o - 1]; }
    }
    fate.push(end < POINTS ? 'hit' : 'detected');
  }
  const w = await RunFolderWriter.create(dir, { force: true });
  const zeros = () => new Float64Array(IONS);
  w.appendIons({
    ion: Int32Array.from({ length: IONS }, (_, i) => i), population: new Int32Array(IONS), mz, charge: new Int32Array(IONS).fill(1),
    x0: zeros(), y0: zeros(), z0: zeros(), vx0: zeros(), vy0: zeros(), vz0: zeros(), fate, end_time: zeros(),
    end_x: zeros(), end_y: zeros(), end_z: zeros(), end_vx: zeros(), end_vy: zeros(), end_vz: zeros(), end_ke_ev: zeros(),
    end_stage: new Int32Array(IONS), collisions: zeros(),
  });
  const B = 100_000;
  for (let a = 0; a < n; a += B) {
    const sl = (c: Float64Array | Int32Array) => c.subarray(a, a + B);
    w.appendTrajectory({ ion: sl(cols.ion), t: sl(cols.t), x: sl(cols.x), y: sl(cols.y), z: sl(cols.z), vx: sl(cols.vx), vy: sl(cols.vy), vz: sl(cols.vz) });
  }
  await w.finish({
    complete: true, scene_name: 'Skerry QF-4 benchmark ensemble', ions: { total: IONS, detected: 0, hit: 0, alive: 0 }, species: [],
    stats: { steps: 0, wall_s: 0 }, warnings: [],
    provenance: {
      tool_version: '0.1.0', scene_file: null, seed: 1, command_line: 'bench', integrator: {}, workers: 1, started_at: '',
      scene: { name: 'bench', seed: 1, stages: [
        { type: 'quadrupole', length: L, r0: 4e-3, rf: { amplitude: 600, frequency: 1.1e6, phase: 0 }, dc: 80 },
        { type: 'drift', length: 0.04 },
      ] },
    },
    units: {},
  });
}

const ms = (t0: number) => (performance.now() - t0).toFixed(0);

export async function bench(): Promise<void> {
  const root = repoRoot();
  const dir = join(root, 'test/bench/.build/scene3d-run');
  await writeRun(dir);
  let t0 = performance.now();
  const run: RunView = await readRunView(dir);
  console.log(`read run folder (${IONS} ions × ${POINTS} points): ${ms(t0)} ms`);

  // The kernel alone, on the iso view at 1600 × 900.
  const W = 1600, H = 900;
  const built = buildScene(run, { rods: 'hyperbolic', color: 'mz', lineObjects: false });
  const cam = makeCamera('iso', built.bounds, W, H, MARGINS);
  const style = { width: 1.0, opacity: 0.35 };
  const scratch = new Float64Array(3 * POINTS);
  let best = Infinity, alpha = 0;
  for (let rep = 0; rep < 3; rep++) {
    const L = new Layers(W, H, 1);
    t0 = performance.now();
    rasteriseBatch(built.batch, cam, L, style, scratch);
    best = Math.min(best, performance.now() - t0);
    alpha = L.lAlpha.reduce((a, b) => a + b, 0);
  }
  console.log(`polyline kernel, 1e6 points: ${best.toFixed(0)} ms (${(1e6 / best / 1e3).toFixed(2)} M points/s), coverage sum ${alpha.toFixed(1)}`);

  // Same input for the C kernel.
  const m = new THREE.Matrix4().multiplyMatrices(cam.projectionMatrix, cam.matrixWorldInverse).elements;
  const nL = built.batch.start.length - 1;
  const head = Buffer.alloc(12 + 8 + 128);
  head.writeInt32LE(W, 0); head.writeInt32LE(H, 4); head.writeInt32LE(nL, 8);
  head.writeFloatLE(style.width / 2, 12); head.writeFloatLE(style.opacity, 16);
  m.forEach((v, i) => head.writeDoubleLE(v, 20 + 8 * i));
  const input = join(root, 'test/bench/.build/scene3d-polylines.bin');
  const view = (a: ArrayBufferView) => Buffer.from(a.buffer, a.byteOffset, a.byteLength);
  writeFileSync(input, Buffer.concat([head, view(built.batch.start), view(built.batch.rgb), view(built.batch.positions)]));
  const exe = buildC('scene3d_polylines');
  let cBest = Infinity, cAlpha = 0;
  for (let rep = 0; rep < 3; rep++) {
    const [, sec, sum] = runC(exe, [input]).split(' ').map(Number);
    cBest = Math.min(cBest, sec * 1e3);
    cAlpha = sum;
  }
  console.log(`C reference (cc -O2), same kernel: ${cBest.toFixed(0)} ms, coverage sum ${cAlpha.toFixed(1)} (relative difference ${(Math.abs(cAlpha - alpha) / cAlpha).toExponential(1)})`);
  console.log(`ratio TS / C: ${(best / cBest).toFixed(2)}`);

  t0 = performance.now();
  const png = renderPng(run, { camera: 'iso', color: 'mz', rods: 'hyperbolic', width: W, height: H });
  console.log(`whole PNG ${W}×${H} (scene, electrodes ×2 supersampled, 1e6 points, labels, encode): ${ms(t0)} ms, ${(png.png.byteLength / 1024).toFixed(0)} KiB`);
  t0 = performance.now();
  const glb = await renderGlb(run, { camera: 'iso', color: 'mz', rods: 'hyperbolic' });
  console.log(`.glb with 1e6 points: ${ms(t0)} ms, ${(glb.byteLength / 2 ** 20).toFixed(1)} MiB`);
  t0 = performance.now();
  const html = renderHtml(run, { camera: 'iso', color: 'mz', rods: 'hyperbolic' });
  console.log(`.html with 1e6 points: ${ms(t0)} ms, ${(Buffer.byteLength(html) / 2 ** 20).toFixed(1)} MiB (use --every N to shrink)`);
  rmSync(dir, { recursive: true, force: true });
  rmSync(input, { force: true });
}
