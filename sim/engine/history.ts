// Ensemble history on a fixed time grid t_k = k·every (k = 0..K): sums over the ions alive at t_k
// of kinetic energy (total and per axis), r² = x² + y², z and z². Sums are kept per batch and
// added in batch order, so the result does not depend on the number of workers.

import { ELECTRONVOLT } from '../units/constants.js';

export const HISTORY_FIELDS = ['n', 'ke', 'kex', 'key', 'kez', 'r2', 'z', 'z2'] as const;
const NF = HISTORY_FIELDS.length;

export class EnsembleHistory {
  readonly every: number;
  readonly points: number;
  /** points × NF sums, row-major. */
  readonly sums: Float64Array;

  constructor(every: number, maxTime: number, sums?: Float64Array) {
    this.every = every;
    this.points = Math.floor(maxTime / every + 1e-9) + 1;
    this.sums = sums ?? new Float64Array(this.points * NF);
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
  }

  merge(other: Float64Array): void {
    for (let i = 0; i < this.sums.length; i++) this.sums[i] += other[i];
  }

  /** Columns for history.arrow: means over the ions alive at each grid time. */
  table() {
    const K = this.points;
    const cols = {
      t: new Float64Array(K), n_alive: new Float64Array(K), mean_ke_ev: new Float64Array(K),
      mean_ke_x_ev: new Float64Array(K), mean_ke_y_ev: new Float64Array(K), mean_ke_z_ev: new Float64Array(K),
      rms_radius_m: new Float64Array(K), rms_z_m: new Float64Array(K),
    };
    for (let k = 0; k < K; k++) {
      const o = k * NF;
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
