// Statistics used by the gas checks (not a test file itself).

/**
 * Complementary error function, fractional error < 1.2e-7 everywhere (Chebyshev fit "erfcc",
 * Press et al., Numerical Recipes in C, 2nd ed. (1992), §6.2).
 */
export function erfc(x: number): number {
  const z = Math.abs(x);
  const t = 1 / (1 + 0.5 * z);
  const r = t * Math.exp(-z * z - 1.26551223 + t * (1.00002368 + t * (0.37409196 + t * (0.09678418
    + t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587
    + t * (-0.82215223 + t * 0.17087277)))))))));
  return x >= 0 ? r : 2 - r;
}

/** Maxwell–Boltzmann speed CDF: F(v) = erf(s) − (2/√π) s e^{−s²}, s = v/(2kT/m)^½. */
export function maxwellSpeedCdf(v: number, kT: number, massKg: number): number {
  const s = v / Math.sqrt((2 * kT) / massKg);
  return 1 - erfc(s) - (2 / Math.sqrt(Math.PI)) * s * Math.exp(-s * s);
}

/** One-sample Kolmogorov–Smirnov statistic D = sup |F_n − F| (Numerical Recipes, §14.3). */
export function ksStatistic(sample: ArrayLike<number>, cdf: (x: number) => number): number {
  const xs = Float64Array.from(sample).sort();
  const n = xs.length;
  let d = 0;
  for (let j = 0; j < n; j++) {
    const f = cdf(xs[j]);
    d = Math.max(d, Math.abs(f - j / n), Math.abs((j + 1) / n - f));
  }
  return d;
}

/**
 * Asymptotic significance of D: Q_KS(λ) = 2 Σ_{j≥1} (−1)^{j−1} e^{−2j²λ²} with
 * λ = (√n + 0.12 + 0.11/√n) D (Numerical Recipes, 3rd ed. (2007), §14.3.3).
 */
export function ksPValue(d: number, n: number): number {
  const sn = Math.sqrt(n);
  const lambda = (sn + 0.12 + 0.11 / sn) * d;
  if (lambda < 0.2) return 1;
  let sum = 0;
  for (let j = 1; j <= 100; j++) {
    const term = Math.exp(-2 * j * j * lambda * lambda);
    sum += (j % 2 === 1 ? 1 : -1) * term;
    if (term < 1e-12) break;
  }
  return Math.min(1, Math.max(0, 2 * sum));
}

export function mean(xs: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < xs.length; i++) s += xs[i];
  return s / xs.length;
}

export function variance(xs: ArrayLike<number>): number {
  const m = mean(xs);
  let s = 0;
  for (let i = 0; i < xs.length; i++) s += (xs[i] - m) ** 2;
  return s / (xs.length - 1);
}

export function speeds(vx: Float64Array, vy: Float64Array, vz: Float64Array): Float64Array {
  const out = new Float64Array(vx.length);
  for (let i = 0; i < vx.length; i++) out[i] = Math.hypot(vx[i], vy[i], vz[i]);
  return out;
}
