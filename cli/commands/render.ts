// iontrail render RUN_DIR -o FILE.png|.glb|.html: the run's electrodes and trajectories in 3D.

import { extname } from 'node:path';
import { flag, parseArgs, requireFlag } from '../args.js';
import { UsageError } from '../errors.js';
import { parseCameraName } from '../../render/scene3d/cameras.js';
import { checkOutputFolder, writeFileAtomic } from '../../render/scene3d/atomicWrite.js';
import type { RodShape } from '../../render/scene3d/electrodes.js';
import { renderGlb } from '../../render/scene3d/glb.js';
import { renderHtml } from '../../render/scene3d/html.js';
import { renderPng } from '../../render/scene3d/png.js';
import { readRunView } from '../../render/scene3d/runInput.js';
import { COLOR_BY, DEFAULT_COLOR_BY, type ColorBy } from '../../render/scene3d/trajectoryColors.js';

export const describe = 'draw a run in 3D: software-rendered PNG, glTF binary (.glb) or self-contained HTML viewer';

const HELP = `usage: iontrail render RUN_DIR -o FILE.png|.glb|.html [options]

  -o, --out FILE     output; the extension picks the format (.png, .glb, .html)
  --camera NAME      iso (default), axial (down the z axis), side (from -x)
  --color BY         time (default): time of flight along each trajectory; energy: kinetic
                     energy along it (bar up to the 99th percentile); mz: one colour per
                     species; fate: one colour per fate
  --rods SHAPE       hyperbolic (default) or cylindrical
  --size WxH         PNG size in pixels (default 1600x900)
  --ions LIST        ions to draw, e.g. 0-99,250 (default all)
  --every N          keep every N-th recorded point of each ion and its last (default 1,
                     or thinned to about 4e6 points when more were recorded)
  --json             print what was written as JSON on stdout
`;

const FORMATS = ['.png', '.glb', '.html'] as const;

function choice<T extends string>(value: string | undefined, allowed: readonly T[], name: string, dflt: T): T {
  if (value === undefined) return dflt;
  if ((allowed as readonly string[]).includes(value)) return value as T;
  throw new UsageError(`--${name} '${value}' is not one of ${allowed.join('|')}`);
}

export function parseIonList(text: string): number[] {
  const out: number[] = [];
  for (const part of text.split(',')) {
    const m = /^\s*(\d+)\s*(?:-\s*(\d+)\s*)?$/.exec(part);
    if (!m) throw new UsageError(`--ions '${text}' is not a list of ion numbers like 0-99,250`);
    const a = Number(m[1]), b = m[2] !== undefined ? Number(m[2]) : a;
    if (b < a) throw new UsageError(`--ions range '${part.trim()}' runs backwards`);
    for (let i = a; i <= b; i++) out.push(i);
  }
  return out;
}

export async function run(argv: string[]): Promise<number> {
  const args = parseArgs(argv, {
    values: ['out', 'camera', 'color', 'rods', 'size', 'ions', 'every'],
    switches: ['json', 'help'],
    aliases: { o: 'out', h: 'help' },
  }, 'render');
  if (args.switches.has('help')) { process.stdout.write(HELP); return 0; }
  if (args.positional.length !== 1) throw new UsageError('give exactly one RUN_DIR (iontrail render RUN_DIR -o FILE.png)');
  const dir = args.positional[0];
  const out = requireFlag(args, 'out', 'render', 'scene.png');
  const ext = extname(out).toLowerCase() as (typeof FORMATS)[number];
  if (!FORMATS.includes(ext)) throw new UsageError(`-o ${out}: unknown extension '${extname(out) || '(none)'}'; expected .png, .glb or .html`);
  const camera = parseCameraName(flag(args, 'camera') ?? 'iso');
  const color = choice<ColorBy>(flag(args, 'color'), COLOR_BY, 'color', DEFAULT_COLOR_BY);
  const rods = choice<RodShape>(flag(args, 'rods'), ['hyperbolic', 'cylindrical'], 'rods', 'hyperbolic');
  let width = 1600, height = 900;
  const size = flag(args, 'size');
  if (size !== undefined) {
    const m = /^(\d+)x(\d+)$/.exec(size);
    if (!m || +m[1] < 320 || +m[2] < 240 || +m[1] > 8000 || +m[2] > 8000) throw new UsageError(`--size '${size}' must be WxH in pixels, 320x240 to 8000x8000`);
    width = +m[1]; height = +m[2];
  }
  const everyText = flag(args, 'every');
  const every = everyText === undefined ? undefined : Number(everyText);
  if (every !== undefined && (!Number.isInteger(every) || every < 1)) throw new UsageError(`--every '${everyText}' must be a whole number ≥ 1`);
  const ionsText = flag(args, 'ions');
  const ions = ionsText !== undefined ? parseIonList(ionsText) : undefined;
  // Fail on a missing output folder before the (possibly long) read and render.
  checkOutputFolder(out);

  const t0 = performance.now();
  const view = await readRunView(dir, { ions, everyNth: every, velocities: color === 'energy' });
  let bytes: Uint8Array | string;
  if (ext === '.png') bytes = renderPng(view, { camera, color, rods, width, height }).png;
  else if (ext === '.glb') bytes = await renderGlb(view, { camera, color, rods });
  else bytes = renderHtml(view, { camera, color, rods });
  writeFileAtomic(out, bytes);
  const seconds = (performance.now() - t0) / 1000;
  const size_bytes = typeof bytes === 'string' ? Buffer.byteLength(bytes) : bytes.byteLength;
  const ionsDrawn = view.traj.start.length - 1;
  if (args.switches.has('json')) {
    process.stdout.write(JSON.stringify({ out, format: ext.slice(1), camera, color, rods, ions: ionsDrawn, points: view.traj.t.length, bytes: size_bytes, wall_time_s: seconds }) + '\n');
  } else {
    process.stderr.write(`render: wrote ${out} (${ionsDrawn} ions, ${view.traj.t.length} points, ${(size_bytes / 1024).toFixed(0)} KiB, ${seconds.toFixed(2)} s)\n`);
  }
  return 0;
}
