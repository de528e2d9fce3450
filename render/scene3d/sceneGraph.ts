// The three.js scene of one run: electrodes, trajectory polylines, scale bar and axis triad, in
// millimetres. The same scene feeds the software PNG renderer, the glTF exporter and the viewer.

import * as THREE from 'three';
import { buildElectrodes, MM, type RodShape } from './electrodes.js';
import { electrodeLabelPoints, type LabelPoints } from './electrodeLabels.js';
import { AXIS_COLORS, INK } from './palette.js';
import type { RunView } from './runInput.js';
import { trajectoryColors, type ColorBy, type Legend } from './trajectoryColors.js';

export interface SceneOptions {
  rods: RodShape;
  color: ColorBy;
  /** Azimuth of the wedge cut from trap electrodes (toward the viewer); undefined keeps them whole. */
  cutAzimuth?: number;
  /** Axis the scale bar runs along: z for views across the axis, x for the view down it. */
  scaleAxis?: 'x' | 'z';
  /** Build a THREE.Line per ion (glTF, viewer); the software renderer only needs the packed batch. */
  lineObjects?: boolean;
}

/** All trajectories packed for fast drawing: positions in mm, three floats per point. */
export interface PolylineBatch {
  positions: Float32Array;
  start: Int32Array;
  /** RGB per point, 0..1. */
  rgb: Float32Array;
}

export interface BuiltScene {
  scene: THREE.Scene;
  electrodes: THREE.Group;
  trajectories: THREE.Group;
  guides: THREE.Group;
  batch: PolylineBatch;
  legend: Legend;
  /** Box around electrodes, trajectories and guides, mm. */
  bounds: THREE.Box3;
  scaleBarMm: number;
  /** Scale bar ends, mm (drawn along +z below the instrument). */
  scaleBar: [THREE.Vector3, THREE.Vector3];
  /** Axis triad: where its three axes start and how long they are, mm. */
  triad: { origin: THREE.Vector3; length: number };
  /** The electrodes' names and voltages with their candidate anchor points. */
  labels: LabelPoints[];
}

/** 1, 2 or 5 × 10^n not above x. */
export function niceLength(x: number): number {
  const p = 10 ** Math.floor(Math.log10(x));
  const m = x / p;
  return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * p;
}

export function packTrajectories(run: RunView, rgb: Float32Array): PolylineBatch {
  const { x, y, z, start } = run.traj;
  const positions = new Float32Array(3 * x.length);
  for (let i = 0; i < x.length; i++) {
    positions[3 * i] = x[i] * MM; positions[3 * i + 1] = y[i] * MM; positions[3 * i + 2] = z[i] * MM;
  }
  return { positions, start, rgb };
}

export function buildScene(run: RunView, opts: SceneOptions): BuiltScene {
  const scene = new THREE.Scene();
  scene.name = run.sceneName;
  const electrodes = buildElectrodes(run.stages, { rods: opts.rods, cutAzimuth: opts.cutAzimuth });
  scene.add(electrodes);

  const colors = trajectoryColors(run, opts.color);
  const batch = packTrajectories(run, colors.rgb);
  const trajectories = new THREE.Group();
  trajectories.name = 'trajectories';
  const lineMat = new THREE.LineBasicMaterial({ vertexColors: true });
  for (let k = 0; opts.lineObjects !== false && k + 1 < batch.start.length; k++) {
    const a = batch.start[k], b = batch.start[k + 1];
    if (b - a < 2) continue;
    const geo = new THREE.BufferGeometry();
    geo.setAttribute('position', new THREE.BufferAttribute(batch.positions.slice(3 * a, 3 * b), 3));
    geo.setAttribute('color', new THREE.BufferAttribute(colors.rgb.slice(3 * a, 3 * b), 3));
    const line = new THREE.Line(geo, lineMat);
    const row = run.traj.ionRow[k];
    line.name = `ion ${run.ionId[row]}`;
    // Carried into glTF node extras so a viewer can tell which ion a line is.
    line.userData = { ion: run.ionId[row], mz: run.mz[row], fate: run.fate[row] };
    trajectories.add(line);
  }
  scene.add(trajectories);

  scene.updateMatrixWorld(true);
  const bounds = new THREE.Box3().setFromObject(electrodes);
  if (batch.positions.length > 0) {
    const tb = new THREE.Box3().setFromArray(batch.positions);
    bounds.union(tb);
  }
  if (bounds.isEmpty()) bounds.set(new THREE.Vector3(-5, -5, 0), new THREE.Vector3(5, 5, 10));

  // Scale bar along +z, under the instrument; axis triad at the upstream corner.
  const size = bounds.getSize(new THREE.Vector3());
  const scaleBarMm = niceLength(0.25 * (opts.scaleAxis === 'x' ? Math.max(size.x, size.y) : Math.max(size.z, size.x, size.y)));
  const yBar = bounds.min.y - 0.35 * Math.max(size.x, size.y);
  const zBar = bounds.min.z;
  const alongX = opts.scaleAxis === 'x';
  const scaleBar: [THREE.Vector3, THREE.Vector3] = alongX
    ? [new THREE.Vector3(-scaleBarMm / 2, yBar, bounds.max.z), new THREE.Vector3(scaleBarMm / 2, yBar, bounds.max.z)]
    : [new THREE.Vector3(0, yBar, zBar), new THREE.Vector3(0, yBar, zBar + scaleBarMm)];
  const guides = new THREE.Group();
  guides.name = 'guides';
  const tick = 0.04 * scaleBarMm;
  const barGeo = new THREE.BufferGeometry().setFromPoints([
    scaleBar[0], scaleBar[1],
    scaleBar[0].clone().setY(yBar - tick), scaleBar[0].clone().setY(yBar + tick),
    scaleBar[1].clone().setY(yBar - tick), scaleBar[1].clone().setY(yBar + tick),
  ]);
  const bar = new THREE.LineSegments(barGeo, new THREE.LineBasicMaterial({ color: new THREE.Color(...INK) }));
  bar.name = `scale bar ${scaleBarMm} mm`;
  guides.add(bar);
  const triadLen = 0.5 * scaleBarMm;
  const origin = new THREE.Vector3(bounds.min.x, yBar, zBar - 0.1 * scaleBarMm);
  ['x', 'y', 'z'].forEach((name, i) => {
    const end = origin.clone();
    end.setComponent(i, end.getComponent(i) + triadLen);
    const geo = new THREE.BufferGeometry().setFromPoints([origin, end]);
    const l = new THREE.LineSegments(geo, new THREE.LineBasicMaterial({ color: new THREE.Color(...AXIS_COLORS[i]) }));
    l.name = `axis ${name}`;
    guides.add(l);
  });
  scene.add(guides);
  scene.updateMatrixWorld(true);
  bounds.union(new THREE.Box3().setFromObject(guides));
  const labels = electrodeLabelPoints(run.stages, opts.cutAzimuth);
  return { scene, electrodes, trajectories, guides, batch, legend: colors.legend, bounds, scaleBarMm, scaleBar, triad: { origin, length: triadLen }, labels };
}
