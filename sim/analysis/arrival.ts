// Arrival-time peaks: centre, full width at half maximum, resolution t/(2Δt), and the mass
// calibration t = t0 + k·sqrt(m/z) (the drift-time law t ∝ sqrt(m/z) of a linear TOF; e.g.
// Cotter, Time-of-Flight Mass Spectrometry, ACS 1997, ch. 2).

export interface Peak {
  centre: number;
  fwhm: number;
  count: number;
}

/**
 * Centre (mean) and FWHM of a sample from a histogram whose bin width follows the
 * Freedman–Diaconis rule; half-maximum crossings interpolated linearly. For fewer than 5 values,
 * or no spread, the FWHM is 2·sqrt(2 ln 2)·σ of the sample (exact for a Gaussian).
 */
export function peakOf(values: ArrayLike<number>): Peak | null {
  const n = values.length;
  if (n === 0) return null;
  const v = Float64Array.from(values).sort();
  let mean = 0;
  for (let i = 0; i < n; i++) mean += v[i];
  mean /= n;
  let varr = 0;
  for (let i = 0; i < n; i++) varr += (v[i] - mean) ** 2;
  const sigma = Math.sqrt(varr / Math.max(1, n - 1));
  const gaussFwhm = 2 * Math.sqrt(2 * Math.LN2) * sigma;
  const iqr = v[Math.floor(0.75 * (n - 1))] - v[Math.floor(0.25 * (n - 1))];
  if (n < 5 || !(iqr > 0)) return { centre: mean, fwhm: gaussFwhm, count: n };
  const width = (2 * iqr) / Math.cbrt(n);
  const lo = v[0], bins = Math.max(5, Math.min(2000, Math.ceil((v[n - 1] - lo) / width) + 1));
  const w = (v[n - 1] - lo) / (bins - 1) || width;
  const h = new Float64Array(bins + 2);
  for (let i = 0; i < n; i++) h[1 + Math.floor((v[i] - lo) / w + 0.5)]++;
  let kMax = 0;
  for (let k = 1; k < h.length; k++) if (h[k] > h[kMax]) kMax = k;
  const half = h[kMax] / 2;
  const x = (k: number) => lo + (k - 1) * w;
  let kl = kMax;
  while (kl > 0 && h[kl] > half) kl--;
  let kr = kMax;
  while (kr < h.length - 1 && h[kr] > half) kr++;
  const left = x(kl) + ((half - h[kl]) / (h[kl + 1] - h[kl])) * w;
  const right = x(kr) - ((half - h[kr]) / (h[kr - 1] - h[kr])) * w;
  return { centre: mean, fwhm: Math.max(right - left, 0), count: n };
}

/** Least-squares t = t0 + k·sqrt(m/z) through (m/z, t) peak centres; null with fewer than 2. */
export function fitMassCalibration(mz: number[], t: number[]): { t0: number; k: number } | null {
  if (mz.length < 2) return null;
  const x = mz.map(Math.sqrt);
  const n = x.length;
  const sx = x.reduce((a, b) => a + b, 0), sy = t.reduce((a, b) => a + b, 0);
  const sxx = x.reduce((a, b) => a + b * b, 0), sxy = x.reduce((a, b, i) => a + b * t[i], 0);
  const den = n * sxx - sx * sx;
  if (den === 0) return null;
  const k = (n * sxy - sx * sy) / den;
  return { t0: (sy - k * sx) / n, k };
}
