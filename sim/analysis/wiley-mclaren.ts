// Two-field (Wiley–McLaren) source: an ion at rest a distance s0 from the back plate of an
// extraction region (field Es), then an acceleration region of length d (field Ed), then a
// field-free drift. W. C. Wiley and I. H. McLaren, Rev. Sci. Instrum. 26, 1150 (1955):
//   k0 = (s0 Es + d Ed)/(s0 Es)                                   (eq. 4)
//   first-order space focus:  D = 2 s0 k0^{3/2} [1 − d/(s0 (k0 + √k0))]   (eq. 9)
// The flight-time function below is the exact kinematics the engine integrates, used to find the
// extraction field that puts the focus on a given detector distance.

export interface TwoFieldSource {
  /** Start distance from the back plate, m. */
  s0: number;
  /** Extraction field, V/m, and acceleration region length, m, and field, V/m. */
  Es: number;
  d: number;
  Ed: number;
}

export function k0(src: TwoFieldSource): number {
  return (src.s0 * src.Es + src.d * src.Ed) / (src.s0 * src.Es);
}

/** First-order space-focus distance D (m) beyond the acceleration region. */
export function spaceFocusDistance(src: TwoFieldSource): number {
  const k = k0(src);
  return 2 * src.s0 * Math.pow(k, 1.5) * (1 - src.d / (src.s0 * (k + Math.sqrt(k))));
}

/** Flight time (s) from rest at s0 to a plane D beyond the source, for charge q (C) and mass m (kg). */
export function flightTime(src: TwoFieldSource, D: number, q: number, m: number): number {
  const as = (q * src.Es) / m;
  const ad = (q * src.Ed) / m;
  const ts = Math.sqrt((2 * src.s0) / as);
  const v1 = as * ts;
  const v2 = Math.sqrt(v1 * v1 + 2 * ad * src.d);
  const td = ad !== 0 ? (v2 - v1) / ad : src.d / v1;
  return ts + td + D / v2;
}

/**
 * Extraction field Es (V/m) that puts the first-order focus at distance D, keeping s0, d and Ed;
 * null when no field between 1e-3 and 1e3 times Ed does. Bisection on D(Es) − D_target, which is
 * monotonic in Es over that range for d < s0 k0-type geometries.
 */
export function extractionFieldForFocus(s0: number, d: number, Ed: number, D: number): number | null {
  const f = (Es: number) => spaceFocusDistance({ s0, Es, d, Ed }) - D;
  // Scan on a log grid for a sign change, then bisect.
  let lo = Ed * 1e-3, flo = f(lo);
  for (let k = 1; k <= 120; k++) {
    const hi = Ed * 1e-3 * Math.pow(10, (6 * k) / 120);
    const fhi = f(hi);
    if (Number.isFinite(flo) && Number.isFinite(fhi) && flo * fhi <= 0) {
      let a = lo, b = hi, fa = flo;
      for (let it = 0; it < 200 && (b - a) > 1e-12 * b; it++) {
        const mid = 0.5 * (a + b), fm = f(mid);
        if (fa * fm <= 0) b = mid; else { a = mid; fa = fm; }
      }
      return 0.5 * (a + b);
    }
    lo = hi; flo = fhi;
  }
  return null;
}
