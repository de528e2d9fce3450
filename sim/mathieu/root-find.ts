// Brent's method: bracketed root of a continuous scalar function, combining bisection, secant and
// inverse quadratic interpolation (R. P. Brent, Algorithms for Minimization without Derivatives,
// 1973, ch. 4, procedure "zero"). Never leaves the bracket; converges superlinearly on smooth f.

/** Root of f in [lo, hi]; f(lo) and f(hi) must not have the same strict sign. */
export function brentRoot(f: (x: number) => number, lo: number, hi: number, tol = 1e-14, maxIter = 200): number {
  let a = lo, b = hi;
  let fa = f(a), fb = f(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  if ((fa > 0) === (fb > 0)) throw new RangeError(`brentRoot: no sign change on [${lo}, ${hi}] (f = ${fa}, ${fb})`);
  let c = a, fc = fa, d = b - a, e = d;
  for (let iter = 0; iter < maxIter; iter++) {
    if ((fb > 0) === (fc > 0)) { c = a; fc = fa; d = b - a; e = d; }
    if (Math.abs(fc) < Math.abs(fb)) { a = b; b = c; c = a; fa = fb; fb = fc; fc = fa; }
    const tol1 = 2 * Number.EPSILON * Math.abs(b) + 0.5 * tol;
    const xm = 0.5 * (c - b);
    if (Math.abs(xm) <= tol1 || fb === 0) return b;
    if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number, qq: number;
      if (a === c) { p = 2 * xm * s; qq = 1 - s; }
      else {
        const r = fa / fc, t = fb / fc;
        p = s * (2 * xm * r * (r - t) - (b - a) * (t - 1));
        qq = (r - 1) * (t - 1) * (s - 1);
      }
      if (p > 0) qq = -qq; else p = -p;
      if (2 * p < Math.min(3 * xm * qq - Math.abs(tol1 * qq), Math.abs(e * qq))) { e = d; d = p / qq; }
      else { d = xm; e = d; }
    } else { d = xm; e = d; }
    a = b; fa = fb;
    b += Math.abs(d) > tol1 ? d : (xm > 0 ? tol1 : -tol1);
    fb = f(b);
  }
  return b;
}
