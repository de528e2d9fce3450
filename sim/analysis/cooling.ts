// Cooling figures from the ensemble history: exponential time constant of the mean kinetic
// energy, E(t) = E∞ + (E0 − E∞)·exp(−t/τ). E∞ is the mean over the last fifth of the run; τ is the
// least-squares slope of ln(E − E∞) against t over the samples whose excess is still clearly above
// the noise (between 90% and 5% of the first excess). Returns null when the energy does not fall.

export interface CoolingFit {
  tau_s: number | null;
  final_mean_ke_ev: number;
  initial_mean_ke_ev: number;
  plateau_mean_ke_ev: number;
}

export function fitCooling(t: ArrayLike<number>, ke: ArrayLike<number>): CoolingFit {
  const n = t.length;
  const idx: number[] = [];
  for (let i = 0; i < n; i++) if (Number.isFinite(ke[i])) idx.push(i);
  const last = idx.length ? ke[idx[idx.length - 1]] : NaN;
  const first = idx.length ? ke[idx[0]] : NaN;
  const tail = idx.slice(Math.floor(idx.length * 0.8));
  const plateau = tail.length ? tail.reduce((a, i) => a + ke[i], 0) / tail.length : NaN;
  const out: CoolingFit = { tau_s: null, final_mean_ke_ev: last, initial_mean_ke_ev: first, plateau_mean_ke_ev: plateau };
  const excess0 = first - plateau;
  if (!(excess0 > 0) || idx.length < 5) return out;
  let sx = 0, sy = 0, sxx = 0, sxy = 0, m = 0;
  for (const i of idx) {
    const e = ke[i] - plateau;
    if (e > 0.9 * excess0 || e < 0.05 * excess0) continue;
    const y = Math.log(e);
    sx += t[i]; sy += y; sxx += t[i] * t[i]; sxy += t[i] * y; m++;
  }
  if (m < 3) return out;
  const slope = (m * sxy - sx * sy) / (m * sxx - sx * sx);
  if (slope < 0) out.tau_s = -1 / slope;
  return out;
}
