// Colours of the 3D figures: a project palette of our own (warm paper background, graphite steel
// electrodes, an m/z ramp running teal → green → amber → rust → plum) and, for quantities along a
// trajectory (time of flight, kinetic energy), a perceptually ordered map. 0..1 RGB triples.

import { interpolateViridis } from 'd3-scale-chromatic';

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
  // Fates a detector adds: passed the detector plane outside its face, came back out of the entrance.
  missed: hex('#b07d1e'),
  returned: hex('#8a4fa3'),
};
/** A fate this palette does not know (a newer run folder): neutral grey, never an error. */
export const FATE_UNKNOWN: Rgb = hex('#7a7a7a');
/** The colour of a fate name. */
export const fateColor = (name: string): Rgb => FATE_COLORS[name] ?? FATE_UNKNOWN;

// The m/z ramp is the species palette shared with the 2D figures (render/common/species.ts).
export { mzRamp } from '../common/species.js';

export function cssColor(c: Rgb | ArrayLike<number>): string {
  const b = (x: number) => Math.round(Math.min(1, Math.max(0, x)) * 255).toString(16).padStart(2, '0');
  return `#${b(c[0])}${b(c[1])}${b(c[2])}`;
}

/**
 * Viridis (S. van der Walt, N. Smith, matplotlib 2.0 default map, 2015; CAM02-UCS lightness rising
 * monotonically), taken from d3-scale-chromatic's table of matplotlib's control points and used
 * over [0, VALUE_MAP_TOP] only: the top of the map is a light yellow that would vanish on the paper
 * background. A 256-entry table read by index keeps the per-point cost of a trajectory low.
 */
export const VALUE_MAP_TOP = 0.85;
const VALUE_LUT = (() => {
  const t = new Float32Array(3 * 256);
  for (let i = 0; i < 256; i++) t.set(hex(interpolateViridis((i / 255) * VALUE_MAP_TOP)), 3 * i);
  return t;
})();

/** Colour of fraction u ∈ [0, 1] of a value range (time of flight, kinetic energy) along the map. */
export function valueRamp(u: number, out: number[] | Float32Array = [0, 0, 0], o = 0): number[] | Float32Array {
  const v = Number.isFinite(u) ? (u < 0 ? 0 : u > 1 ? 1 : u) : 0;
  const i = 3 * Math.round(v * 255);
  out[o] = VALUE_LUT[i]; out[o + 1] = VALUE_LUT[i + 1]; out[o + 2] = VALUE_LUT[i + 2];
  return out;
}
