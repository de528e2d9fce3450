// Figures of a transmission peak sampled on a sweep: centre, full width at 50 % and 10 % of the
// maximum and the resolution m/Δm at both heights. Crossings are found outward from the maximum
// and placed by linear interpolation between the two sweep points that bracket the level
// (the usual reading of a sampled peak; IUPAC Orange Book, "resolution in mass spectrometry":
// R = m/Δm with Δm the peak width at a stated fraction of its height).

export interface PeakFigures {
  /** Peak centre: midpoint of the two 50 % crossings (the m/z at the maximum when unbounded). */
  mz: number;
  /** Full width at half maximum, in the x unit; null when the peak is not bounded in the sweep. */
  fwhm_mz: number | null;
  /** mz / fwhm_mz. */
  resolution_50: number | null;
  /** mz / (width at 10 % height). */
  resolution_10: number | null;
  /** Largest transmission of the sweep (fraction of ions detected). */
  transmission: number;
  /** x of the largest transmission (first of equal maxima). */
  mz_at_max: number;
  /** Interpolated crossings; null when the curve stays above the level to the sweep's end. */
  low_50: number | null; high_50: number | null;
  low_10: number | null; high_10: number | null;
  width_10_mz: number | null;
}

/** Crossing of `level` between i and j (adjacent, y[i] ≥ level > y[j]). */
function cross(x: readonly number[], y: readonly number[], i: number, j: number, level: number): number {
  return x[i] + ((y[i] - level) / (y[i] - y[j])) * (x[j] - x[i]);
}

/** Outward crossings of fraction·max on each side of the maximum. */
export function crossings(x: readonly number[], y: readonly number[], fraction: number): { low: number | null; high: number | null } {
  let im = 0;
  for (let i = 1; i < y.length; i++) if (y[i] > y[im]) im = i;
  const level = fraction * y[im];
  let low: number | null = null, high: number | null = null;
  for (let i = im; i > 0; i--) if (y[i - 1] < level) { low = cross(x, y, i, i - 1, level); break; }
  for (let i = im; i < y.length - 1; i++) if (y[i + 1] < level) { high = cross(x, y, i, i + 1, level); break; }
  return { low, high };
}

/**
 * Peak figures of y(x), x increasing. Null when nothing is transmitted anywhere (no peak).
 */
export function peakFigures(x: readonly number[], y: readonly number[]): PeakFigures | null {
  if (x.length !== y.length || x.length < 2) throw new Error('peakFigures: x and y need the same length ≥ 2');
  // Widths are high − low crossings: a falling x would give negative FWHMs (sweeps refuse
  // reversed ranges in sim/sweeps/vary.ts, so this is a caller's bug, not a user's input).
  for (let i = 1; i < x.length; i++) if (!(x[i] > x[i - 1])) throw new Error('peakFigures: x must increase strictly');
  let im = 0;
  for (let i = 1; i < y.length; i++) if (y[i] > y[im]) im = i;
  if (!(y[im] > 0)) return null;
  const h = crossings(x, y, 0.5), t = crossings(x, y, 0.1);
  const fwhm = h.low !== null && h.high !== null ? h.high - h.low : null;
  const w10 = t.low !== null && t.high !== null ? t.high - t.low : null;
  const centre = h.low !== null && h.high !== null ? 0.5 * (h.low + h.high) : x[im];
  return {
    mz: centre,
    fwhm_mz: fwhm,
    resolution_50: fwhm !== null && fwhm > 0 ? centre / fwhm : null,
    resolution_10: w10 !== null && w10 > 0 ? centre / w10 : null,
    transmission: y[im],
    mz_at_max: x[im],
    low_50: h.low, high_50: h.high, low_10: t.low, high_10: t.high,
    width_10_mz: w10,
  };
}
