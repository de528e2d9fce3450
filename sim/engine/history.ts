// Ensemble history on a fixed time grid t_k = k·every (k = 0..K): sums over the ions alive at t_k
// of kinetic energy (total and per axis), r² = x² + y², z and z². Sums are kept per batch and
// added in batch order, so the result does not depend on the number of workers.

import { ELECTRONVOLT } from '../units/constants.js';

export const HISTORY_FIELDS = ['n', 'ke', 'kex', 'key', 'kez', 'r2', 'z', 'z2'] as const;
const NF = HISTORY_FIELDS.length;

export class EnsembleHistory {
  readonly every: number;
  readonly points: number;
  /** Populations with their own sums (0: only the whole ensemble). */
  readonly populations: number;
  /**
   * points × NF sums, row-major, for the whole ensemble; then, with several populations, one such
   * block per population (the whole-ensemble block keeps its own running sums, so its figures do
   * not depend on how the ions are split into species).
   */
  readonly sums: Float64Array;
  /** Population of the ion being sampled (set by the engine as each ion starts). */
  population = 0;

  constructor(every: number, maxTime: number, populations = 1) {
    this.every = every;
    this.points = Math.floor(maxTime / every + 1e-9) + 1;
    this.populations = populations > 1 ? populations : 0;
    this.sums = new Float64Array(this.points * NF * (1 + this.populations));
  }

  /** First grid index at or after time t. */
  indexAtOrAfter(t: number): number {
    return Math.ceil(t / this.every - 1e-9);
  }

  timeOf(k: number): number {
    return k * this.every;
  }

  add(k: number, m: number, x: number, y: number, z: number, vx: number, vy: number, vz: number): void {
    if (k < 0 || k >= this.points) return;
    const o = k * NF;
    const s = this.sums;
    const hm = (0.5 * m) / ELECTRONVOLT;
    const ex = hm * vx * vx, ey = hm * vy * vy, ez = hm * vz * vz;
    s[o] += 1;
    s[o + 1] += ex + ey + ez;
    s[o + 2] += ex;
    s[o + 3] += ey;
    s[o + 4] += ez;
    s[o + 5] += x * x + y * y;
    s[o + 6] += z;
    s[o + 7] += z * z;
    if (this.populations > 0) {
      const q = (1 + this.population) * this.points * NF + o;
      s[q] += 1; s[q + 1] += ex + ey + ez; s[q + 2] += ex; s[q + 3] += ey; s[q + 4] += ez;
      s[q + 5] += x * x + y * y; s[q + 6] += z; s[q + 7] += z * z;
    }
  }

  merge(other: Float64Array): void {
    if (other.length === 0) return; // a coupled run keeps no ensemble history
    for (let i = 0; i < this.sums.length; i++) this.sums[i] += other[i];
  }

  /** Columns for history.arrow: means over the ions alive at each grid time. */
  table() {
    return this.block(0);
  }

  /**
   * history_species.arrow: the same means per population, rows population-major, or null with
   * a single population (history.arrow is then that population's).
   */
  speciesTable() {
    if (this.populations === 0) return null;
    const K = this.points, P = this.populations;
    const out = { population: new Int32Array(K * P), t: new Float64Array(K * P), n_alive: new Float64Array(K * P), mean_ke_ev: new Float64Array(K * P), rms_radius_m: new Float64Array(K * P), rms_z_m: new Float64Array(K * P) };
    for (let p = 0; p < P; p++) {
      const b = this.block(1 + p);
      out.population.fill(p, p * K, (p + 1) * K);
      out.t.set(b.t, p * K); out.n_alive.set(b.n_alive, p * K); out.mean_ke_ev.set(b.mean_ke_ev, p * K);
      out.rms_radius_m.set(b.rms_radius_m, p * K); out.rms_z_m.set(b.rms_z_m, p * K);
    }
    return out;
  }

  private block(blk: number) {
    const K = this.points;
    const cols = {
      t: new Float64Array(K), n_alive: new Float64Array(K), mean_ke_ev: new Float64Array(K),
      mean_ke_x_ev: new Float64Array(K), mean_ke_y_ev: new Float64Array(K), mean_ke_z_ev: new Float64Array(K),
      rms_radius_m: new Float64Array(K), rms_z_m: new Float64Array(K),
    };
    const base = blk * K * NF;
    for (let k = 0; k < K; k++) {
      const o = base + k * NF;
      const s = this.sums;
      const n = s[o];
      cols.t[k] = this.timeOf(k);
      cols.n_alive[k] = n;
      const inv = n > 0 ? 1 / n : NaN;
      cols.mean_ke_ev[k] = s[o + 1] * inv;
      cols.mean_ke_x_ev[k] = s[o + 2] * inv;
      cols.mean_ke_y_ev[k] = s[o + 3] * inv;
      cols.mean_ke_z_ev[k] = s[o + 4] * inv;
      cols.rms_radius_m[k] = Math.sqrt(s[o + 5] * inv);
      const mz = s[o + 6] * inv;
      cols.rms_z_m[k] = Math.sqrt(Math.max(0, s[o + 7] * inv - mz * mz));
    }
    return cols;
  }
}
