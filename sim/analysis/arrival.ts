// Arrival-time peaks: centre, full width at half maximum, resolution t/(2Δt), and the mass
// calibration t = t0 + k·sqrt(m/z) (the drift-time law t ∝ sqrt(m/z) of a linear TOF; e.g.
// Cotter, Time-of-Flight Mass Spectrometry, ACS 1997, ch. 2).

export interface Peak {
  centre: number;
  fwhm: number;
  count: number;
}

/** Density samples across the sample's range; enough for crossings to well under 1 % of the FWHM. */
const GRID = 1024;

/**
 * Centre (mean) and full width at half maximum of a sampled peak (arrival times, energies, ejection
 * m/z). The FWHM is read from a Gaussian kernel density estimate rather than from a histogram: with
 * a few hundred ions the tallest histogram bin is noisy and so was the width (LT-1 m/z 1200 read
 * 1935 where 2.355σ gives 1560). Bandwidth by Silverman's rule h = 0.9·min(σ, IQR/1.34)·n^(−1/5)
 * (Silverman, Density Estimation for Statistics and Data Analysis, 1986, eq. 3.31). The estimate is
 * the peak convolved with the kernel, so the kernel's own FWHM is removed in quadrature (exact for
 * a Gaussian peak, where widths add in quadrature). Half-maximum crossings are found outward from
 * the highest point and interpolated linearly. For fewer than 5 values, or no spread, the FWHM is
 * 2·sqrt(2 ln 2)·σ of the sample (exact for a Gaussian).
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
  const gaussFwhm = GAUSS_FWHM * sigma;
  const iqr = v[Math.floor(0.75 * (n - 1))] - v[Math.floor(0.25 * (n - 1))];
  if (n < 5 || !(iqr > 0)) return { centre: mean, fwhm: gaussFwhm, count: n };
  const h = 0.9 * Math.min(sigma, iqr / 1.34) * Math.pow(n, -0.2);
  const lo = v[0] - 3 * h, step = (v[n - 1] + 3 * h - lo) / (GRID - 1);
  const d = new Float64Array(GRID);
  // Each value adds its kernel over ±5h only (exp(−12.5) ≈ 4e-6 of the peak beyond).
  const reach = Math.ceil((5 * h) / step), inv = 1 / (2 * h * h);
  for (let i = 0; i < n; i++) {
    const k0 = Math.round((v[i] - lo) / step);
    for (let k = Math.max(0, k0 - reach), kEnd = Math.min(GRID - 1, k0 + reach); k <= kEnd; k++) {
      const u = lo + k * step - v[i];
      d[k] += Math.exp(-u * u * inv);
    }
  }
  let kMax = 0;
  for (let k = 1; k < GRID; k++) if (d[k] > d[kMax]) kMax = k;
  const half = d[kMax] / 2;
  let kl = kMax;
  while (kl > 0 && d[kl] > half) kl--;
  let kr = kMax;
  while (kr < GRID - 1 && d[kr] > half) kr++;
  const left = lo + (kl + (half - d[kl]) / (d[kl + 1] - d[kl])) * step;
  const right = lo + (kr - (half - d[kr]) / (d[kr - 1] - d[kr])) * step;
  const kernelFwhm = GAUSS_FWHM * h;
  const measured = right - left;
  return { centre: mean, fwhm: Math.sqrt(Math.max(measured * measured - kernelFwhm * kernelFwhm, 0)), count: n };
}

/** FWHM / σ of a Gaussian, 2·sqrt(2 ln 2). */
const GAUSS_FWHM = 2 * Math.sqrt(2 * Math.LN2);

/**
 * The one definition of TOF mass resolving power in iontrail, R = m/Δm = t/(2Δt) with t the
 * arrival-peak centre and Δt its FWHM: with t ∝ sqrt(m/z) (Cotter, Time-of-Flight Mass
 * Spectrometry, ACS 1997, ch. 2), Δm/m = 2Δt/t; m/Δm with Δm the FWHM is the usual 50 %-height
 * resolving power (IUPAC Orange Book, "resolution in mass spectrometry"). Used by the `tof` block of
 * summary.json, the report's table and the arrival histogram's legend, so the three agree.
 */
export const TOF_RESOLUTION_DEFINITION = 'm/Δm = t/(2Δt), Δt the FWHM of the arrival peak';

export interface TofResolution extends Peak {
  /** t/(2Δt); null when the peak has no width. */
  resolution: number | null;
}

/** Arrival peak and its TOF resolving power t/(2Δt); null for no arrivals. */
export function tofResolution(arrivalTimes: ArrayLike<number>): TofResolution | null {
  const pk = peakOf(arrivalTimes);
  if (!pk) return null;
  return { ...pk, resolution: pk.fwhm > 0 ? pk.centre / (2 * pk.fwhm) : null };
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
