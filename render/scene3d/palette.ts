// Colours of the 3D figures: a project palette of our own (warm paper background, graphite steel
// electrodes, an m/z ramp running teal → green → amber → rust → plum). Linear 0..1 RGB triples.

export type Rgb = readonly [number, number, number];

const hex = (h: string): Rgb => [
  parseInt(h.slice(1, 3), 16) / 255, parseInt(h.slice(3, 5), 16) / 255, parseInt(h.slice(5, 7), 16) / 255,
];

export const BACKGROUND_TOP: Rgb = hex('#fbfaf6');
export const BACKGROUND_BOTTOM: Rgb = hex('#e9e6dd');
export const INK: Rgb = hex('#24262b');
export const INK_SOFT: Rgb = hex('#6b6e75');

/** Electrode surfaces by role; the section faces of cut-away parts are a shade warmer. */
export const ELECTRODE_COLORS = {
  rodPositive: hex('#8e9aa8'),
  rodNegative: hex('#a7a39a'),
  ring: hex('#9aa3ad'),
  cap: hex('#a9a49a'),
  section: hex('#c9a77c'),
  grid: hex('#8fa3a0'),
  outline: hex('#8b8f96'),
} as const;

/** Axis triad colours (x, y, z): muted red, green, blue in the usual order (common practice, no source). */
export const AXIS_COLORS: readonly Rgb[] = [hex('#c2492f'), hex('#3e8a4f'), hex('#2f5fa8')];

export const FATE_COLORS: Record<string, Rgb> = {
  detected: hex('#2f8f5b'),
  hit: hex('#c8452f'),
  alive: hex('#3563c4'),
  // Reached the detector plane outside the detector; left back through the first entrance.
  missed: hex('#d9901e'),
  returned: hex('#8a5fb8'),
};
export const FATE_UNKNOWN: Rgb = hex('#7a7a7a');

const MZ_STOPS: readonly Rgb[] = ['#1f6f8b', '#3a9f7a', '#d6aa35', '#cf6130', '#94306c'].map(hex);

/** Colour of fraction u ∈ [0, 1] along the m/z ramp (piecewise linear between stops). */
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

export function cssColor(c: Rgb | ArrayLike<number>): string {
  const b = (x: number) => Math.round(Math.min(1, Math.max(0, x)) * 255).toString(16).padStart(2, '0');
  return `#${b(c[0])}${b(c[1])}${b(c[2])}`;
}
