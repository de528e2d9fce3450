// Confidence interval of a transmission k/n: the Wilson score interval (E. B. Wilson, "Probable
// inference, the law of succession, and statistical inference", J. Am. Stat. Assoc. 22, 209–212,
// 1927), the interval of p within which the observed share lies inside ±z binomial σ of p:
//   centre = (p̂ + z²/2n) / (1 + z²/n),  half = z/(1 + z²/n) · √(p̂(1 − p̂)/n + z²/4n²),  p̂ = k/n.
// Unlike p̂ ± z·√(p̂(1 − p̂)/n) it stays inside [0, 1] and does not collapse to a point at k = 0 or
// k = n, which is where a filter's transmission spends most of an m/z sweep.

/** z of a two-sided 95 % interval, Φ⁻¹(0.975). */
export const Z95 = 1.959963984540054;

/** [low, high] of the Wilson score interval of k successes in n trials (n = 0: [0, 1]). */
export function wilsonInterval(k: number, n: number, z = Z95): [number, number] {
  if (!(n > 0)) return [0, 1];
  const p = k / n, z2 = z * z;
  const d = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / d;
  const half = (z / d) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  // At k = 0 (k = n) centre and half are equal in exact arithmetic, so the low (high) end is
  // exactly 0 (1); rounding would leave ~1e-19 there.
  return [k <= 0 ? 0 : Math.max(0, centre - half), k >= n ? 1 : Math.min(1, centre + half)];
}
