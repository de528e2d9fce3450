// Small run folders for the 3D renderer's tests and benchmark. The trajectories integrate the
// Mathieu equation u'' + (a − 2q cos 2ξ) u = 0, ξ = Ωt/2 (N. W. McLachlan, "Theory and Application
// of Mathieu Functions" (1947), eq. 2.10 form; DESIGN.md a/q conventions) with classical RK4, so
// stable ions oscillate and unstable ones grow and strike the rods. The numbers are demo values of
// the fictional Skerry QF-4 filter and Skerry T-7 trap.

import { RunFolderWriter } from '../../sim/runfolder/index.js';

export type FixtureKind = 'filter' | 'trap' | 'tof';

export interface FixtureOptions { ions: number; points: number; kind: FixtureKind }

/** Deterministic uniform numbers for fixtures (Park–Miller minimal standard, CACM 31 (1988) 1192). */
function lcg(seed: number) {
  let s = seed % 2147483647 || 1;
  return () => (s = (s * 48271) % 2147483647) / 2147483647;
}

/** One Mathieu solution sampled at n points over ξ ∈ [0, ξmax]; RK4 with 40 steps per sample. */
function mathieu(a: number, q: number, u0: number, du0: number, xiMax: number, n: number, out: Float64Array): void {
  let u = u0, v = du0, xi = 0;
  const sub = 40, h = xiMax / ((n - 1) * sub);
  const f = (x: number, uu: number) => -(a - 2 * q * Math.cos(2 * x)) * uu;
  out[0] = u;
  for (let i = 1; i < n; i++) {
    for (let s = 0; s < sub; s++) {
      const k1u = v, k1v = f(xi, u);
      const k2u = v + 0.5 * h * k1v, k2v = f(xi + 0.5 * h, u + 0.5 * h * k1u);
      const k3u = v + 0.5 * h * k2v, k3v = f(xi + 0.5 * h, u + 0.5 * h * k2u);
      const k4u = v + h * k3v, k4v = f(xi + h, u + h * k3u);
      u += (h / 6) * (k1u + 2 * k2u + 2 * k3u + k4u);
      v += (h / 6) * (k1v + 2 * k2v + 2 * k3v + k4v);
      xi += h;
    }
    out[i] = u;
  }
}

export async function makeRunFolder(dir: string, opts: FixtureOptions): Promise<string> {
  const rnd = lcg(12345);
  const { ions: N, points: P, kind } = opts;
  const mzList = kind === 'trap' ? [100, 150, 250] : [69, 131, 219, 264, 414, 502, 614];
  const ion = new Int32Array(N), mz = new Float64Array(N), charge = new Int32Array(N).fill(1);
  const fate: string[] = [];
  const tI = new Int32Array(N * P), t = new Float64Array(N * P);
  const x = new Float64Array(N * P), y = new Float64Array(N * P), z = new Float64Array(N * P);
  const zero = new Float64Array(N * P);
  // Axial speed of each point (the TOF fixture moves at constant speed after its gap; others 0).
  const vzAll = new Float64Array(N * P);
  const ux = new Float64Array(P), uy = new Float64Array(P), uz = new Float64Array(P);
  const r0 = kind === 'trap' ? 10e-3 : 4e-3, z0 = 7.07e-3;
  const L = 0.12, drift = 0.04, rfHz = 1.1e6;
  const stages = kind === 'trap'
    ? [{ type: 'trap', length: 2 * z0, r0, z0, aperture: 1e-3, rf: { amplitude: 900, frequency: rfHz, phase: 0 }, dc: 0 }]
    : kind === 'tof'
      ? [{ type: 'accelerate', length: 0.01, voltage: 2000, aperture: 6e-3 }, { type: 'drift', length: 0.3, aperture: 12e-3 }]
      : [{ type: 'quadrupole', length: L, r0, rf: { amplitude: 600, frequency: rfHz, phase: 0 }, dc: 100 }, { type: 'drift', length: drift }];
  for (let i = 0; i < N; i++) {
    ion[i] = i;
    mz[i] = mzList[i % mzList.length];
    const sx = (rnd() - 0.5) * 1.0e-3, sy = (rnd() - 0.5) * 1.0e-3;
    const o = i * P;
    let f = 'detected';
    if (kind === 'filter') {
      // Scan line a/q = 0.3: species near m/z 219–264 sit inside the first region, others outside.
      const q = 0.706 * 240 / mz[i], a = 0.3 * q;
      mathieu(a, q, sx, (rnd() - 0.5) * 2e-4, 260, P, ux);
      mathieu(-a, -q, sy, (rnd() - 0.5) * 2e-4, 260, P, uy);
      let end = P;
      for (let k = 0; k < P; k++) if (Math.hypot(ux[k], uy[k]) > r0) { end = k + 1; f = 'hit'; break; }
      for (let k = 0; k < P; k++) {
        const kk = Math.min(k, end - 1);
        tI[o + k] = i; t[o + k] = (kk / (P - 1)) * 60e-6;
        x[o + k] = ux[kk]; y[o + k] = uy[kk]; z[o + k] = (kk / (P - 1)) * (L + drift);
      }
      if (end < P) for (let k = end; k < P; k++) { t[o + k] = t[o + end - 1] + (k - end + 1) * 1e-12; }
    } else if (kind === 'trap') {
      const qz = 0.3 + 0.5 * (100 / mz[i]), az = 0;
      mathieu(-az / 2, -qz / 2, sx * 3, 0, 400, P, ux);
      mathieu(-az / 2, -qz / 2, sy * 3, 0, 400, P, uy);
      mathieu(az, qz, (rnd() - 0.5) * 4e-3, 0, 400, P, uz);
      f = 'alive';
      for (let k = 0; k < P; k++) {
        tI[o + k] = i; t[o + k] = (k / (P - 1)) * 200e-6;
        x[o + k] = ux[k]; y[o + k] = uy[k]; z[o + k] = z0 + uz[k];
      }
    } else {
      const vz = Math.sqrt((2 * 2000 * 1.602e-19) / (mz[i] * 1.6605e-27));
      for (let k = 0; k < P; k++) {
        tI[o + k] = i; t[o + k] = (k / (P - 1)) * 0.31 / vz;
        x[o + k] = sx + (k / P) * sx; y[o + k] = sy + (k / P) * sy; z[o + k] = (k / (P - 1)) * 0.31;
        vzAll[o + k] = vz;
      }
    }
    fate.push(f);
  }
  const w = await RunFolderWriter.create(dir, { force: true });
  const z0s = () => new Float64Array(N);
  w.appendIons({
    ion, population: new Int32Array(N), mz, charge,
    x0: z0s(), y0: z0s(), z0: z0s(), vx0: z0s(), vy0: z0s(), vz0: z0s(),
    fate, end_time: z0s(), end_x: z0s(), end_y: z0s(), end_z: z0s(),
    end_vx: z0s(), end_vy: z0s(), end_vz: z0s(), end_ke_ev: z0s(), end_stage: new Int32Array(N), collisions: z0s(),
  });
  // Several record batches, as the engine streams them (an ion may span two batches).
  const chunk = Math.max(1, Math.floor((N * P) / 3));
  for (let a = 0; a < N * P; a += chunk) {
    const b = Math.min(N * P, a + chunk);
    w.appendTrajectory({ ion: tI.subarray(a, b), t: t.subarray(a, b), x: x.subarray(a, b), y: y.subarray(a, b), z: z.subarray(a, b), vx: zero.subarray(a, b), vy: zero.subarray(a, b), vz: vzAll.subarray(a, b) });
  }
  const names = { filter: 'Skerry QF-4 m/z 219–264 window', trap: 'Skerry T-7 storage at q_z 0.3–0.8', tof: 'Skerry LT-1 flight tube' };
  const count = (f: string) => fate.filter((v) => v === f).length;
  await w.finish({
    complete: true, scene_name: names[kind],
    ions: { total: N, detected: count('detected'), hit: count('hit'), alive: count('alive') },
    species: [], stats: { steps: 0, wall_s: 0 }, warnings: [],
    provenance: {
      tool_version: '0.1.0', scene: { name: names[kind], seed: 7, stages }, scene_file: `scenes/skerry-${kind}.yaml`,
      seed: 7, command_line: 'test fixture', integrator: { name: 'rk4' }, workers: 1, started_at: '2026-01-01T00:00:00Z',
    },
    units: { length: 'm', time: 's' },
  });
  return dir;
}
