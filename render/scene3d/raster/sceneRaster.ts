// Draws a three.js scene in software: meshes through the camera's projection and view matrices
// into the supersampled depth-buffered electrode layer, line objects and the packed trajectory
// batch into the polyline layer. No WebGL: only three's math (Matrix4, Matrix3) is used.

import * as THREE from 'three';
import type { PolylineBatch } from '../sceneGraph.js';
import type { Layers } from './layers.js';
import { PolylinePainter } from './polylines.js';
import { lambert } from './shading.js';
import { rasterTriangle } from './triangles.js';

export interface LineStyle {
  /** Line width in image pixels. */
  width: number;
  opacity: number;
}

export function toScreen(m: Float32Array | number[], W: number, H: number, x: number, y: number, z: number, out: Float64Array, o: number): boolean {
  // clip = M·(x, y, z, 1), column-major as three stores it.
  const cw = m[3] * x + m[7] * y + m[11] * z + m[15];
  if (!(cw > 1e-9)) return false;
  const cx = (m[0] * x + m[4] * y + m[8] * z + m[12]) / cw;
  const cy = (m[1] * x + m[5] * y + m[9] * z + m[13]) / cw;
  const cz = (m[2] * x + m[6] * y + m[10] * z + m[14]) / cw;
  out[o] = (cx + 1) * 0.5 * W;
  out[o + 1] = (1 - cy) * 0.5 * H;
  out[o + 2] = cz;
  return true;
}

export function rasteriseMeshes(scene: THREE.Object3D, camera: THREE.Camera, L: Layers): number {
  const vp = new THREE.Matrix4().multiplyMatrices(camera.projectionMatrix, camera.matrixWorldInverse);
  const mvp = new THREE.Matrix4();
  const mv = new THREE.Matrix4();
  const nm = new THREE.Matrix3();
  let triangles = 0;
  scene.traverseVisible((obj) => {
    const mesh = obj as THREE.Mesh;
    if (!mesh.isMesh) return;
    const geo = mesh.geometry as THREE.BufferGeometry;
    const mat = (Array.isArray(mesh.material) ? mesh.material[0] : mesh.material) as THREE.MeshLambertMaterial;
    const color = mat.color ?? new THREE.Color(0.7, 0.7, 0.7);
    if (!geo.getAttribute('normal')) geo.computeVertexNormals();
    const pos = geo.getAttribute('position');
    const nor = geo.getAttribute('normal');
    mvp.multiplyMatrices(vp, mesh.matrixWorld);
    mv.multiplyMatrices(camera.matrixWorldInverse, mesh.matrixWorld);
    nm.getNormalMatrix(mv);
    const n = pos.count;
    // Per mesh, not per triangle: screen position, depth, intensity of each vertex.
    const scr = new Float64Array(3 * n);
    const inten = new Float64Array(n);
    const ok = new Uint8Array(n);
    const m = mvp.elements, e = nm.elements;
    for (let i = 0; i < n; i++) {
      ok[i] = toScreen(m, L.ssW, L.ssH, pos.getX(i), pos.getY(i), pos.getZ(i), scr, 3 * i) ? 1 : 0;
      const x = nor.getX(i), y = nor.getY(i), z = nor.getZ(i);
      const vx = e[0] * x + e[3] * y + e[6] * z, vy = e[1] * x + e[4] * y + e[7] * z, vz = e[2] * x + e[5] * y + e[8] * z;
      const l = Math.hypot(vx, vy, vz) || 1;
      inten[i] = lambert(vx / l, vy / l, vz / l);
    }
    const index = geo.getIndex();
    const count = index ? index.count : n;
    for (let t = 0; t + 2 < count; t += 3) {
      const a = index ? index.getX(t) : t, b = index ? index.getX(t + 1) : t + 1, c = index ? index.getX(t + 2) : t + 2;
      if (!ok[a] || !ok[b] || !ok[c]) continue;
      rasterTriangle(L,
        scr[3 * a], scr[3 * a + 1], scr[3 * a + 2], inten[a],
        scr[3 * b], scr[3 * b + 1], scr[3 * b + 2], inten[b],
        scr[3 * c], scr[3 * c + 1], scr[3 * c + 2], inten[c],
        color.r, color.g, color.b);
      triangles++;
    }
  });
  return triangles;
}

/** Line and LineSegments objects (electrode outlines, scale bar), skipping names `skip` accepts. */
export function rasteriseLineObjects(scene: THREE.Object3D, camera: THREE.Camera, L: Layers, style: LineStyle, skip: (o: THREE.Object3D) => boolean): void {
  const vp = new THREE.Matrix4().multiplyMatrices(camera.projectionMatrix, camera.matrixWorldInverse);
  const mvp = new THREE.Matrix4();
  const painter = new PolylinePainter(L);
  const s = new Float64Array(6);
  scene.traverseVisible((obj) => {
    const line = obj as THREE.Line;
    if (!line.isLine || skip(obj)) return;
    const geo = line.geometry as THREE.BufferGeometry;
    const mat = line.material as THREE.LineBasicMaterial;
    const pos = geo.getAttribute('position');
    mvp.multiplyMatrices(vp, line.matrixWorld);
    const m = mvp.elements;
    const step = (line as THREE.LineSegments).isLineSegments ? 2 : 1;
    for (let i = 0; i + 1 < pos.count; i += step) {
      if (!toScreen(m, L.width, L.height, pos.getX(i), pos.getY(i), pos.getZ(i), s, 0)) continue;
      if (!toScreen(m, L.width, L.height, pos.getX(i + 1), pos.getY(i + 1), pos.getZ(i + 1), s, 3)) continue;
      painter.segment(s[0], s[1], s[2], s[3], s[4], s[5], style.width / 2);
    }
    const opacity = (mat.transparent ? mat.opacity : 1) * style.opacity;
    painter.flush(mat.color.r, mat.color.g, mat.color.b, opacity);
  });
}

/**
 * The trajectory batch: every point projected once; points closer than `minStepPx` to the last
 * drawn one are skipped (they would not change the picture), the last point of each ion is kept.
 * Colours are per point (batch.rgb), interpolated along each segment. `scratch` holds one
 * projected polyline (x, y, depth, point index) and is sized by the caller: 4 × the longest trajectory.
 */
export function rasteriseBatch(batch: PolylineBatch, camera: THREE.Camera, L: Layers, style: LineStyle, scratch: Float64Array, minStepPx = 0.6): number {
  const vp = new THREE.Matrix4().multiplyMatrices(camera.projectionMatrix, camera.matrixWorldInverse);
  const m = vp.elements;
  const painter = new PolylinePainter(L);
  const { positions: P, start, rgb } = batch;
  const W = L.width, H = L.height, hw = style.width / 2, min2 = minStepPx * minStepPx;
  let drawn = 0;
  for (let k = 0; k + 1 < start.length; k++) {
    const a = start[k], b = start[k + 1];
    let kept = 0;
    let lx = NaN, ly = NaN;
    for (let i = a; i < b; i++) {
      const o = 4 * kept;
      if (!toScreen(m, W, H, P[3 * i], P[3 * i + 1], P[3 * i + 2], scratch, o)) continue;
      const ddx = scratch[o] - lx, ddy = scratch[o + 1] - ly;
      if (kept > 0 && i < b - 1 && ddx * ddx + ddy * ddy < min2) continue;
      lx = scratch[o]; ly = scratch[o + 1];
      scratch[o + 3] = i;
      kept++;
    }
    for (let j = 0; j + 1 < kept; j++) {
      const o = 4 * j, i0 = 3 * scratch[o + 3], i1 = 3 * scratch[o + 7];
      painter.endColors(rgb[i0], rgb[i0 + 1], rgb[i0 + 2], rgb[i1], rgb[i1 + 1], rgb[i1 + 2]);
      painter.segment(scratch[o], scratch[o + 1], scratch[o + 2], scratch[o + 4], scratch[o + 5], scratch[o + 6], hw);
    }
    if (kept === 1) {
      const i0 = 3 * scratch[3];
      painter.endColors(rgb[i0], rgb[i0 + 1], rgb[i0 + 2], rgb[i0], rgb[i0 + 1], rgb[i0 + 2]);
      painter.segment(scratch[0], scratch[1], scratch[2], scratch[0], scratch[1], scratch[2], hw);
    }
    drawn += kept;
    painter.flushOwnColors(style.opacity);
  }
  return drawn;
}

/**
 * A small cross (arms `r` px from the centre, diagonal) at the last point of each trajectory k
 * that has a colour in `marks` (3 per trajectory; NaN in the first: no mark): where ions struck.
 */
export function markEnds(batch: PolylineBatch, marks: Float32Array, camera: THREE.Camera, L: Layers, r: number, lineWidth: number, opacity: number): number {
  const vp = new THREE.Matrix4().multiplyMatrices(camera.projectionMatrix, camera.matrixWorldInverse);
  const m = vp.elements;
  const painter = new PolylinePainter(L);
  const s = new Float64Array(3);
  const { positions: P, start } = batch;
  const hw = lineWidth / 2;
  let n = 0;
  for (let k = 0; k + 1 < start.length; k++) {
    if (Number.isNaN(marks[3 * k]) || start[k + 1] <= start[k]) continue;
    const i = start[k + 1] - 1;
    if (!toScreen(m, L.width, L.height, P[3 * i], P[3 * i + 1], P[3 * i + 2], s, 0)) continue;
    // Drawn just in front of the end point so the cross sits over the ion's own line.
    const z = s[2] - 1e-6;
    painter.segment(s[0] - r, s[1] - r, z, s[0] + r, s[1] + r, z, hw);
    painter.segment(s[0] - r, s[1] + r, z, s[0] + r, s[1] - r, z, hw);
    painter.flush(marks[3 * k], marks[3 * k + 1], marks[3 * k + 2], opacity);
    n++;
  }
  return n;
}
