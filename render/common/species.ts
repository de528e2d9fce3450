// One colour per species, the same in every 2D figure and in the 3D view (render/scene3d): an m/z
// ramp of the project's own running teal → green → amber → rust → plum. With up to
// DISCRETE_SPECIES distinct m/z the species take evenly spaced stops by m/z rank (lightest m/z
// teal, heaviest plum); with more, the colour follows m/z continuously between the extremes.

export type Rgb = readonly [number, number, number];

const hex = (h: string): Rgb => [
  parseInt(h.slice(1, 3), 16) / 255, parseInt(h.slice(3, 5), 16) / 255, parseInt(h.slice(5, 7), 16) / 255,
];

const MZ_STOPS: readonly Rgb[] = ['#1f6f8b', '#3a9f7a', '#d6aa35', '#cf6130', '#94306c'].map(hex);

/** Species counts up to which colours are discrete swatches by m/z rank. */
export const DISCRETE_SPECIES = 6;

/** Colour of fraction u ∈ [0, 1] along the m/z ramp (piecewise linear between stops), linear 0..1 RGB. */
export function mzRamp(u: number, out: number[] | Float32Array = [0, 0, 0]): number[] | Float32Array {
  const v = Math.min(1, Math.max(0, Number.isFinite(u) ? u : 0)) * (MZ_STOPS.length - 1);
  const i = Math.min(MZ_STOPS.length - 2, Math.floor(v));
  const f = v - i;
  const a = MZ_STOPS[i], b = MZ_STOPS[i + 1];
  out[0] = a[0] + (b[0] - a[0]) * f;
  out[1] = a[1] + (b[1] - a[1]) * f;
  out[2] = a[2] + (b[2] - a[2]) * f;
  return out;
}

/**
 * Position along the ramp of each m/z of a set of species: by rank for a few distinct values,
 * by value between the lightest and the heaviest for many. Returns u(mz) and whether it is discrete.
 */
export function speciesRamp(mzs: Iterable<number>): { u: (mz: number) => number; values: number[]; discrete: boolean } {
  const values = [...new Set(mzs)].filter(Number.isFinite).sort((a, b) => a - b);
  const lo = values[0] ?? 0, hi = values[values.length - 1] ?? 1;
  const discrete = values.length <= DISCRETE_SPECIES;
  const u = (mz: number) => discrete
    ? (values.length <= 1 ? 0 : Math.max(0, values.indexOf(mz)) / (values.length - 1))
    : (hi > lo ? (mz - lo) / (hi - lo) : 0);
  return { u, values, discrete };
}

function css(c: ArrayLike<number>): string {
  const b = (x: number) => Math.round(Math.min(1, Math.max(0, x)) * 255).toString(16).padStart(2, '0');
  return `#${b(c[0])}${b(c[1])}${b(c[2])}`;
}

/** CSS colour of each species by m/z, for the species of a scene (all of its populations' m/z). */
export function speciesColors(mzs: Iterable<number>): (mz: number) => string {
  const { u } = speciesRamp(mzs);
  const cache = new Map<number, string>();
  return (mz) => {
    let c = cache.get(mz);
    if (c === undefined) { c = css(mzRamp(u(mz))); cache.set(mz, c); }
    return c;
  };
}
