// Figure files appear whole or not at all: encoded in memory, then written atomically
// (sim/core/atomic.ts) after a one-line check of the output folder.

import { existsSync, statSync } from 'node:fs';
import { dirname, extname, resolve } from 'node:path';
import { writeFileAtomic as writeAtomic } from '../../sim/core/atomic.js';

export class OutputError extends Error {
  override name = 'UsageError'; // printed as a one-line user error by the CLI (exit 2)
  readonly exitCode = 2;
}

export type ImageFormat = 'png' | 'svg';

/** Format from the file extension; a one-line error for anything else. */
export function imageFormat(path: string, allowed: readonly string[] = ['png', 'svg']): ImageFormat {
  const ext = extname(path).slice(1).toLowerCase();
  if (!allowed.includes(ext)) {
    throw new OutputError(`-o ${path}: unsupported file type '${ext || '(none)'}' (expected ${allowed.map((a) => '.' + a).join(' or ')})`);
  }
  return ext as ImageFormat;
}

export function checkOutputFolder(path: string): void {
  const dir = dirname(resolve(path));
  if (!existsSync(dir) || !statSync(dir).isDirectory()) {
    throw new OutputError(`-o ${path}: output folder ${dir} does not exist`);
  }
}

export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  checkOutputFolder(path);
  writeAtomic(path, data);
}

/**
 * Finish an SVG from the canvas's SVG backend (Skia's SVG canvas, @napi-rs/canvas): text stays
 * <text> (the canvas is made without SvgExportFlag.ConvertTextToPaths, so it can be searched,
 * selected and edited), and the root gets viewBox="0 0 W H", which Skia does not write, so the
 * figure scales when a page or an editor sets its size. Each font family gets a generic
 * sans-serif fallback for a viewer without the font the figure was laid out with. Skia numbers
 * its element ids (clip paths `cl_N`) from a counter per process, so the same figure drawn after
 * others would get other ids: they are renumbered from 0 in document order, and a figure's bytes
 * do not depend on what the process drew before it.
 */
export function finishSvg(svg: Buffer | string, width: number, height: number): Buffer {
  let s = typeof svg === 'string' ? svg : svg.toString('utf8');
  const ids = new Map<string, string>();
  const counts = new Map<string, number>();
  for (const m of s.matchAll(/\bid="([A-Za-z]+)_(\d+)"/g)) {
    const n = counts.get(m[1]) ?? 0;
    counts.set(m[1], n + 1);
    ids.set(`${m[1]}_${m[2]}`, `${m[1]}_${n}`);
  }
  s = s.replace(/(\bid="|#)([A-Za-z]+_\d+)\b/g, (m, lead: string, id: string) => (ids.has(id) ? `${lead}${ids.get(id)}` : m));
  s = s.replace(/<svg\b([^>]*)>/, (m, attrs: string) => (/\sviewBox=/.test(attrs) ? m : `<svg${attrs} viewBox="0 0 ${width} ${height}">`));
  s = s.replace(/font-family="([^"]*)"/g, (m, fam: string) => (/sans-serif/.test(fam) ? m : `font-family="${fam}, sans-serif"`));
  return Buffer.from(s, 'utf8');
}
