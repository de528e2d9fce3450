// Self-contained HTML viewer of a run: the three.js build (three 0.187, build/three.core.js and
// build/three.module.js) and OrbitControls are embedded base64 and loaded as blob: modules, the
// scene and trajectories are embedded base64 Float32. Opens from disk with no network.

import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { cameraDirection, type CameraName } from './cameras.js';
import type { RodShape } from './electrodes.js';
import { AXIS_COLORS, INK, cssColor } from './palette.js';
import { makeCamera } from './cameras.js';
import { pickAnchor } from './electrodeLabels.js';
import { tickStep } from './labels.js';
import type { RunView } from './runInput.js';
import { b64, flattenObjects } from './sceneExport.js';
import { buildScene } from './sceneGraph.js';
import type { ColorBy, Legend } from './trajectoryColors.js';
import { VIEWER_SCRIPT } from './viewerScript.js';

export interface HtmlOptions { color: ColorBy; rods: RodShape; camera: CameraName }

function threeFile(rel: string): string {
  const req = createRequire(import.meta.url);
  // 'three' resolves to <root>/build/three.cjs (its package.json is not exported).
  const root = dirname(dirname(req.resolve('three')));
  return readFileSync(join(root, rel), 'utf8');
}

const esc = (s: string) => s.replace(/[&<>"]/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;' }[c]!));
const b64text = (s: string) => Buffer.from(s, 'utf8').toString('base64');

function legendHtml(lg: Legend): string {
  if (lg.kind === 'ramp') {
    const stops = Array.from({ length: 17 }, (_, i) => cssColor(lg.map(i / 16, [0, 0, 0]))).join(', ');
    const span = lg.max - lg.min, step = span > 0 ? tickStep(span, 4) : 1;
    const digits = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
    const ticks: string[] = [];
    for (let v = Math.ceil(lg.min / step - 1e-9) * step; span > 0 && v <= lg.max + 1e-9 * span; v += step) {
      ticks.push(`<span class="tick" style="left:${(100 * (v - lg.min) / span).toFixed(2)}%">${v.toFixed(digits)}</span>`);
    }
    const top = lg.clippedTop ? ` <span class="clip">top ≥ ${lg.max.toPrecision(3)}</span>` : '';
    return `<span class="lt">${esc(lg.title)}${lg.unit ? ` (${esc(lg.unit)})` : ''}</span> <span class="ramp" style="background:linear-gradient(90deg, ${stops})">${ticks.join('')}</span>${top}`;
  }
  return `<span class="lt">${lg.title === 'fate' ? 'ion fate' : esc(lg.title)}</span> ` + lg.entries
    .map((e) => `<span class="sw" style="background:${cssColor(e.color)}"></span>${esc(e.label)} (${e.count})`).join(' ');
}

export function renderHtml(run: RunView, opts: HtmlOptions): string {
  const dir = cameraDirection(opts.camera);
  const cutAzimuth = opts.camera === 'axial' ? undefined : Math.atan2(dir.y, dir.x);
  const built = buildScene(run, { rods: opts.rods, color: opts.color, cutAzimuth, lineObjects: false });
  const objects = [...flattenObjects(built.electrodes), ...flattenObjects(built.guides)];
  const { start, t } = run.traj;
  const t32 = new Float32Array(t.length);
  let tMax = 0;
  for (let i = 0; i < t.length; i++) { t32[i] = t[i]; if (t[i] > tMax) tMax = t[i]; }
  // Colours per point, sRGB bytes.
  const rgb8 = new Uint8Array(built.batch.rgb.length);
  for (let i = 0; i < rgb8.length; i++) rgb8[i] = Math.round(built.batch.rgb[i] * 255);
  const b = built.bounds;
  // Labels drawn in the canvas: electrode names and voltages (anchors picked for the opening
  // camera), the scale bar's length under its middle, and the axis letters past the triad's ends.
  const cam = makeCamera(opts.camera, built.bounds, 1000, 700, { top: 0, right: 0, bottom: 0, left: 0 });
  const [s0, s1] = built.scaleBar;
  const barLen = s0.distanceTo(s1);
  const labels = [
    ...built.labels.map((l) => ({ kind: 'electrode', text: l.text, at: pickAnchor(l, cam).toArray(), color: cssColor(INK) })),
    { kind: 'scale', text: `${built.scaleBarMm} mm`, at: s0.clone().lerp(s1, 0.5).setY(s0.y - 0.12 * barLen).toArray(), color: cssColor(INK) },
    ...['x', 'y', 'z'].map((name, i) => {
      const end = built.triad.origin.clone();
      end.setComponent(i, end.getComponent(i) + 1.35 * built.triad.length);
      return { kind: 'axis', text: name, at: end.toArray(), color: cssColor(AXIS_COLORS[i]) };
    }),
  ];
  const data = {
    camera: opts.camera,
    bounds: [b.min.x, b.min.y, b.min.z, b.max.x, b.max.y, b.max.z],
    objects,
    labels,
    trajectories: { position: b64(built.batch.positions), t: b64(t32), start: b64(start), rgb: b64(rgb8), tMax },
  };
  const nIons = start.length - 1;
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8">
<title>${esc(run.sceneName)} — iontrail 3D</title>
<style>
html,body{margin:0;height:100%;font:13px "DejaVu Sans","Liberation Sans",sans-serif;color:#24262b;background:#f6f4ee}
body{display:flex;flex-direction:column}
header{padding:10px 18px 6px;display:flex;justify-content:space-between;align-items:flex-end;gap:16px;flex-wrap:wrap}
h1{font-size:19px;margin:0}
.sub{color:#6b6e75;margin-top:3px}
#view{flex:1;min-height:300px;position:relative}
#view canvas{display:block}
.bar{display:flex;align-items:center;gap:10px;padding:8px 18px;border-top:1px solid #dcd8cc}
#time{flex:1}
button{font:inherit;padding:3px 10px;border:1px solid #b9b4a6;background:#fbfaf6;border-radius:3px;cursor:pointer}
footer{padding:4px 18px 8px;color:#6b6e75;font-size:11px}
.sw{display:inline-block;width:16px;height:4px;margin:0 4px 2px 10px;vertical-align:middle}
.ramp{display:inline-block;position:relative;width:220px;height:10px;vertical-align:middle;margin:0 6px 14px}
.tick{position:absolute;top:12px;transform:translateX(-50%);font-size:11px;color:#24262b}
.clip{color:#6b6e75;font-size:11px}
.lt{font-weight:bold}
</style></head><body>
<header><div><h1>${esc(run.sceneName)}</h1><div class="sub">${nIons} ions, ${t.length.toLocaleString('en-US')} points${run.every > 1 ? ` (every ${run.every}th)` : ''} · units mm · scale bar ${built.scaleBarMm} mm · axes x red, y green, z blue</div></div>
<div>${legendHtml(built.legend)}</div></header>
<div id="view"></div>
<div class="bar"><button id="play">play</button><input id="time" type="range" min="0" max="1000" value="1000" aria-label="time"><span id="time-label"></span>
<button id="labels" aria-pressed="true">labels</button><button data-camera="iso">iso</button><button data-camera="axial">axial</button><button data-camera="side">side</button></div>
<footer>iontrail ${esc(run.toolVersion)} · seed ${esc(run.seed)}${run.sceneFile ? ` · scene ${esc(run.sceneFile)}` : ''} · electrode labels: voltage to ground (field regions: drop across the region), RF zero-to-peak · drag to orbit, wheel to zoom · three.js ${esc(JSON.parse(threeFile('package.json')).version)} embedded</footer>
<script type="application/octet-stream" id="src-three-core">${b64text(threeFile('build/three.core.js'))}</script>
<script type="application/octet-stream" id="src-three">${b64text(threeFile('build/three.module.js'))}</script>
<script type="application/octet-stream" id="src-orbit">${b64text(threeFile('examples/jsm/controls/OrbitControls.js'))}</script>
<script type="application/octet-stream" id="run-data">${b64text(JSON.stringify(data))}</script>
<script type="module">${VIEWER_SCRIPT}</script>
</body></html>
`;
}
