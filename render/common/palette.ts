// Colours of the 2D figures. Series colours are the colour-blind-safe set of Okabe & Ito,
// "Color Universal Design" (2008), minus its yellow (too pale on white), in an order of our own
// chosen so neighbouring series differ in lightness as well as hue. CSS hex strings.

export const SERIES_COLORS: readonly string[] = [
  '#0072B2', // blue
  '#D55E00', // vermillion
  '#009E73', // bluish green
  '#CC79A7', // reddish purple
  '#E69F00', // orange
  '#56B4E9', // sky blue
  '#000000', // black
];

export function seriesColor(i: number): string {
  return SERIES_COLORS[((i % SERIES_COLORS.length) + SERIES_COLORS.length) % SERIES_COLORS.length];
}

/** Page and chrome. */
export const PAPER = '#ffffff';
export const PANEL = '#fcfcfa';
export const INK = '#1f2328';
export const INK_SOFT = '#5c636e';
export const GRID = '#e4e6ea';
export const FRAME = '#9aa1ab';
/** Filled stability region and its edge. */
export const REGION_FILL = '#dcebf5';
export const REGION_EDGE = '#0072B2';

/** Sequential ramp for densities: white → blue → near-black (monotone lightness, colour-blind safe). */
const RAMP: readonly [number, number, number][] = [
  [247, 251, 255], [198, 219, 239], [107, 174, 214], [33, 113, 181], [8, 48, 107], [10, 20, 40],
];

/** Ramp colour at u in [0, 1] as [r, g, b] bytes. */
export function densityRgb(u: number): [number, number, number] {
  const x = Math.min(1, Math.max(0, u)) * (RAMP.length - 1);
  const i = Math.min(RAMP.length - 2, Math.floor(x));
  const f = x - i;
  const a = RAMP[i], b = RAMP[i + 1];
  return [Math.round(a[0] + f * (b[0] - a[0])), Math.round(a[1] + f * (b[1] - a[1])), Math.round(a[2] + f * (b[2] - a[2]))];
}

/** '#rrggbb' → [r, g, b] bytes (for tests and raster checks). */
export function hexRgb(hex: string): [number, number, number] {
  return [parseInt(hex.slice(1, 3), 16), parseInt(hex.slice(3, 5), 16), parseInt(hex.slice(5, 7), 16)];
}
