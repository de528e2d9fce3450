// One font for every figure, registered from the system once so that text metrics (and so the
// layout) are the same on every machine that has it. DejaVu Sans ships with Debian (fonts-dejavu);
// Liberation Sans is the fallback; otherwise the canvas default sans-serif.

import { existsSync } from 'node:fs';
import { GlobalFonts } from '@napi-rs/canvas';

const CANDIDATES = [
  '/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf',
  '/usr/share/fonts/truetype/liberation/LiberationSans-Regular.ttf',
];
const BOLD = [
  '/usr/share/fonts/truetype/dejavu/DejaVuSans-Bold.ttf',
  '/usr/share/fonts/truetype/liberation/LiberationSans-Bold.ttf',
];

export const FONT_ALIAS = 'iontrail-sans';
let family: string | null = null;

/** The CSS font family to use (registers the font on first call). */
export function fontFamily(): string {
  if (family !== null) return family;
  family = 'sans-serif';
  for (const [i, path] of CANDIDATES.entries()) {
    if (!existsSync(path)) continue;
    if (GlobalFonts.registerFromPath(path, FONT_ALIAS)) {
      if (existsSync(BOLD[i])) GlobalFonts.registerFromPath(BOLD[i], FONT_ALIAS);
      family = FONT_ALIAS;
      break;
    }
  }
  return family;
}

/** A CSS font string, e.g. font(12) → "12px iontrail-sans", font(14, true) bold. */
export function font(px: number, bold = false): string {
  return `${bold ? 'bold ' : ''}${px}px ${fontFamily()}`;
}
