// Transfer matrices of one axis of the ideal quadrupole over one RF period. In the RF phase
// θ = Ω t + φ (d/dθ, scaled U = u/r0) the axis obeys Hill's equation
//   U'' = −w(θ) U,   w(θ) = s·(a/4 + (q/2) cos θ),   s = +1 for x, −1 for y,
// which is the Mathieu form u'' + (a − 2q cos 2ξ) u = 0 with ξ = θ/2 shifted by half a period
// (Dawson, Quadrupole Mass Spectrometry and its Applications, 1976, eq. 2.6–2.9). The motion is
// linear, so the state after any time is a 2×2 matrix times the start state:
//   F(θ) = propagator from phase 0 to θ,   F(θ + 2π) = F(θ)·M0,   M0 = F(2π) (monodromy),
//   state at phase θ from phase ψ:  w(θ) = F(θ) F(ψ)⁻¹ w(ψ)
// (Magnus & Winkler, Hill's Equation, 1966, §1.2). F is tabulated once per (a, q) on a grid of
// S points per check interval (M checks per period, M = steps_per_cycle, matching the direct
// kernel's check times), with classic RK4 sub-steps (Hairer, Nørsett & Wanner, Solving ODEs I,
// Table II.1.2); an arbitrary phase is one short RK4 step (≤ 2π/(M·S)) away from a grid point.
//
// For a stable axis the Courant–Snyder form I = γU² + 2αUU' + βU'² (Courant & Snyder, Ann. Phys.
// 3, 1, 1958, eq. 3.13) is invariant under M0, so over any number of periods |U(θ)| ≤ √(I·W(θ))
// with W = first row of F in the dual form (βF11² − 2αF11F12 + γF12²). Its maximum over the grid,
// Wmax, bounds the excursion at every time of the stage without stepping a single period.

export interface PeriodTable {
  /** Checks per period M and grid points per check interval S; grid size n = M·S over 2π. */
  checks: number;
  sub: number;
  n: number;
  /** Grid spacing in phase, rad. */
  dTheta: number;
  /** a/4 and q/2 with the axis sign s folded in: w(θ) = w0 + w1 cos θ. */
  w0: number;
  w1: number;
  /** F(θ_i), i = 0..n, θ_i = i·dTheta: [[f11, f12], [f21, f22]] in (U, dU/dθ). */
  f11: Float64Array; f12: Float64Array; f21: Float64Array; f22: Float64Array;
  /** cos θ_i, sin θ_i. */
  cos: Float64Array; sin: Float64Array;
  /** Monodromy M0 = F(2π). */
  m11: number; m12: number; m21: number; m22: number;
  /** |tr M0| < 2. */
  stable: boolean;
  /** Courant–Snyder parameters (stable only; else NaN). */
  beta: number; alpha: number; gamma: number;
  /** Largest W(θ_i) over the grid (stable only; else Infinity). */
  wMax: number;
  /**
   * W(θ_i), i = 0..n (stable only). W is 2π-periodic (the form is M0-invariant), and between
   * grid points it stays below (1 + 1e-3)·max of the two ends (see ENVELOPE_MARGIN in
   * linear-path.ts), so a check's envelope is bounded without computing its row.
   */
  w: Float64Array;
  /**
   * How far W can rise between grid points above the larger of the two ends (stable only; else
   * Infinity): W ≤ linear interpolation + max|W''|·δθ²/8, and max|Δ²W|/4 over the grid covers
   * that with a factor 2 for the curvature between samples (as for SpectralRows).
   */
  wMargin: number;
  /**
   * max(W(θ_i), W(θ_i+1)) + wMargin, i = 0..n−1 (stable only): the envelope factor of any phase
   * in [θ_i, θ_i+1], one load per check.
   */
  wUp: Float64Array;
  /** Largest F11² + F12² over the grid. */
  rowMax: number;
  /**
   * An ellipse holding the curve of first rows r(θ) = (F11, F12) over the period: r·E⁻¹·r ≤ 1 on
   * the grid, E = ell·(second-moment matrix of the curve). Its support function gives, for any
   * phase-0 state d, U(θ)² = (r·d)² ≤ d·E·d = e11 d1² + 2 e12 d1 d2 + e22 d2² (Cauchy–Schwarz in
   * the E-metric), a bound far tighter than rowMax·|d|² when the curve is elongated.
   */
  e11: number; e12: number; e22: number;
  /**
   * Unstable only (else NaN): eigenvalues λ (|λ| > 1) and 1/λ of M0 with eigenvectors v1, v2;
   * (A, B) = V⁻¹·c are the coordinates of a state c, so d_k = Aλ^k v1 + Bλ^−k v2; h1, h2 bound
   * |r(θ)·v1|, |r(θ)·v2| over the grid (Magnus & Winkler §1.2: hyperbolic monodromy).
   */
  /**
   * Stable only (else NaN): rotation per period in Courant–Snyder normalized coordinates
   * z = L·d (Q = LᵀL, L = [[1/√β, 0], [α/√β, √β]]), reduced mod π to (−π/2, π/2]: the check
   * values U = ρ·z = |ρ||z|cos(angle z − angle ρ) enter as U², which has period π in the angle.
   */
  muEff: number;
  lambda: number;
  vi11: number; vi12: number; vi21: number; vi22: number;
  h1: number; h2: number;
  /**
   * Powers M0^k, k = 0..powCount−1, as (m11, m12, m21, m22) at pow[4k..4k+3], filled on demand by
   * powers(): each one product from the previous (the same products as period-by-period stepping).
   */
  pow: Float64Array;
  powCount: number;
  /** Spectral rows of an unstable axis (spectralRows()); null until asked for. */
  spectral: SpectralRows | null;
  /** Courant–Snyder form at every grid phase of a stable axis (twissRows()); null until asked for. */
  twiss: TwissRows | null;
}

/**
 * Stable axis: the invariant of a state w taken at phase θ, I = c·Q0·c with c = F(θ)⁻¹·w, is
 * the quadratic form I = w·Q(θ)·w, Q(θ) = F(θ)⁻ᵀ·Q0·F(θ)⁻¹ (Q0 = [[γ, α], [α, β]]). Q is
 * 2π-periodic (M0ᵀ-invariance of Q0) and smooth, so linear interpolation on the grid serves,
 * with e11, e12, e22 bounding its error per entry (as for SpectralRows).
 */
export interface TwissRows {
  q11: Float64Array; q12: Float64Array; q22: Float64Array;
  e11: number; e12: number; e22: number;
}

/**
 * Unstable axis: the first rows of the spectral projectors of the monodromy from phase θ,
 * M_θ = F(θ)·M0·F(θ)⁻¹ = λ·Π1(θ) + λ⁻¹·Π2(θ), Π_j(θ) = F(θ)·v_j·u_j·F(θ)⁻¹ (v_j, u_j the right
 * and left eigenvectors of M0, u_j·v_k = δ_jk). So from a start state w at phase ψ the sample
 * after K whole periods is U_K = λ^K·(p1(ψ)·w) + λ^−K·(p2(ψ)·w), p_j the first row of Π_j. The
 * rows are 2π-periodic (the factors λ^(θ/2π) of v_j and u_j cancel) and smooth, so linear
 * interpolation on the grid serves, with `err1`, `err2` bounding its error per unit |w|₁.
 */
export interface SpectralRows {
  /** p1 = (a1, b1), p2 = (a2, b2) at the grid points i = 0..n. */
  a1: Float64Array; b1: Float64Array; a2: Float64Array; b2: Float64Array;
  err1: number; err2: number;
  /** λ^k (signed), k = 0..count−1, while |λ|^k ≤ 1e150. */
  lamPow: Float64Array;
  count: number;
}

/**
 * RK4 sub-steps per grid interval when building the table: one, step 2π/n ≤ 2π/640. Measured
 * against odex 2.0.4 (rtol 1e-13) at eight points of the first region (|a| ≤ 0.25, q ≤ 0.95):
 * M0 within 2e-10 and |det M0 − 1| < 1e-12; test/sweep checks tr M0 and F(θ) against odex and
 * sim/mathieu at 1e-9. That is five orders below the direct kernel's own RK4 error at 40 steps
 * per cycle (~1e-5 per cycle), so the table does not decide any fate the direct kernel would not.
 */
const INNER = 1;

/** cos and sin on a grid (cached per size: shared by every table of a sweep). */
const trig = new Map<number, { cos: Float64Array; sin: Float64Array }>();
function trigTable(n: number): { cos: Float64Array; sin: Float64Array } {
  let t = trig.get(n);
  if (!t) {
    const cos = new Float64Array(n + 1), sin = new Float64Array(n + 1);
    for (let i = 0; i <= n; i++) { cos[i] = Math.cos((2 * Math.PI * i) / n); sin[i] = Math.sin((2 * Math.PI * i) / n); }
    t = { cos, sin };
    trig.set(n, t);
  }
  return t;
}

/**
 * Table of one axis. `a`, `q` are this axis's Mathieu parameters (y: −a, −q); `checks` = M.
 * The default S keeps the grid at ≥ 640 points per period (spacing ≤ 2π/640, which the error
 * bounds of rowAt, fAtGrid and smallAngle assume). Cost: n·INNER/2 RK4 steps on two solutions.
 */
export function periodTable(a: number, q: number, checks: number, sub = Math.max(16, Math.ceil(640 / checks)), reuse?: PeriodTable): PeriodTable {
  const n = checks * sub;
  const dTheta = (2 * Math.PI) / n;
  const w0 = a / 4, w1 = q / 2;
  // A table of the same size handed back by a finished point lends its arrays (no garbage per point).
  const same = reuse !== undefined && reuse.n === n;
  const f11 = same ? reuse.f11 : new Float64Array(n + 1), f12 = same ? reuse.f12 : new Float64Array(n + 1);
  const f21 = same ? reuse.f21 : new Float64Array(n + 1), f22 = same ? reuse.f22 : new Float64Array(n + 1);
  const wGrid = same ? reuse.w : new Float64Array(n + 1), wUp = same ? reuse.wUp : new Float64Array(n + 1);
  const { cos, sin } = trigTable(n);
  // cos at the RK4 stage points: grid/(2·INNER) spacing.
  const fine = trigTable(2 * INNER * n).cos;
  // Columns: solution 1 (U = 1, U' = 0) and solution 2 (U = 0, U' = 1), integrated over the
  // first half period only. w is even in θ, so U(−θ) solves the same equation: F(−θ) = R·F(θ)·R
  // with R = diag(1, −1), hence F(2π − θ) = R·F(θ)·R·M0 and, at θ = π, M0 = R·F(π)⁻¹·R·F(π)
  // (Magnus & Winkler, Hill's Equation, 1966, §1.3, even coefficient). n is even (S ≥ 16).
  let u1 = 1, p1 = 0, u2 = 0, p2 = 1;
  f11[0] = 1; f12[0] = 0; f21[0] = 0; f22[0] = 1;
  const h = dTheta / INNER, nh = n / 2;
  for (let i = 0; i < nh; i++) {
    for (let s = 0; s < INNER; s++) {
      const j = 2 * (INNER * i + s);
      const g0 = w0 + w1 * fine[j], g1 = w0 + w1 * fine[j + 1], g2 = w0 + w1 * fine[j + 2];
      rk4Step(u1, p1, g0, g1, g2, h); u1 = RK[0]; p1 = RK[1];
      rk4Step(u2, p2, g0, g1, g2, h); u2 = RK[0]; p2 = RK[1];
    }
    // Rows of F: first row = positions of the two solutions, second = their slopes.
    f11[i + 1] = u1; f12[i + 1] = u2; f21[i + 1] = p1; f22[i + 1] = p2;
  }
  // R·F(π)⁻¹·R = [[f22, f12], [f21, f11]] (det F = 1 up to the table's error).
  const m11 = u2 * p1 + u1 * p2, m12 = 2 * p2 * u2, m21 = 2 * p1 * u1, m22 = m11;
  for (let i = nh + 1; i <= n; i++) {
    const k = n - i, a11 = f11[k], a12 = -f12[k], a21 = -f21[k], a22 = f22[k];
    f11[i] = a11 * m11 + a12 * m21; f12[i] = a11 * m12 + a12 * m22;
    f21[i] = a21 * m11 + a22 * m21; f22[i] = a21 * m12 + a22 * m22;
  }
  const half = 0.5 * (m11 + m22);
  const stable = Math.abs(half) < 1;
  let beta = NaN, alpha = NaN, gamma = NaN, wMax = Infinity, rowMax = 0;
  let s11 = 0, s12 = 0, s22 = 0;
  for (let i = 0; i < n; i++) {
    rowMax = Math.max(rowMax, f11[i] * f11[i] + f12[i] * f12[i]);
    s11 += f11[i] * f11[i]; s12 += f11[i] * f12[i]; s22 += f12[i] * f12[i];
  }
  if (stable) {
    // M0 = I cos μ + J sin μ, J = [[α, β], [−γ, −α]]; the sign of sin μ makes β > 0.
    const sinMu = Math.sign(m12) * Math.sqrt(Math.max(0, 1 - half * half));
    beta = m12 / sinMu;
    alpha = (m11 - m22) / (2 * sinMu);
    gamma = -m21 / sinMu;
  }
  let muEff = NaN;
  if (stable) {
    // N = L·M0·L⁻¹ is a rotation; its angle is the phase advance per period.
    const sb = Math.sqrt(beta);
    const l11 = 1 / sb, l21 = alpha / sb, l22 = sb;
    const i11 = sb, i21 = -alpha / sb;
    // M0·L⁻¹ first column.
    const a11 = m11 * i11 + m12 * i21, a21 = m21 * i11 + m22 * i21;
    const n11 = l11 * a11, n21 = l21 * a11 + l22 * a21;
    const mu = Math.atan2(n21, n11);
    muEff = mu - Math.PI * Math.round(mu / Math.PI);
  }
  let lambda = NaN, vi11 = NaN, vi12 = NaN, vi21 = NaN, vi22 = NaN, h1 = NaN, h2 = NaN;
  let e1 = 0, e2 = 0, o1 = 0, o2 = 0;
  const growing = !stable && Number.isFinite(half);
  if (growing) {
    const root = Math.sqrt(half * half - 1);
    lambda = half + Math.sign(half) * root;
    const mu = 1 / lambda;
    // Eigenvector of λ: (m12, λ − m11) or (λ − m22, m21), whichever is larger (conditioning).
    const ev = (l: number): [number, number] => {
      const a1 = m12, a2 = l - m11, b1 = l - m22, b2 = m21;
      const v = Math.hypot(a1, a2) >= Math.hypot(b1, b2) ? [a1, a2] : [b1, b2];
      const nv = Math.hypot(v[0], v[1]);
      return [v[0] / nv, v[1] / nv];
    };
    [e1, e2] = ev(lambda); [o1, o2] = ev(mu);
    const det = e1 * o2 - o1 * e2;
    vi11 = o2 / det; vi12 = -o1 / det; vi21 = -e2 / det; vi22 = e1 / det;
    h1 = 0; h2 = 0;
  }
  // One pass over the grid: the moment ellipse scaled until it holds every grid point
  // (ell = max r·S⁻¹·r), Wmax (stable) and h1, h2 (growing).
  const sd = s11 * s22 - s12 * s12;
  let ell = 0;
  if (stable) wMax = 0;
  for (let i = 0; i <= n; i++) {
    const a = f11[i], b = f12[i];
    const v = (s22 * a * a - 2 * s12 * a * b + s11 * b * b) / sd;
    if (v > ell) ell = v;
    if (stable) {
      const w = beta * a * a - 2 * alpha * a * b + gamma * b * b;
      wGrid[i] = w;
      if (w > wMax) wMax = w;
    } else if (growing) {
      const r1 = Math.abs(a * e1 + b * e2), r2 = Math.abs(a * o1 + b * o2);
      if (r1 > h1) h1 = r1;
      if (r2 > h2) h2 = r2;
    }
  }
  const e11 = ell * s11, e12 = ell * s12, e22 = ell * s22;
  let wMargin = Infinity;
  if (stable) {
    wMargin = interpolationBound(wGrid, n);
    for (let i = 0; i < n; i++) wUp[i] = (wGrid[i] > wGrid[i + 1] ? wGrid[i] : wGrid[i + 1]) + wMargin;
    wUp[n] = wUp[0];
  }
  return {
    checks, sub, n, dTheta, w0, w1, f11, f12, f21, f22, cos, sin, m11, m12, m21, m22, stable,
    beta, alpha, gamma, wMax, w: wGrid, wMargin, wUp, rowMax, e11, e12, e22, muEff, lambda, vi11, vi12, vi21, vi22, h1, h2,
    pow: reuse?.pow ?? new Float64Array(0), powCount: 0,
    spectral: null,
    twiss: null,
  };
}

const spareTwiss: TwissRows[] = [];

/** Hands a finished table's Courant–Snyder rows back for reuse. */
export function releaseTwiss(t: PeriodTable): void {
  if (t.twiss !== null && spareTwiss.length < 4) spareTwiss.push(t.twiss);
  t.twiss = null;
}

/**
 * Largest |second difference| of a 2π-periodic g over the grid (g(θ_−1) = g(θ_n−1)), divided by
 * 4: linear interpolation errs by at most max|g''|·δθ²/8, the second differences estimate
 * max|g''|·δθ², and the factor 2 covers the curvature between samples.
 */
function interpolationBound(g: Float64Array, n: number): number {
  let d = Math.abs(g[1] - 2 * g[0] + g[n - 1]);
  for (let i = 1; i < n; i++) {
    const v = Math.abs(g[i + 1] - 2 * g[i] + g[i - 1]);
    if (v > d) d = v;
  }
  return d / 4;
}

/** The Courant–Snyder form at the grid phases of a stable table (see TwissRows). */
export function twissRows(t: PeriodTable): TwissRows {
  if (!t.stable) throw new Error('Courant–Snyder rows need a stable axis');
  if (t.twiss !== null) return t.twiss;
  const n = t.n;
  let r = spareTwiss.pop();
  if (r === undefined || r.q11.length !== n + 1) {
    r = { q11: new Float64Array(n + 1), q12: new Float64Array(n + 1), q22: new Float64Array(n + 1), e11: 0, e12: 0, e22: 0 };
  }
  const { f11, f12, f21, f22, gamma, alpha, beta } = t;
  for (let i = 0; i <= n; i++) {
    const det = f11[i] * f22[i] - f12[i] * f21[i];
    // F⁻¹ = adj(F)/det.
    const g11 = f22[i] / det, g12 = -f12[i] / det, g21 = -f21[i] / det, g22 = f11[i] / det;
    r.q11[i] = g11 * g11 * gamma + 2 * g11 * g21 * alpha + g21 * g21 * beta;
    r.q12[i] = g11 * g12 * gamma + (g11 * g22 + g21 * g12) * alpha + g21 * g22 * beta;
    r.q22[i] = g12 * g12 * gamma + 2 * g12 * g22 * alpha + g22 * g22 * beta;
  }
  r.e11 = interpolationBound(r.q11, n); r.e12 = interpolationBound(r.q12, n); r.e22 = interpolationBound(r.q22, n);
  t.twiss = r;
  return r;
}

/** Spare spectral rows, keyed by grid size, for the next point's unstable tables. */
const spareSpectral: SpectralRows[] = [];

/** Hands a finished table's spectral rows back for reuse. */
export function releaseSpectral(t: PeriodTable): void {
  if (t.spectral !== null && spareSpectral.length < 4) spareSpectral.push(t.spectral);
  t.spectral = null;
}

/**
 * The spectral rows of an unstable table (see SpectralRows), with λ^k up to kMax. The
 * interpolation bound: linear interpolation errs by at most max|g''|·δθ²/8 between grid points;
 * the largest second difference on the grid estimates max|g''|·δθ², and a factor 2 covers the
 * curvature between samples, so err = max|Δ²g|/4 over both components (per unit |w|₁).
 */
export function spectralRows(t: PeriodTable, kMax: number): SpectralRows {
  if (t.stable || !Number.isFinite(t.lambda)) throw new Error('spectral rows need an unstable axis');
  let sp = t.spectral;
  if (sp === null) {
    const n = t.n;
    let r = spareSpectral.pop();
    if (r === undefined || r.a1.length !== n + 1) {
      const f = () => new Float64Array(n + 1);
      r = { a1: f(), b1: f(), a2: f(), b2: f(), err1: 0, err2: 0, lamPow: r?.lamPow ?? new Float64Array(0), count: 0 };
    }
    sp = r;
    const { f11, f12, f21, f22 } = t;
    // Right eigenvectors v_j = columns of V = (V⁻¹)⁻¹; left ones u_j = rows of V⁻¹.
    const dv = t.vi11 * t.vi22 - t.vi12 * t.vi21;
    const v11 = t.vi22 / dv, v21 = -t.vi21 / dv, v12 = -t.vi12 / dv, v22 = t.vi11 / dv;
    for (let i = 0; i <= n; i++) {
      const det = f11[i] * f22[i] - f12[i] * f21[i];
      // F⁻¹ = adj(F)/det; u·F⁻¹ and (F·v)_1.
      const x1 = f11[i] * v11 + f12[i] * v21, x2 = f11[i] * v12 + f12[i] * v22;
      sp.a1[i] = (x1 * (t.vi11 * f22[i] - t.vi12 * f21[i])) / det;
      sp.b1[i] = (x1 * (-t.vi11 * f12[i] + t.vi12 * f11[i])) / det;
      sp.a2[i] = (x2 * (t.vi21 * f22[i] - t.vi22 * f21[i])) / det;
      sp.b2[i] = (x2 * (-t.vi21 * f12[i] + t.vi22 * f11[i])) / det;
    }
    sp.err1 = Math.max(interpolationBound(sp.a1, n), interpolationBound(sp.b1, n));
    sp.err2 = Math.max(interpolationBound(sp.a2, n), interpolationBound(sp.b2, n));
    sp.count = 0;
    t.spectral = sp;
  }
  if (sp.count <= kMax) {
    if (sp.lamPow.length < kMax + 1) {
      const grown = new Float64Array(Math.max(kMax + 1, 2 * sp.lamPow.length));
      grown.set(sp.lamPow.subarray(0, sp.count));
      sp.lamPow = grown;
    }
    let k = sp.count;
    if (k === 0) { sp.lamPow[0] = 1; k = 1; }
    for (; k <= kMax; k++) {
      const v = sp.lamPow[k - 1] * t.lambda;
      if (!(Math.abs(v) <= 1e150)) break;
      sp.lamPow[k] = v;
    }
    sp.count = k;
  }
  return sp;
}

/**
 * Safety margin of the bounds taken over the grid (Wmax, h1, h2, the row ellipse): between grid
 * points (2π/(M·S) apart) a quantity can exceed its grid maximum by about its second derivative
 * times δθ²/8 ≲ 10·(2π/640)²/8 ≈ 1.2e-4 of itself (second derivatives are of order
 * |w0| + |w1| + 1 ≲ 10 in phase units). 1e-3 covers that eightfold; ions inside the margin take
 * the exact tiers. (The per-check envelope of the batch pass uses wMargin, measured per table.)
 */
export const ENVELOPE_MARGIN = 1e-3;

/** Entries of M0^k stop growing the power table past this size (no overflow to ∞ or NaN). */
const POW_LIMIT = 1e100;

/**
 * Makes t.pow hold M0^k for k = 0..min(kMax, last k with every entry below POW_LIMIT) and returns
 * how many powers it holds (≥ 1: M0^0 = I).
 */
export function powers(t: PeriodTable, kMax: number): number {
  if (t.powCount > kMax) return t.powCount;
  if (t.pow.length < 4 * (kMax + 1)) {
    const grown = new Float64Array(4 * Math.max(kMax + 1, 2 * (t.pow.length >> 2), 16));
    grown.set(t.pow.subarray(0, 4 * t.powCount));
    t.pow = grown;
  }
  const P = t.pow;
  let k = t.powCount;
  if (k === 0) { P[0] = 1; P[1] = 0; P[2] = 0; P[3] = 1; k = 1; }
  const m11 = t.m11, m12 = t.m12, m21 = t.m21, m22 = t.m22;
  for (; k <= kMax; k++) {
    const j = 4 * (k - 1);
    const a11 = m11 * P[j] + m12 * P[j + 2], a12 = m11 * P[j + 1] + m12 * P[j + 3];
    const a21 = m21 * P[j] + m22 * P[j + 2], a22 = m21 * P[j + 1] + m22 * P[j + 3];
    if (!(Math.max(Math.abs(a11), Math.abs(a12), Math.abs(a21), Math.abs(a22)) < POW_LIMIT)) break;
    P[j + 4] = a11; P[j + 5] = a12; P[j + 6] = a21; P[j + 7] = a22;
  }
  t.powCount = k;
  return k;
}

// rk4Step's result (U, U') in a scratch array: a module-level `let` holding a double would be
// boxed on every store; a Float64Array element is not.
const RK = new Float64Array(2);

/**
 * One classic RK4 step of U'' = −g U over h with g at the start, middle and end of the step;
 * the new (U, U') go to RK[0], RK[1].
 */
function rk4Step(u: number, p: number, g0: number, g1: number, g2: number, h: number): void {
  const a1 = -g0 * u;
  const u2 = u + 0.5 * h * p, p2 = p + 0.5 * h * a1, a2 = -g1 * u2;
  const u3 = u + 0.5 * h * p2, p3 = p + 0.5 * h * a2, a3 = -g1 * u3;
  const u4 = u + h * p3, p4 = p + h * a3, a4 = -g2 * u4;
  RK[0] = u + (h / 6) * (p + 2 * p2 + 2 * p3 + p4);
  RK[1] = p + (h / 6) * (a1 + 2 * a2 + 2 * a3 + a4);
}

/** A 2×2 matrix in a reusable holder. */
export interface Mat2 { a11: number; a12: number; a21: number; a22: number }

export function mat2(): Mat2 {
  return { a11: 1, a12: 0, a21: 0, a22: 1 };
}

/**
 * F(θ) for θ in [0, 2π] into `out`: the grid point below θ, then one RK4 step of size
 * ε = θ − θ_i < dTheta. The one-step error is O((ω ε)⁵) with ω² ≈ |w0| + |w1| ≲ 1, below 1e-12
 * for ε ≤ 2π/640. `ce`, `se`, `ch`, `sh`: cos and sin of ε and ε/2 (shared by all checks of an ion,
 * since its check phases differ from grid points by the same ε).
 */
export function fAtGrid(t: PeriodTable, i: number, eps: number, ch: number, sh: number, ce: number, se: number, out: Mat2): Mat2 {
  const c = t.cos[i], s = t.sin[i];
  const g0 = t.w0 + t.w1 * c;
  const g1 = t.w0 + t.w1 * (c * ch - s * sh);
  const g2 = t.w0 + t.w1 * (c * ce - s * se);
  rk4Step(t.f11[i], t.f21[i], g0, g1, g2, eps);
  out.a11 = RK[0]; out.a21 = RK[1];
  rk4Step(t.f12[i], t.f22[i], g0, g1, g2, eps);
  out.a12 = RK[0]; out.a22 = RK[1];
  return out;
}

/**
 * First row of F(θ_i + ε) (the positions of the two fundamental solutions) by the Taylor series
 * of U'' = −wU to third order: U(θ+ε) = U + εU' − (ε²/2)wU − (ε³/6)(w'U + wU'). The remainder is
 * ε⁴/24·|U''''| with |U''''| ≲ (w² + |w''| + 2|w'|)·|F| ≲ 3|F|: below 2e-9·|F| for ε ≤ 2π/640, far
 * under any loss decision's sensitivity. Result in rowOut[0..1].
 */
export function rowAt(t: PeriodTable, i: number, eps: number, rowOut: Float64Array): void {
  const w = t.w0 + t.w1 * t.cos[i], dw = -t.w1 * t.sin[i];
  const e2 = 0.5 * eps * eps, e3 = (eps * eps * eps) / 6;
  const u1 = t.f11[i], p1 = t.f21[i], u2 = t.f12[i], p2 = t.f22[i];
  rowOut[0] = u1 + eps * p1 - e2 * w * u1 - e3 * (dw * u1 + w * p1);
  rowOut[1] = u2 + eps * p2 - e2 * w * u2 - e3 * (dw * u2 + w * p2);
}

/** F(θ), θ in [0, 2π). */
export function fAt(t: PeriodTable, theta: number, out: Mat2): Mat2 {
  let i = Math.floor(theta / t.dTheta);
  if (i >= t.n) i = t.n - 1;
  if (i < 0) i = 0;
  const eps = theta - i * t.dTheta;
  const e = smallAngle(eps);
  return fAtGrid(t, i, eps, e.ch, e.sh, e.ce, e.se, out);
}

const SA = { ch: 1, sh: 0, ce: 1, se: 0 };

/**
 * cos and sin of ε and ε/2 for 0 ≤ ε ≤ 2π/640 by their Taylor series to ε⁴ and ε⁵: the first
 * omitted terms, ε⁶/720 and ε⁷/5040, are below 1.3e-15 and 2e-18 (double rounding level).
 */
export function smallAngle(eps: number): { ch: number; sh: number; ce: number; se: number } {
  const e2 = eps * eps, h = 0.5 * eps, h2 = h * h;
  SA.ce = 1 - 0.5 * e2 * (1 - e2 / 12);
  SA.se = eps * (1 - (e2 / 6) * (1 - e2 / 20));
  SA.ch = 1 - 0.5 * h2 * (1 - h2 / 12);
  SA.sh = h * (1 - (h2 / 6) * (1 - h2 / 20));
  return SA;
}

/** M0^k applied to the vector (v1, v2) by repeated squaring (O(log k) products); result in out[0..1]. */
export function powerApply(t: PeriodTable, k: number, v1: number, v2: number, out: Float64Array): void {
  let b11 = t.m11, b12 = t.m12, b21 = t.m21, b22 = t.m22;
  let x1 = v1, x2 = v2;
  let e = k;
  while (e > 0) {
    if (e & 1) {
      const y1 = b11 * x1 + b12 * x2;
      x2 = b21 * x1 + b22 * x2;
      x1 = y1;
    }
    e = Math.floor(e / 2);
    if (e > 0) {
      const c11 = b11 * b11 + b12 * b21, c12 = b11 * b12 + b12 * b22;
      const c21 = b21 * b11 + b22 * b21, c22 = b21 * b12 + b22 * b22;
      b11 = c11; b12 = c12; b21 = c21; b22 = c22;
    }
  }
  out[0] = x1; out[1] = x2;
}
