// Synthetic but physically shaped run folders for the run-folder and plot tests (the engine's real
// output comes later). Ions in an ideal quadrupole follow the lowest-order secular + micromotion
// solution of the Mathieu equation, x(t) ≈ x0 cos(ω_s t) (1 − (q/2) cos Ωt) with ω_s = βΩ/2 and
// β² ≈ a + q²/2 (Dehmelt approximation; March & Todd, "Quadrupole Ion Trap Mass Spectrometry",
// 2nd ed., eqs. 2.63 and 2.75). Good enough to look like a trajectory; not a physics reference.
// Scene values are demo numbers of the fictional Skerry QF-4 filter.

import { tempDir } from '../helpers/temp.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';
import { RunFolderWriter, type RunSummary } from '../../sim/runfolder/index.js';

export function tempRoot(prefix: string): string {
  return tempDir(`iontrail-${prefix}-`);
}

export const QF4 = {
  r0: 4e-3, length: 0.15, amplitude: 600, frequency: 1.2e6, dc: 60,
};

export interface SyntheticOptions {
  /** m/z of each population. */
  mz?: number[];
  /** Ions per population. */
  perPopulation?: number;
  /** Recorded points per ion. */
  pointsPerIon?: number;
  /** Points per record batch. */
  batchPoints?: number;
  csv?: boolean;
  history?: boolean;
  force?: boolean;
  /** Produce a trap scene instead of a filter scene. */
  trap?: boolean;
}

/** Mathieu a, q of the QF-4 filter for m/z (DESIGN.md convention, a = 8zeU/(m r0² Ω²)). */
export function qf4aq(mz: number, charge = 1): { a: number; q: number } {
  const m = mz * charge * ATOMIC_MASS_UNIT;
  const w = 2 * Math.PI * QF4.frequency;
  const d = m * QF4.r0 * QF4.r0 * w * w;
  return { a: (8 * charge * ELEMENTARY_CHARGE * QF4.dc) / d, q: (4 * charge * ELEMENTARY_CHARGE * QF4.amplitude) / d };
}

export function sceneJson(trap: boolean): Record<string, unknown> {
  const stages = trap
    ? [{ type: 'trap', r0: 7.07e-3, z0: 5e-3, rf: { amplitude: 400, frequency: 1.05e6, phase: 0 }, dc: 0 }]
    : [
      { type: 'quadrupole', length: QF4.length, r0: QF4.r0, rf: { amplitude: QF4.amplitude, frequency: QF4.frequency, phase: 0 }, dc: QF4.dc },
      { type: 'drift', length: 0.02 },
    ];
  return { name: trap ? 'Skerry T-7 trap, helium buffer gas' : 'Skerry QF-4 filter, m/z 502 working point', seed: 42, stages };
}

/** Write a synthetic run folder at `dir` and return the summary written. */
export async function writeSyntheticRun(dir: string, opt: SyntheticOptions = {}): Promise<RunSummary> {
  const mzs = opt.mz ?? [502, 219];
  const per = opt.perPopulation ?? 4;
  const npts = opt.pointsPerIon ?? 400;
  const batchPoints = opt.batchPoints ?? 1000;
  const trap = opt.trap ?? false;
  const w = await RunFolderWriter.create(dir, { csv: opt.csv, force: opt.force });
  const nIons = mzs.length * per;
  const cols = {
    ion: new Int32Array(nIons), population: new Int32Array(nIons), mz: new Float64Array(nIons), charge: new Int32Array(nIons),
    x0: new Float64Array(nIons), y0: new Float64Array(nIons), z0: new Float64Array(nIons),
    vx0: new Float64Array(nIons), vy0: new Float64Array(nIons), vz0: new Float64Array(nIons),
    fate: [] as string[], end_time: new Float64Array(nIons),
    end_x: new Float64Array(nIons), end_y: new Float64Array(nIons), end_z: new Float64Array(nIons),
    end_vx: new Float64Array(nIons), end_vy: new Float64Array(nIons), end_vz: new Float64Array(nIons),
    end_ke_ev: new Float64Array(nIons), end_stage: new Int32Array(nIons), collisions: new Float64Array(nIons),
  };
  const W = 2 * Math.PI * QF4.frequency;
  const tEnd = 40 / QF4.frequency; // 40 RF cycles recorded
  const traj = { ion: new Int32Array(batchPoints), t: new Float64Array(batchPoints), x: new Float64Array(batchPoints),
    y: new Float64Array(batchPoints), z: new Float64Array(batchPoints), vx: new Float64Array(batchPoints),
    vy: new Float64Array(batchPoints), vz: new Float64Array(batchPoints) };
  let fill = 0;
  const flush = () => {
    if (fill === 0) return;
    const sub = Object.fromEntries(Object.entries(traj).map(([k, v]) => [k, v.subarray(0, fill)]));
    w.appendTrajectory(sub as unknown as typeof traj);
    fill = 0;
  };
  const species: RunSummary['species'] = [];
  let ionIndex = 0;
  for (let p = 0; p < mzs.length; p++) {
    const { a, q } = qf4aq(mzs[p]);
    const bx = Math.sqrt(Math.max(a + q * q / 2, 1e-6));
    const by = Math.sqrt(Math.max(-a + q * q / 2, 1e-6));
    const m = mzs[p] * ATOMIC_MASS_UNIT;
    const vz = Math.sqrt((2 * 5 * ELEMENTARY_CHARGE) / m); // 5 eV axial
    let detected = 0;
    for (let j = 0; j < per; j++) {
      const i = ionIndex++;
      const ax = 0.2e-3 * (1 + 0.3 * j), ay = 0.15e-3 * (1 + 0.2 * ((j * 7) % 5)), ph = 0.7 * j;
      const X = (t: number) => ax * Math.cos(bx * W * t / 2 + ph) * (1 - (q / 2) * Math.cos(W * t));
      const Y = (t: number) => ay * Math.cos(by * W * t / 2 + 2 * ph) * (1 + (q / 2) * Math.cos(W * t));
      const dt = tEnd / (npts - 1);
      const h = 1e-3 * dt;
      for (let k = 0; k < npts; k++) {
        const t = k * dt;
        traj.ion[fill] = i; traj.t[fill] = t;
        traj.x[fill] = X(t); traj.y[fill] = Y(t); traj.z[fill] = vz * t;
        traj.vx[fill] = (X(t + h) - X(t - h)) / (2 * h); traj.vy[fill] = (Y(t + h) - Y(t - h)) / (2 * h); traj.vz[fill] = vz;
        if (++fill === batchPoints) flush();
      }
      const fate = j % 4 === 3 ? 'hit' : 'detected';
      if (fate === 'detected') detected++;
      cols.ion[i] = i; cols.population[i] = p; cols.mz[i] = mzs[p]; cols.charge[i] = 1;
      cols.x0[i] = X(0); cols.y0[i] = Y(0); cols.vx0[i] = 0; cols.vy0[i] = 0; cols.vz0[i] = vz;
      cols.fate.push(fate);
      cols.end_time[i] = QF4.length / vz * (1 + 0.01 * j);
      cols.end_x[i] = X(tEnd); cols.end_y[i] = Y(tEnd); cols.end_z[i] = fate === 'hit' ? 0.05 : QF4.length + 0.02;
      cols.end_vx[i] = 1; cols.end_vy[i] = -1; cols.end_vz[i] = vz;
      cols.end_ke_ev[i] = 5 + 0.4 * p + 0.05 * j; cols.end_stage[i] = fate === 'hit' ? 0 : 1; cols.collisions[i] = 0;
    }
    species.push({ population: p, mz: mzs[p], charge: 1, total: per, detected, hit: per - detected, alive: 0, transmission: detected / per });
  }
  flush();
  // Two batches of ions, to exercise batch concatenation on reading.
  const half = Math.floor(nIons / 2);
  const part = (s: number, e: number) => Object.fromEntries(Object.entries(cols).map(([k, v]) => [k, (v as ArrayLike<unknown> & { slice(a: number, b: number): unknown }).slice(s, e)]));
  w.appendIons(part(0, half) as unknown as typeof cols);
  w.appendIons(part(half, nIons) as unknown as typeof cols);
  let cooling: Record<string, unknown> | undefined;
  if (opt.history) {
    const n = 200, tau = 150e-6;
    const h = { t: new Float64Array(n), n_alive: new Float64Array(n), mean_ke_ev: new Float64Array(n), mean_ke_x_ev: new Float64Array(n),
      mean_ke_y_ev: new Float64Array(n), mean_ke_z_ev: new Float64Array(n), rms_radius_m: new Float64Array(n), rms_z_m: new Float64Array(n) };
    const kT = 0.0259; // 300 K in eV: the floor the cloud cools towards
    for (let k = 0; k < n; k++) {
      const t = k * 5e-6;
      const ke = kT * 1.5 + (3 - kT * 1.5) * Math.exp(-t / tau);
      h.t[k] = t; h.n_alive[k] = nIons; h.mean_ke_ev[k] = ke;
      h.mean_ke_x_ev[k] = ke / 3; h.mean_ke_y_ev[k] = ke / 3; h.mean_ke_z_ev[k] = ke / 3;
      h.rms_radius_m[k] = 1e-3 * Math.sqrt(ke / 3); h.rms_z_m[k] = 0.7e-3 * Math.sqrt(ke / 3);
    }
    w.writeHistory(h);
    cooling = { tau_s: tau, final_mean_ke_ev: h.mean_ke_ev[n - 1] };
  }
  const total = nIons;
  const det = species.reduce((s, x) => s + x.detected, 0);
  const summary: RunSummary = {
    complete: true,
    scene_name: String(sceneJson(trap).name),
    ions: { total, detected: det, hit: total - det, alive: 0 },
    species,
    stats: { steps: total * npts * 10, wall_s: 0.5 },
    warnings: [],
    provenance: {
      tool_version: '0.1.0', scene: sceneJson(trap), scene_file: trap ? 'scenes/skerry-t7.yaml' : 'scenes/skerry-qf4.yaml', seed: 42,
      command_line: 'iontrail run scenes/skerry-qf4.yaml -o out', integrator: { method: 'rk4', steps_per_cycle: 40 },
      workers: 1, started_at: '2026-01-01T00:00:00.000Z',
    },
    units: { length: 'm', time: 's', energy: 'eV' },
    ...(cooling ? { cooling } : {}),
  };
  await w.finish(summary);
  return summary;
}
