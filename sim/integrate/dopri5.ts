// Adaptive explicit Runge–Kutta 5(4) of Dormand & Prince with error control and dense output.
// Coefficients: Dormand & Prince, J. Comput. Appl. Math. 6 (1980) 19–26; Hairer, Nørsett & Wanner,
// Solving Ordinary Differential Equations I, 2nd ed. (HNW), Table II.5.2.
// Error norm: HNW eq. (II.4.11); step-size control: the PI ("Lund-stabilised") controller of HNW
// §II.4 with the exponents used in Hairer's DOPRI5 code (alpha = 1/5 - 0.75 beta, beta = 0.04);
// starting step: HNW §II.4 "Starting step size" algorithm. Dense output: the 4th-order continuous
// extension of HNW §II.6 (Shampine's coefficients, as in Hairer's DOPRI5 code).
// All work vectors are allocated in the constructor; integrate() allocates nothing.

import type { Derivative } from './derivative.js';

// Butcher tableau, HNW Table II.5.2.
const C2 = 1 / 5, C3 = 3 / 10, C4 = 4 / 5, C5 = 8 / 9;
const A21 = 1 / 5;
const A31 = 3 / 40, A32 = 9 / 40;
const A41 = 44 / 45, A42 = -56 / 15, A43 = 32 / 9;
const A51 = 19372 / 6561, A52 = -25360 / 2187, A53 = 64448 / 6561, A54 = -212 / 729;
const A61 = 9017 / 3168, A62 = -355 / 33, A63 = 46732 / 5247, A64 = 49 / 176, A65 = -5103 / 18656;
const A71 = 35 / 384, A73 = 500 / 1113, A74 = 125 / 192, A75 = -2187 / 6784, A76 = 11 / 84;
// Difference between the 5th-order weights (= row 7, FSAL) and the embedded 4th-order weights.
const E1 = 71 / 57600, E3 = -71 / 16695, E4 = 71 / 1920, E5 = -17253 / 339200, E6 = 22 / 525, E7 = -1 / 40;
// Dense output (HNW §II.6, continuous extension of order 4).
const D1 = -12715105075 / 11282082432, D3 = 87487479700 / 32700410799, D4 = -10690763975 / 1880347072;
const D5 = 701980252875 / 199316789632, D6 = -1453857185 / 822651844, D7 = 69997945 / 29380423;

export interface Dopri5Options {
  /** Relative tolerance (per component). Default 1e-8. */
  rtol?: number;
  /** Absolute tolerance (per component). Default 1e-10. */
  atol?: number;
  /** Largest number of attempted steps before giving up. Default 100000. */
  maxSteps?: number;
  /** First trial step; 0 chooses one automatically (HNW §II.4). */
  initialStep?: number;
  /** Largest step; 0 means |t1 - t0|. */
  maxStep?: number;
  /** Safety factor of the step-size controller. Default 0.9. */
  safety?: number;
}

export interface Dopri5Stats {
  accepted: number;
  rejected: number;
  evaluations: number;
  /** Last accepted step size (useful as a warm start for the next call). */
  lastStep: number;
}

/**
 * Called after each accepted step from tPrev to t with y = y(t). During the call, `dense(i, s)`
 * gives component i at any s in [tPrev, t]. Return false to stop early.
 */
export type StepObserver = (tPrev: number, t: number, y: Float64Array, solver: Dopri5) => boolean | void;

export class Dopri5Error extends Error {
  override name = 'Dopri5Error';
}

export class Dopri5 {
  readonly n: number;
  rtol: number;
  atol: number;
  maxSteps: number;
  initialStep: number;
  maxStep: number;
  safety: number;
  private readonly k1: Float64Array;
  private readonly k2: Float64Array;
  private readonly k3: Float64Array;
  private readonly k4: Float64Array;
  private readonly k5: Float64Array;
  private readonly k6: Float64Array;
  private readonly k7: Float64Array;
  private readonly y1: Float64Array;
  private readonly ysti: Float64Array;
  // Dense-output coefficients of the last accepted step.
  private readonly r1: Float64Array;
  private readonly r2: Float64Array;
  private readonly r3: Float64Array;
  private readonly r4: Float64Array;
  private readonly r5: Float64Array;
  private denseT0 = 0;
  private denseH = 0;

  constructor(n: number, options: Dopri5Options = {}) {
    if (!Number.isInteger(n) || n <= 0) throw new RangeError(`Dopri5: dimension must be a positive integer, got ${n}`);
    this.n = n;
    this.rtol = options.rtol ?? 1e-8;
    this.atol = options.atol ?? 1e-10;
    this.maxSteps = options.maxSteps ?? 100000;
    this.initialStep = options.initialStep ?? 0;
    this.maxStep = options.maxStep ?? 0;
    this.safety = options.safety ?? 0.9;
    const v = () => new Float64Array(n);
    this.k1 = v(); this.k2 = v(); this.k3 = v(); this.k4 = v(); this.k5 = v(); this.k6 = v(); this.k7 = v();
    this.y1 = v(); this.ysti = v();
    this.r1 = v(); this.r2 = v(); this.r3 = v(); this.r4 = v(); this.r5 = v();
  }

  /** Component i of the solution at s inside the last accepted step (HNW §II.6 dense output). */
  dense(i: number, s: number): number {
    const th = (s - this.denseT0) / this.denseH;
    const th1 = 1 - th;
    return this.r1[i] + th * (this.r2[i] + th1 * (this.r3[i] + th * (this.r4[i] + th1 * this.r5[i])));
  }

  /**
   * Integrate y' = f(t, y) from t0 to t1 (either direction); y holds y(t0) on entry and y(t1) on
   * return (or the state where the observer stopped). Throws Dopri5Error when the step count or
   * step size runs out.
   */
  integrate(f: Derivative, t0: number, y: Float64Array, t1: number, observe?: StepObserver): Dopri5Stats {
    const { n, k1, k2, k3, k4, k5, k6, k7, y1, ysti } = this;
    const { rtol, atol, safety } = this;
    const stats: Dopri5Stats = { accepted: 0, rejected: 0, evaluations: 0, lastStep: 0 };
    if (t1 === t0) return stats;
    const dir = t1 > t0 ? 1 : -1;
    const span = Math.abs(t1 - t0);
    const hmax = this.maxStep > 0 ? Math.min(this.maxStep, span) : span;
    // Controller constants (Hairer's DOPRI5: fac1 = 0.2, fac2 = 10, beta = 0.04).
    const beta = 0.04;
    const expo1 = 0.2 - beta * 0.75;
    const facc1 = 1 / 0.2;
    const facc2 = 1 / 10;
    let facold = 1e-4;

    let t = t0;
    f(t, y, k1);
    stats.evaluations++;
    let h = this.initialStep > 0 ? Math.min(this.initialStep, hmax) : this.startingStep(f, t, y, dir, hmax, stats);
    let reject = false;
    let last = false;

    for (let attempt = 0; ; attempt++) {
      if (attempt >= this.maxSteps) throw new Dopri5Error(`Dopri5: more than ${this.maxSteps} steps before t = ${t1}`);
      if (0.1 * h <= Math.abs(t) * Number.EPSILON) throw new Dopri5Error(`Dopri5: step size underflow at t = ${t}`);
      if ((t + 1.01 * h * dir - t1) * dir >= 0) { h = Math.abs(t1 - t); last = true; }
      const hs = h * dir;

      for (let i = 0; i < n; i++) y1[i] = y[i] + hs * A21 * k1[i];
      f(t + C2 * hs, y1, k2);
      for (let i = 0; i < n; i++) y1[i] = y[i] + hs * (A31 * k1[i] + A32 * k2[i]);
      f(t + C3 * hs, y1, k3);
      for (let i = 0; i < n; i++) y1[i] = y[i] + hs * (A41 * k1[i] + A42 * k2[i] + A43 * k3[i]);
      f(t + C4 * hs, y1, k4);
      for (let i = 0; i < n; i++) y1[i] = y[i] + hs * (A51 * k1[i] + A52 * k2[i] + A53 * k3[i] + A54 * k4[i]);
      f(t + C5 * hs, y1, k5);
      for (let i = 0; i < n; i++) ysti[i] = y[i] + hs * (A61 * k1[i] + A62 * k2[i] + A63 * k3[i] + A64 * k4[i] + A65 * k5[i]);
      const tph = last ? t1 : t + hs;
      f(tph, ysti, k6);
      for (let i = 0; i < n; i++) y1[i] = y[i] + hs * (A71 * k1[i] + A73 * k3[i] + A74 * k4[i] + A75 * k5[i] + A76 * k6[i]);
      f(tph, y1, k7);
      stats.evaluations += 6;

      // err = sqrt(1/n Σ (e_i / sc_i)²), sc_i = atol + rtol max(|y0_i|, |y1_i|)   (HNW eq. II.4.11)
      let err = 0;
      for (let i = 0; i < n; i++) {
        const e = hs * (E1 * k1[i] + E3 * k3[i] + E4 * k4[i] + E5 * k5[i] + E6 * k6[i] + E7 * k7[i]);
        const sc = atol + rtol * Math.max(Math.abs(y[i]), Math.abs(y1[i]));
        err += (e / sc) * (e / sc);
      }
      err = Math.sqrt(err / n);

      // PI control: h_new = h · safety · err^(-alpha) · err_old^(beta)   (HNW §II.4, Lund stabilisation)
      const fac11 = Math.pow(err, expo1);
      let fac = fac11 / Math.pow(facold, beta);
      fac = Math.max(facc2, Math.min(facc1, fac / safety));
      let hnew = h / fac;

      if (err <= 1 && Number.isFinite(err)) {
        facold = Math.max(err, 1e-4);
        stats.accepted++;
        // Dense output coefficients before k1 is overwritten (HNW §II.6).
        if (observe) {
          const { r1, r2, r3, r4, r5 } = this;
          for (let i = 0; i < n; i++) {
            const dy = y1[i] - y[i];
            const bspl = hs * k1[i] - dy;
            r1[i] = y[i];
            r2[i] = dy;
            r3[i] = bspl;
            r4[i] = dy - hs * k7[i] - bspl;
            r5[i] = hs * (D1 * k1[i] + D3 * k3[i] + D4 * k4[i] + D5 * k5[i] + D6 * k6[i] + D7 * k7[i]);
          }
          this.denseT0 = t;
          this.denseH = hs;
        }
        const tPrev = t;
        for (let i = 0; i < n; i++) { k1[i] = k7[i]; y[i] = y1[i]; } // FSAL: k7 = f(t + h, y1)
        t = last ? t1 : t + hs;
        stats.lastStep = h;
        if (observe && observe(tPrev, t, y, this) === false) return stats;
        if (last) return stats;
        if (Math.abs(hnew) > hmax) hnew = hmax;
        if (reject) hnew = Math.min(hnew, h); // no growth right after a rejection
        reject = false;
      } else {
        hnew = h / Math.min(facc1, (Number.isFinite(fac11) ? fac11 : 1e10) / safety);
        reject = true;
        last = false;
        stats.rejected++;
      }
      h = hnew;
    }
  }

  /** Starting step size, HNW §II.4 (two-stage estimate from |y|, |f| and a trial Euler step). */
  private startingStep(f: Derivative, t: number, y: Float64Array, dir: number, hmax: number, stats: Dopri5Stats): number {
    const { n, k1, k2, y1, rtol, atol } = this;
    let dnf = 0, dny = 0;
    for (let i = 0; i < n; i++) {
      const sk = atol + rtol * Math.abs(y[i]);
      dnf += (k1[i] / sk) ** 2;
      dny += (y[i] / sk) ** 2;
    }
    let h = dnf <= 1e-10 || dny <= 1e-10 ? 1e-6 : Math.sqrt(dny / dnf) * 0.01;
    h = Math.min(h, hmax);
    for (let i = 0; i < n; i++) y1[i] = y[i] + h * dir * k1[i];
    f(t + h * dir, y1, k2);
    stats.evaluations++;
    let der2 = 0;
    for (let i = 0; i < n; i++) {
      const sk = atol + rtol * Math.abs(y[i]);
      der2 += ((k2[i] - k1[i]) / sk) ** 2;
    }
    der2 = Math.sqrt(der2) / h;
    // h1 from h1^5 · max(|f|, |f'|) = 0.01   (order p = 5, so exponent 1/(p+1) uses iord = 5)
    const der12 = Math.max(Math.abs(der2), Math.sqrt(dnf));
    const h1 = der12 <= 1e-15 ? Math.max(1e-6, Math.abs(h) * 1e-3) : Math.pow(0.01 / der12, 1 / 5);
    return Math.min(100 * Math.abs(h), h1, hmax);
  }
}
