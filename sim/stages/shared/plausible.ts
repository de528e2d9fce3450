// Ranges of real instruments, for warnings on values that are legal but probably a slip of the
// unit ("4 m" for "4 mm"). The bounds are common practice, no source: the span of the filters and
// traps in use, widened about tenfold on each side.

/** Field radius r0 of quadrupole filters and RF traps in use: about 0.5 mm (micro-machined) to 50 mm. */
export const R0_RANGE_M = [0.5e-3, 50e-3] as const;

/** A warning when r0 lies outside R0_RANGE_M, or nothing. */
export function r0Plausibility(r0: number, what: string): string[] {
  const [lo, hi] = R0_RANGE_M;
  if (r0 >= lo && r0 <= hi) return [];
  return [`r0 = ${mmText(r0)} mm is outside the ${lo * 1e3}–${hi * 1e3} mm of ${what} in use (common practice, no source); check the unit`];
}

export function mmText(m: number): string {
  return Number((m * 1e3).toPrecision(4)).toString();
}
