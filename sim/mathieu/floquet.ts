// Floquet analysis of the Mathieu equation u'' + (a − 2q cos 2ξ) u = 0 (period π in ξ = Ωt/2).
// The monodromy matrix M = [[u1, u2], [u1', u2']](π) of the fundamental solutions
// (u1(0) = 1, u1'(0) = 0; u2(0) = 0, u2'(0) = 1) has det M = 1 (Liouville) and eigenvalues
// exp(±iπβ) with cos πβ = tr M / 2; motion is bounded iff |tr M| < 2
// (McLachlan, Theory and Application of Mathieu Functions, 1947, §4.70; Magnus & Winkler,
// Hill's Equation, 1966, §1.2).
//
// tr M fixes β only up to β → 2k ± β. The branch is fixed by two further facts:
//  * for elliptic M, sign(M12) = sign(sin πβ): M = P R(πβ) P⁻¹ with P ∈ SL(2) gives
//    M12 = sin(πβ)·(p11² + p12²), so β mod 2 lies in (0, 1) when u2(π) > 0 and in (1, 2) otherwise;
//  * β is the rotation number of the flow in the (u, u') plane: the Prüfer angle θ (u = r sin θ,
//    u' = r cos θ) of any solution advances by πβ ± less than π per period (rotation number of a
//    circle homeomorphism on R/πZ; Magnus & Winkler §2.1). Zeros of u are where θ crosses kπ, and
//    θ only increases there, so the advance is π·(zeros) + the end angle.
// Together these give β exactly (stable case) or the integer rotation number (unstable case).

import { Rk4 } from '../integrate/rk4.js';
import { Dopri5 } from '../integrate/dopri5.js';
import { odexIntegrate } from '../integrate/odex-reference.js';
import type { Derivative } from '../integrate/derivative.js';

export type MonodromyMethod = 'mathieu-rk4' | 'rk4' | 'dopri5' | 'odex';

export interface MonodromyOptions {
  /**
   * Integrator. 'mathieu-rk4' (default): classic RK4 written out for this equation, cosines by a
   * rotation recurrence (fastest); 'rk4': the generic Rk4 class; 'dopri5': our adaptive 5(4) code;
   * 'odex': the odex 2.0.4 reference. All four agree to ~1e-12 in tr M (test/mathieu).
   */
  method?: MonodromyMethod;
  /** RK4 steps per period; default chosen from |a| + 2|q| so that |Δ tr| ≲ 1e-11. */
  steps?: number;
  /** Tolerances for 'dopri5' and 'odex'; default 1e-13 (relative and absolute). */
  tol?: number;
}

export interface Monodromy {
  /** [[m11, m12], [m21, m22]] = [[u1(π), u2(π)], [u1'(π), u2'(π)]]. */
  m11: number; m12: number; m21: number; m22: number;
  trace: number;
  /** Prüfer-angle advance of u1 and u2 over one period, radians (each within π of πβ). */
  phase1: number; phase2: number;
}

export interface FloquetResult extends Monodromy {
  a: number;
  q: number;
  /** |tr M| < 2. */
  stable: boolean;
  /** Characteristic exponent β ≥ 0 when stable, null otherwise. */
  beta: number | null;
  /**
   * Rotation number (continuous in a for fixed q): equals β when stable, the integer k of the
   * instability gap otherwise (0 below a0, 1 between b1 and a1, 2 between b2 and a2, ...).
   * NaN when the solutions overflow within one period (|a|, |q| ≳ 1e4: deep in an unstable gap).
   */
  rotation: number;
}

// Mathieu right-hand side for y = [u1, u1', u2, u2'] with parameters set before each use.
let pa = 0, pq = 0;
const mathieu: Derivative = (t, y, d) => {
  const w = pa - 2 * pq * Math.cos(2 * t);
  d[0] = y[1]; d[1] = -w * y[0];
  d[2] = y[3]; d[3] = -w * y[2];
};

// Scratch, allocated once.
const state = new Float64Array(4);
const rk4 = new Rk4(4);
const dopri = new Dopri5(4);

/**
 * RK4 steps per period. Global RK4 error ≈ C (h ω)⁴ with ω² ≈ |a| + 2|q|; 1200·(1 + ω) steps keep
 * the trace error near 1e-12 for |a|, |q| ≲ 10 (checked against odex in test/mathieu).
 */
export function defaultSteps(a: number, q: number): number {
  return Math.ceil(1200 * (1 + Math.sqrt(Math.abs(a) + 2 * Math.abs(q))));
}

/** Monodromy matrix of the Mathieu equation over one period π. */
export function monodromy(a: number, q: number, options: MonodromyOptions = {}): Monodromy {
  if (!Number.isFinite(a) || !Number.isFinite(q)) throw new RangeError(`monodromy: a and q must be finite, got a=${a}, q=${q}`);
  const method = options.method ?? 'mathieu-rk4';
  const tol = options.tol ?? 1e-13;
  pa = a; pq = q;
  state[0] = 1; state[1] = 0; state[2] = 0; state[3] = 1;
  // Zero crossings of u1 and u2 (u2 starts at a zero; that one is not counted).
  let z1 = 0, z2 = 0;
  let s1 = 1, s2 = 1;
  const count = (y: Float64Array): void => {
    const n1 = y[0] > 0 ? 1 : y[0] < 0 ? -1 : s1;
    const n2 = y[2] > 0 ? 1 : y[2] < 0 ? -1 : s2;
    if (n1 !== s1) { z1++; s1 = n1; }
    if (n2 !== s2) { z2++; s2 = n2; }
  };
  if (method === 'mathieu-rk4') {
    const steps = options.steps ?? defaultSteps(a, q);
    const z = mathieuRk4(a, q, steps);
    z1 = z & 0xffff; z2 = z >>> 16;
  } else if (method === 'rk4') {
    const steps = options.steps ?? defaultSteps(a, q);
    const h = Math.PI / steps;
    for (let k = 0; k < steps; k++) {
      rk4.step(mathieu, k * h, state, h);
      count(state);
    }
  } else if (method === 'dopri5') {
    dopri.rtol = tol; dopri.atol = tol;
    // Cap the step so that no solution changes sign twice within one step (the zero count stays exact).
    dopri.maxStep = Math.PI / (8 * (1 + Math.sqrt(Math.abs(a) + 2 * Math.abs(q))));
    dopri.integrate(mathieu, 0, state, Math.PI, (_t0, _t1, y) => { count(y); });
  } else {
    // odex gives only the end state: take the zero counts from an RK4 pass at the default step.
    const r = odexIntegrate(mathieu, 0, [1, 0, 0, 1], Math.PI, { rtol: tol, atol: tol });
    const steps = defaultSteps(a, q);
    const h = Math.PI / steps;
    for (let k = 0; k < steps; k++) { rk4.step(mathieu, k * h, state, h); count(state); }
    state.set(r.y);
  }
  const [m11, m21, m12, m22] = state;
  return {
    m11, m12, m21, m22,
    trace: m11 + m22,
    phase1: pruferPhase(z1, m11, m21) - Math.PI / 2,
    phase2: pruferPhase(z2, m12, m22),
  };
}

/**
 * Classic RK4 (HNW I, Table II.1.2) for y = [u1, u1', u2, u2'], u'' = −w(ξ) u, w = a − 2q cos 2ξ,
 * over [0, π] in `steps` steps; leaves y(π) in `state` and returns the zero counts of u1 (low 16
 * bits) and u2 (high bits). cos 2ξ at ξ = kh/2 comes from rotating (cos, sin) by h each half
 * step, re-seeded from Math.cos every 256 steps so the recurrence's rounding stays below 1e-14.
 */
function mathieuRk4(a: number, q: number, steps: number): number {
  const h = Math.PI / steps, h2 = h / 2, h6 = h / 6;
  const cr = Math.cos(h), sr = Math.sin(h);
  let u1 = 1, v1 = 0, u2 = 0, v2 = 1;
  let z1 = 0, z2 = 0, s1 = 1, s2 = 1;
  let c = 1, s = 0; // cos 2ξ, sin 2ξ at the start of the step
  for (let k = 0; k < steps; k++) {
    if ((k & 255) === 0) { c = Math.cos(2 * k * h); s = Math.sin(2 * k * h); }
    const cm = c * cr - s * sr, sm = s * cr + c * sr; // at ξ + h/2
    const ce = cm * cr - sm * sr, se = sm * cr + cm * sr; // at ξ + h
    const w0 = a - 2 * q * c, wm = a - 2 * q * cm, w1 = a - 2 * q * ce;
    // solution 1
    let ku1 = v1, kv1 = -w0 * u1;
    let ku2 = v1 + h2 * kv1, kv2 = -wm * (u1 + h2 * ku1);
    let ku3 = v1 + h2 * kv2, kv3 = -wm * (u1 + h2 * ku2);
    let ku4 = v1 + h * kv3, kv4 = -w1 * (u1 + h * ku3);
    u1 += h6 * (ku1 + 2 * (ku2 + ku3) + ku4);
    v1 += h6 * (kv1 + 2 * (kv2 + kv3) + kv4);
    // solution 2
    ku1 = v2; kv1 = -w0 * u2;
    ku2 = v2 + h2 * kv1; kv2 = -wm * (u2 + h2 * ku1);
    ku3 = v2 + h2 * kv2; kv3 = -wm * (u2 + h2 * ku2);
    ku4 = v2 + h * kv3; kv4 = -w1 * (u2 + h * ku3);
    u2 += h6 * (ku1 + 2 * (ku2 + ku3) + ku4);
    v2 += h6 * (kv1 + 2 * (kv2 + kv3) + kv4);
    const n1 = u1 > 0 ? 1 : u1 < 0 ? -1 : s1;
    const n2 = u2 > 0 ? 1 : u2 < 0 ? -1 : s2;
    if (n1 !== s1) { z1++; s1 = n1; }
    if (n2 !== s2) { z2++; s2 = n2; }
    c = ce; s = se;
  }
  state[0] = u1; state[1] = v1; state[2] = u2; state[3] = v2;
  return Math.min(z1, 0xffff) | (Math.min(z2, 0xffff) << 16);
}

/** Continuous Prüfer angle after `zeros` zero crossings, ending at (u, u'). */
function pruferPhase(zeros: number, u: number, du: number): number {
  // θ ∈ (kπ, (k+1)π) after k crossings when u ≠ 0; at u = 0 exactly θ = kπ.
  if (u === 0) return zeros * Math.PI;
  const s = u > 0 ? 1 : -1;
  return zeros * Math.PI + Math.atan2(s * u, s * du);
}

/** Stability, β and rotation number of (a, q). */
export function floquet(a: number, q: number, options: MonodromyOptions = {}): FloquetResult {
  const m = monodromy(a, q, options);
  const half = m.trace / 2;
  const estimate = (m.phase1 + m.phase2) / (2 * Math.PI); // within 1 of the rotation number
  if (!Number.isFinite(half)) return { ...m, a, q, stable: false, beta: null, rotation: NaN };
  const stable = Math.abs(half) < 1;
  let rotation: number;
  let beta: number | null = null;
  if (stable) {
    const x = Math.acos(half) / Math.PI; // in (0, 1)
    const frac = m.m12 > 0 ? x : 2 - x; // β mod 2
    rotation = frac + 2 * Math.round((estimate - frac) / 2);
    beta = rotation;
  } else {
    // Integer rotation: even in gaps where tr ≥ 2, odd where tr ≤ −2.
    const parity = half >= 1 ? 0 : 1;
    rotation = parity + 2 * Math.round((estimate - parity) / 2);
    if (rotation < 0) rotation = 0;
  }
  return { ...m, a, q, stable, beta, rotation };
}

/** tr M / 2 only (the discriminant), for root finding. */
export function halfTrace(a: number, q: number, options: MonodromyOptions = {}): number {
  return monodromy(a, q, options).trace / 2;
}
