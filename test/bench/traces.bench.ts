// Time-trace rendering speed: one ion with 1e6 recorded points per series (x, y, z, kinetic energy
// panels) drawn through per-pixel min/max decimation, PNG encode included and reported apart.
// Figures: ms per figure, points/s. No C comparison (drawing, not physics). Also the decimation
// alone, to show it is not the bottleneck.

import { join } from 'node:path';
import { rmSync } from 'node:fs';
import { RunFolderWriter } from '../../sim/runfolder/index.js';
import { buildFigure, renderFigure } from '../../render/plot/index.js';
import { Decimator } from '../../render/plot/decimate.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';
import { sceneJson, tempRoot } from '../runfolder/synthetic.js';

const N = 1_000_000;

async function makeRun(dir: string): Promise<void> {
  const w = await RunFolderWriter.create(dir);
  const batch = 100_000;
  const W = 2 * Math.PI * 1.2e6, q = 0.507, bx = 0.48, by = 0.16;
  const m = 502 * ATOMIC_MASS_UNIT, vz = Math.sqrt((2 * 5 * ELEMENTARY_CHARGE) / m);
  const dt = 2e-9;
  const cols = {
    ion: new Int32Array(batch), t: new Float64Array(batch), x: new Float64Array(batch), y: new Float64Array(batch),
    z: new Float64Array(batch), vx: new Float64Array(batch), vy: new Float64Array(batch), vz: new Float64Array(batch),
  };
  for (let b = 0; b < N / batch; b++) {
    for (let k = 0; k < batch; k++) {
      // Secular + micromotion (March & Todd, 2nd ed., eq. 2.75 shape), demo amplitudes.
      const t = (b * batch + k) * dt;
      cols.t[k] = t;
      cols.x[k] = 2e-4 * Math.cos(bx * W * t / 2) * (1 - (q / 2) * Math.cos(W * t));
      cols.y[k] = 1.5e-4 * Math.cos(by * W * t / 2) * (1 + (q / 2) * Math.cos(W * t));
      cols.z[k] = vz * t;
      cols.vx[k] = -2e-4 * (bx * W / 2) * Math.sin(bx * W * t / 2);
      cols.vy[k] = -1.5e-4 * (by * W / 2) * Math.sin(by * W * t / 2);
      cols.vz[k] = vz;
    }
    w.appendTrajectory(cols);
  }
  const one = (v: number) => [v];
  w.appendIons({
    ion: [0], population: [0], mz: [502], charge: [1], x0: [0], y0: [0], z0: [0], vx0: [0], vy0: [0], vz0: one(vz),
    fate: ['alive'], end_time: one(N * dt), end_x: [0], end_y: [0], end_z: [0], end_vx: [0], end_vy: [0], end_vz: one(vz),
    end_ke_ev: [5], end_stage: [0], collisions: [0],
  });
  await w.finish({
    complete: true, scene_name: 'Skerry QF-4 benchmark trace', ions: { total: 1, detected: 0, hit: 0, alive: 1 }, species: [],
    stats: { steps: N, wall_s: 0 }, warnings: [],
    provenance: { tool_version: '0.1.0', scene: sceneJson(false), scene_file: null, seed: 1, command_line: 'bench', integrator: {}, workers: 1, started_at: '' },
    units: {},
  });
}

export async function bench(): Promise<void> {
  const root = tempRoot('bench-traces');
  const dir = join(root, 'run');
  try {
    await makeRun(dir);
    const req = { kind: 'traces', out: join(root, 'x.png'), width: 1400, height: 1000, values: new Map([['panels', 'x,y,z,ke'], ['ions', 'all']]), switches: new Set(['rf-marks']) };
    for (let rep = 0; rep < 3; rep++) {
      const t0 = performance.now();
      const { spec, width, height } = await buildFigure(dir, req);
      const t1 = performance.now();
      const png = await renderFigure(spec, { width, height, format: 'png' });
      const t2 = performance.now();
      const series = 4;
      console.log(`traces: ${series} series × ${N.toLocaleString('en-US')} points: read + derive ${(t1 - t0).toFixed(0)} ms, draw + PNG encode ${(t2 - t1).toFixed(0)} ms (${(png.byteLength / 1024).toFixed(0)} KiB), ` +
        `${((series * N) / ((t2 - t1) / 1000) / 1e6).toFixed(1)} M points/s drawn, ${((series * N) / ((t2 - t0) / 1000) / 1e6).toFixed(1)} M points/s end to end`);
    }
    const t = new Float64Array(N), y = new Float64Array(N);
    for (let i = 0; i < N; i++) { t[i] = i; y[i] = Math.sin(i * 1e-3) + 0.1 * Math.sin(i * 0.37); }
    const d = new Decimator();
    const t0 = performance.now();
    let v = 0;
    for (let rep = 0; rep < 5; rep++) v += d.run(t, y, 0, N, 0, 1300 / N);
    const ms = (performance.now() - t0) / 5;
    console.log(`decimation alone: ${ms.toFixed(1)} ms per 1e6 points (${(N / (ms / 1000) / 1e6).toFixed(0)} M points/s, ${v / 5} vertices kept for 1300 px)`);
  } finally {
    rmSync(root, { recursive: true, force: true });
  }
}
