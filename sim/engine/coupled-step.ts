// The step of a coupled (space-charge) run. With RF stages it divides the fastest RF period into
// run.steps_per_cycle steps, as the uncoupled kernels do. Without RF, the stages give no time
// scale, so the ions do: the smaller of
//   the plasma period T_p = 2π/ω_p, ω_p² = n q² /(ε0 m) (n the real-ion density of the cloud as a
//   uniform ellipsoid of the same second moments, semi-axes √5 σ; q²/m the largest of the ions),
//   divided by PLASMA_STEPS, and
//   the time a pair of macro-ions at the mean nearest-neighbour distance a = 0.554 n_s^(−1/3)
//   (n_s the macro-ion density; the mean nearest-neighbour distance Γ(4/3)(4πn_s/3)^(−1/3) of a
//   Poisson distribution, S. Chandrasekhar, Rev. Mod. Phys. 15, 1 (1943), ch. VI, quoted from memory) takes to push each other apart, t_a = √(4π ε0 (m/2) a³ / (w q²)),
//   divided by PAIR_STEPS,
// unless run.step_without_rf sets it. The chosen bound is named in provenance; a step coarser than
// a tenth of the plasma period, then or later in the run (the cloud may be compressed, at a
// reflectron's turn or a time focus), gives a warning.

import { VACUUM_PERMITTIVITY } from '../units/constants.js';
import type { Ensemble } from '../spacecharge/ensemble-step.js';

/**
 * Steps per plasma period: Störmer–Verlet on an oscillation of period T has a phase error of
 * (2π h/T)²/24 per radian, 6.6e-4 at 50 steps (Hairer, Lubich & Wanner 2006, Sect. I.1.4).
 */
export const PLASMA_STEPS = 50;
/**
 * Steps while a neighbour pair separates: the Verlet energy error of the pair's push is about
 * (h/t_a)²/12 ≈ 1e-3 at 10 steps (Hairer, Lubich & Wanner 2006, Sect. I.1.4: second order), small
 * beside the cloud's collective energy; closer pairs are rarer and softened.
 */
export const PAIR_STEPS = 10;
/** A step above T_p / COARSE_PLASMA_STEPS resolves the collective motion poorly: a warning. */
export const COARSE_PLASMA_STEPS = 10;
/** At least this many steps over max_time, so that the run samples the flight at all. */
export const MIN_STEPS = 20;

export interface CoupledStep {
  /** Step, s: max_time / steps. */
  h: number;
  steps: number;
  /** What set it. */
  from: 'rf' | 'plasma frequency' | 'closest approach' | 'run.step_without_rf' | 'max_time';
  /** Plasma period of the starting cloud, s, and mean nearest-neighbour distance, m (null: undefined, fewer than 2 ions or a flat cloud). */
  plasma_period_s: number | null;
  nearest_neighbour_m: number | null;
  /** Separation time of a neighbour pair, s. */
  pair_time_s: number | null;
}

export interface CloudScales { plasmaPeriod: number; nearest: number; pairTime: number }

/** Plasma period, nearest-neighbour distance and pair time of the ions in the cloud; null for fewer than 2 or a flat cloud. */
export function cloudScales(e: Ensemble, weight: number): CloudScales | null {
  let n = 0, cx = 0, cy = 0, cz = 0, q2m = 0, mOfQ2m = 0;
  for (let i = 0; i < e.n; i++) if (e.alive[i]) {
    n++; cx += e.x[i]; cy += e.y[i]; cz += e.z[i];
    const k = (e.charge[i] * e.charge[i]) / e.mass[i];
    if (k > q2m) { q2m = k; mOfQ2m = e.mass[i]; }
  }
  if (n < 2) return null;
  cx /= n; cy /= n; cz /= n;
  let sx = 0, sy = 0, sz = 0;
  for (let i = 0; i < e.n; i++) if (e.alive[i]) {
    sx += (e.x[i] - cx) ** 2; sy += (e.y[i] - cy) ** 2; sz += (e.z[i] - cz) ** 2;
  }
  // Uniform ellipsoid with semi-axes √5 σ_k: the same second moments.
  const vol = (4 / 3) * Math.PI * 5 ** 1.5 * Math.sqrt((sx / n) * (sy / n) * (sz / n));
  if (!(vol > 0)) return null;
  const ns = n / vol;
  const omegaP = Math.sqrt((weight * ns * q2m) / VACUUM_PERMITTIVITY);
  const nearest = 0.554 * Math.cbrt(1 / ns);
  const q2 = q2m * mOfQ2m;
  const pairTime = Math.sqrt((4 * Math.PI * VACUUM_PERMITTIVITY * 0.5 * mOfQ2m * nearest ** 3) / (weight * q2));
  return { plasmaPeriod: (2 * Math.PI) / omegaP, nearest, pairTime };
}

/**
 * The coupled step for a run to maxTime. `rfHz`: the fastest RF frequency of the scene's stages
 * (undefined without RF); `given`: run.step_without_rf when the scene sets it.
 */
export function chooseCoupledStep(e: Ensemble, weight: number, maxTime: number, stepsPerCycle: number,
  rfHz: number | undefined, given: number | undefined): CoupledStep {
  const sc = cloudScales(e, weight);
  let h: number, from: CoupledStep['from'];
  if (rfHz !== undefined) { h = 1 / (stepsPerCycle * rfHz); from = 'rf'; }
  else if (given !== undefined) { h = given; from = 'run.step_without_rf'; }
  else {
    h = maxTime / MIN_STEPS; from = 'max_time';
    if (sc && sc.plasmaPeriod / PLASMA_STEPS < h) { h = sc.plasmaPeriod / PLASMA_STEPS; from = 'plasma frequency'; }
    if (sc && sc.pairTime / PAIR_STEPS < h) { h = sc.pairTime / PAIR_STEPS; from = 'closest approach'; }
  }
  // The last step lands on max_time (as sim/spacecharge/ensemble-step.ts runEnsemble does).
  const steps = Math.max(1, Math.ceil(maxTime / h - 1e-9));
  return {
    h: maxTime / steps, steps, from,
    plasma_period_s: sc ? sc.plasmaPeriod : null, nearest_neighbour_m: sc ? sc.nearest : null, pair_time_s: sc ? sc.pairTime : null,
  };
}

/** The warning for a step coarser than T_p / COARSE_PLASMA_STEPS at time t, or null. */
export function coarseStepWarning(h: number, sc: CloudScales | null, t: number): string | null {
  if (sc === null || !(h > sc.plasmaPeriod / COARSE_PLASMA_STEPS)) return null;
  const ns = (s: number) => `${Number((s * 1e9).toPrecision(3))} ns`;
  return `space_charge: the coupled step ${ns(h)} is coarser than a ${COARSE_PLASMA_STEPS}th of the cloud's plasma period (${ns(sc.plasmaPeriod)} at t = ${ns(t)}): the collective motion is poorly resolved; use a step below ${ns(sc.plasmaPeriod / PLASMA_STEPS)} (run.step_without_rf without RF, more run.steps_per_cycle with RF)`;
}
