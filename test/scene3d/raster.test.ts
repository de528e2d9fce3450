// The software rasteriser against geometry it must reproduce exactly or within the pixel grid.
import { describe, expect, it } from 'vitest';
import * as THREE from 'three';
import { Layers } from '../../render/scene3d/raster/layers.js';
import { PolylinePainter } from '../../render/scene3d/raster/polylines.js';
import { toScreen } from '../../render/scene3d/raster/sceneRaster.js';
import { lambert } from '../../render/scene3d/raster/shading.js';
import { rasterTriangle } from '../../render/scene3d/raster/triangles.js';
import { makeCamera } from '../../render/scene3d/cameras.js';

const covered = (L: Layers) => L.sDepth.reduce((n, z) => n + (z !== Infinity ? 1 : 0), 0);

describe('triangle rasteriser', () => {
  it('two triangles sharing a diagonal cover a square exactly once (top-left fill rule, Pineda 1988)', () => {
    const L = new Layers(64, 64, 1);
    // Square [8.3, 40.3] × [5.7, 37.7]: pixel centres inside = 32 × 32, none on both triangles.
    rasterTriangle(L, 8.3, 5.7, 0, 1, 40.3, 5.7, 0, 1, 40.3, 37.7, 0, 1, 1, 0, 0);
    const first = covered(L);
    rasterTriangle(L, 8.3, 5.7, 0.5, 1, 40.3, 37.7, 0.5, 1, 8.3, 37.7, 0.5, 1, 0, 1, 0);
    expect(covered(L)).toBe(32 * 32);
    // The second triangle is behind (z 0.5 > 0): it must not overwrite any red pixel of the first.
    let red = 0;
    for (let i = 0; i < L.ssW * L.ssH; i++) if (L.sColor[3 * i] === 1) red++;
    expect(red).toBe(first);
  });

  it('covered pixel count of a large triangle matches its area to within its perimeter', () => {
    // Pixel-centre sampling errs by at most about half a pixel along each edge (common practice, no source).
    const L = new Layers(300, 300, 1);
    const A: [number, number] = [10.2, 20.9], B: [number, number] = [280.4, 60.1], C: [number, number] = [120.7, 290.3];
    rasterTriangle(L, ...A, 0, 1, ...B, 0, 1, ...C, 0, 1, 1, 1, 1);
    const area = Math.abs((B[0] - A[0]) * (C[1] - A[1]) - (B[1] - A[1]) * (C[0] - A[0])) / 2;
    const perim = Math.hypot(B[0] - A[0], B[1] - A[1]) + Math.hypot(C[0] - B[0], C[1] - B[1]) + Math.hypot(A[0] - C[0], A[1] - C[1]);
    expect(Math.abs(covered(L) - area)).toBeLessThan(0.5 * perim);
  });

  it('interpolated depth at the centroid equals the mean of the vertex depths', () => {
    const L = new Layers(90, 90, 1);
    // Centroid of (0,0), (90,0), (0,90) is (30,30); pixel (29,29) has its centre at (29.5, 29.5).
    rasterTriangle(L, 0, 0, -0.6, 1, 90, 0, 0.3, 1, 0, 90, 0.9, 1, 1, 1, 1);
    const z = L.sDepth[29 * 90 + 29];
    const expected = -0.6 + (0.3 + 0.6) * (29.5 / 90) + (0.9 + 0.6) * (29.5 / 90);
    expect(z).toBeCloseTo(expected, 5);
  });
});

describe('projection through the three.js camera', () => {
  it('matches Vector3.project of three 0.187 for each preset', () => {
    const box = new THREE.Box3(new THREE.Vector3(-8, -8, 0), new THREE.Vector3(8, 8, 120));
    const W = 800, H = 500;
    for (const name of ['iso', 'axial', 'side'] as const) {
      const cam = makeCamera(name, box, W, H, { top: 50, right: 20, bottom: 40, left: 20 });
      const m = new THREE.Matrix4().multiplyMatrices(cam.projectionMatrix, cam.matrixWorldInverse).elements;
      const out = new Float64Array(3);
      for (const p of [new THREE.Vector3(1, 2, 3), new THREE.Vector3(-7, 5, 110), new THREE.Vector3(8, -8, 60)]) {
        expect(toScreen(m, W, H, p.x, p.y, p.z, out, 0)).toBe(true);
        const ndc = p.clone().project(cam);
        // Float32 matrix elements: agreement to 1e-3 px over an 800 px image.
        expect(out[0]).toBeCloseTo((ndc.x + 1) * 0.5 * W, 3);
        expect(out[1]).toBeCloseTo((1 - ndc.y) * 0.5 * H, 3);
      }
      // Fitting: every corner of the box lands inside the drawing area.
      for (let i = 0; i < 8; i++) {
        const c = new THREE.Vector3(i & 1 ? 8 : -8, i & 2 ? 8 : -8, i & 4 ? 120 : 0);
        toScreen(m, W, H, c.x, c.y, c.z, out, 0);
        expect(out[0]).toBeGreaterThanOrEqual(20 - 1e-6);
        expect(out[0]).toBeLessThanOrEqual(W - 20 + 1e-6);
        expect(out[1]).toBeGreaterThanOrEqual(50 - 1e-6);
        expect(out[1]).toBeLessThanOrEqual(H - 40 + 1e-6);
      }
    }
  });
});

describe('anti-aliased polylines', () => {
  it('total coverage of a line equals its width × length (box-filter integral, Gupta & Sproull 1981)', () => {
    const L = new Layers(400, 200, 1);
    const painter = new PolylinePainter(L);
    // Slanted segment well inside the image; width 2 px, length ≈ 300 px; round caps add π·1² px².
    const x0 = 40.3, y0 = 50.2, x1 = 330.8, y1 = 130.6, w = 2;
    painter.segment(x0, y0, 0, x1, y1, 0, w / 2);
    painter.flush(1, 1, 1, 1);
    const total = L.lAlpha.reduce((a, b) => a + b, 0);
    const expected = w * Math.hypot(x1 - x0, y1 - y0) + Math.PI * (w / 2) ** 2;
    // The clamp(hw + 0.5 − d) ramp integrates exactly across a straight edge; caps and pixel
    // sampling of the ramp leave under 1 % here.
    expect(Math.abs(total - expected) / expected).toBeLessThan(0.01);
  });

  it('a polyline crossing itself is not darker at the crossing; a nearer line goes over, a farther under', () => {
    const L = new Layers(100, 100, 1);
    const p = new PolylinePainter(L);
    p.segment(10, 50, 0.2, 90, 50, 0.2, 1);
    p.segment(50, 10, 0.2, 50, 90, 0.2, 1);
    p.flush(1, 0, 0, 0.5);
    expect(L.lAlpha[50 * 100 + 50]).toBeCloseTo(0.5, 6);
    // Second line farther away (z 0.8): blended under, red stays on top.
    p.segment(10, 50, 0.8, 90, 50, 0.8, 1);
    p.flush(0, 0, 1, 1);
    const i = 50 * 100 + 30;
    expect(L.lColor[3 * i]).toBeCloseTo(0.5, 6);
    expect(L.lColor[3 * i + 2]).toBeCloseTo(0.5, 6);
    expect(L.lDepth[i]).toBeCloseTo(0.2, 6);
  });
});

describe('Lambert shading', () => {
  it('intensity falls with the cosine of the angle to the light and is two-sided', () => {
    // Lambert's cosine law (Foley et al., 2nd ed., eq. 16.7): I(−n) = I(n), and a normal turned
    // away from every light gets more than the ambient term only through |n·l|.
    const n = new THREE.Vector3(0.3, -0.2, 0.93).normalize();
    expect(lambert(n.x, n.y, n.z)).toBeCloseTo(lambert(-n.x, -n.y, -n.z), 12);
    expect(lambert(-0.45, 0.7, 0.55)).toBeGreaterThan(lambert(0.7, 0.45, 0));
  });
});
