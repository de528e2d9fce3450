// 3D figure as PNG, drawn entirely on the CPU: three.js builds the scene and the camera, our
// rasteriser draws it (raster/), @napi-rs/canvas adds the labels and encodes the PNG.

import { kindNamed } from '../../sim/stages/registry.js';
import type { OutlinePart } from '../../sim/stages/outline.js';
import * as THREE from 'three';
import { makeCamera, cameraDirection, type CameraName } from './cameras.js';
import { MM, type RodShape } from './electrodes.js';
import { drawLabels } from './labels.js';
import { composite } from './raster/composite.js';
import { Layers } from './raster/layers.js';
import { markEnds, rasteriseBatch, rasteriseLineObjects, rasteriseMeshes } from './raster/sceneRaster.js';
import type { RunView } from './runInput.js';
import { buildScene } from './sceneGraph.js';
import { pickAnchor } from './electrodeLabels.js';
import { fateColor } from './palette.js';
import type { ColorBy } from './trajectoryColors.js';

export interface PngOptions {
  camera: CameraName;
  color: ColorBy;
  rods: RodShape;
  width?: number;
  height?: number;
  /** Supersampling factor of the electrode layer (edges anti-aliased by a ss×ss box filter). */
  supersample?: number;
  /** Command line or scene file shown in the footer. */
  sourceNote?: string;
}

export interface PngResult {
  png: Buffer;
  triangles: number;
  pointsDrawn: number;
  width: number;
  height: number;
}

export const MARGINS = { top: 96, right: 40, bottom: 64, left: 40 };

const volts = (v: number) => (Math.abs(v) >= 1000 ? `${(v / 1000).toPrecision(3)} kV` : `${v.toPrecision(3)} V`);

function describeStages(run: RunView): string {
  return run.stages.map((s) => {
    // The stage as stored in provenance: a kind reads its own keys there (an electrodes stage its problem).
    return kindNamed(s.type)?.describe((s.stored ?? s) as unknown as Record<string, unknown>) ?? String(s.type);
  }).join('  →  ');
}

/** Whether any stage of the run draws an electrode of this shape (sim/stages/outline.ts). */
function hasShape(run: RunView, shape: OutlinePart['shape']): boolean {
  return run.stages.some((s) => (kindNamed(s.type)?.outline(s as unknown as Record<string, unknown>) ?? []).some((p) => p.shape === shape));
}

/** Fate whose end points are marked: the ion struck an electrode. */
export const STRUCK_FATE = 'hit';

function openingNote(run: RunView, opened: boolean, marked: boolean): string {
  const notes = marked ? ['×: where an ion struck an electrode or aperture', 'electrodes semi-transparent over hidden ions'] : ['electrodes semi-transparent over hidden ions'];
  if (hasShape(run, 'grid-gap') || hasShape(run, 'ring-stack')) notes.push('field-region labels give the drop across the region');
  if (opened && hasShape(run, 'rod-set')) notes.push('rod nearest the viewer drawn as outline');
  if (opened && hasShape(run, 'hyperbolic-trap')) notes.push('trap cut open toward the viewer');
  return notes.join('; ');
}

export function renderPng(run: RunView, opts: PngOptions): PngResult {
  const width = opts.width ?? 1600, height = opts.height ?? 900, ss = opts.supersample ?? 2;
  const dir = cameraDirection(opts.camera);
  // Cut the trap toward the viewer; looking down the axis a wedge would not open the view.
  const cutAzimuth = opts.camera === 'axial' ? undefined : Math.atan2(dir.y, dir.x);
  const built = buildScene(run, { rods: opts.rods, color: opts.color, cutAzimuth, lineObjects: false, scaleAxis: opts.camera === 'axial' ? 'x' : 'z' });
  const camera = makeCamera(opts.camera, built.bounds, width, height, MARGINS);

  const L = new Layers(width, height, ss);
  const triangles = rasteriseMeshes(built.electrodes, camera, L);
  L.resolveElectrodes();
  rasteriseLineObjects(built.scene, camera, L, { width: 1.2, opacity: 1 },
    (o) => o.name.startsWith('axis ') || o.parent === built.trajectories);

  const nTraj = built.batch.start.length - 1;
  let longest = 0;
  for (let k = 0; k < nTraj; k++) longest = Math.max(longest, built.batch.start[k + 1] - built.batch.start[k]);
  const scratch = new Float64Array(4 * Math.max(1, longest));
  // Dense ensembles are drawn thinner and lighter so the envelope, not single ions, reads.
  const style = nTraj > 300 ? { width: 1.0, opacity: 0.35 } : nTraj > 60 ? { width: 1.3, opacity: 0.6 } : { width: 1.7, opacity: 0.9 };
  const pointsDrawn = rasteriseBatch(built.batch, camera, L, style, scratch);
  const marks = new Float32Array(3 * nTraj).fill(NaN);
  const struck = fateColor(STRUCK_FATE);
  run.traj.ionRow.forEach((row, k) => { if (run.fate[row] === STRUCK_FATE) marks.set(struck, 3 * k); });
  const marked = markEnds(built.batch, marks, camera, L, nTraj > 300 ? 2.2 : 3.2, 1.3, 0.95);

  const rgba = new Uint8ClampedArray(4 * width * height);
  composite(L, rgba);

  const vp = new THREE.Matrix4().multiplyMatrices(camera.projectionMatrix, camera.matrixWorldInverse);
  const a = built.scaleBar[0].clone().applyMatrix4(vp), b = built.scaleBar[1].clone().applyMatrix4(vp);
  const px = (v: THREE.Vector3): [number, number] => [(v.x + 1) * 0.5 * width, (1 - v.y) * 0.5 * height];
  const [ax, ay] = px(a), [bx, by] = px(b);
  const electrodes = built.labels.map((lb) => {
    const [x, y] = px(pickAnchor(lb, camera).clone().applyMatrix4(vp));
    return { text: lb.text, x, y };
  });
  const nPoints = run.traj.t.length;
  const png = drawLabels(rgba, width, height, {
    title: run.sceneName,
    subtitle: `${describeStages(run)}   ·   ${nTraj} ion${nTraj === 1 ? '' : 's'}, ${nPoints.toLocaleString('en-US')} points${run.every > 1 ? ` (every ${run.every}th${run.autoThinned ? ', thinned automatically' : ''})` : ''}   ·   camera ${opts.camera}${hasShape(run, 'rod-set') ? `, ${opts.rods} rods` : ''}`,
    legend: built.legend,
    scaleBarText: `${built.scaleBarMm} mm${opts.camera === 'iso' ? ' (at bar depth)' : ''}`,
    scaleBarPx: [ax, ay, bx, by],
    camera,
    electrodes,
    footerLeft: `iontrail ${run.toolVersion} · seed ${run.seed}${run.sceneFile ? ` · scene ${run.sceneFile}` : ''} · run ${run.dir}`,
    footerRight: openingNote(run, cutAzimuth !== undefined, marked > 0),
  });
  return { png, triangles, pointsDrawn, width, height };
}
