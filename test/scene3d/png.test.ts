// Software-rendered PNGs checked structurally: size, non-blank drawing area, the legend's colours
// present where trajectories are, presets that differ, same input ⇒ same bytes.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCanvas, loadImage } from '@napi-rs/canvas';
import { renderPng, MARGINS } from '../../render/scene3d/png.js';
import { readRunView, type RunView } from '../../render/scene3d/runInput.js';
import { FATE_COLORS, BACKGROUND_TOP, BACKGROUND_BOTTOM, valueRamp } from '../../render/scene3d/palette.js';
import { parseCameraName } from '../../render/scene3d/cameras.js';
import { makeRunFolder } from './fixtures.js';

let tmp: string;
let filter: RunView;
let trap: RunView;

beforeAll(async () => {
  tmp = mkdtempSync(join(tmpdir(), 'iontrail-scene3d-'));
  filter = await readRunView(await makeRunFolder(join(tmp, 'filter'), { kind: 'filter', ions: 40, points: 300 }));
  trap = await readRunView(await makeRunFolder(join(tmp, 'trap'), { kind: 'trap', ions: 12, points: 300 }));
});
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

async function pixels(png: Buffer) {
  const img = await loadImage(png);
  const c = createCanvas(img.width, img.height);
  const ctx = c.getContext('2d');
  ctx.drawImage(img, 0, 0);
  return { w: img.width, h: img.height, data: ctx.getImageData(0, 0, img.width, img.height).data };
}

/** Pixels of the drawing area that differ from the background gradient by more than 12/255. */
function nonBackground(p: { w: number; h: number; data: Uint8ClampedArray }): number {
  let n = 0;
  for (let y = MARGINS.top; y < p.h - MARGINS.bottom; y++) {
    const f = y / (p.h - 1);
    const bg = [0, 1, 2].map((c) => 255 * (BACKGROUND_TOP[c] + (BACKGROUND_BOTTOM[c] - BACKGROUND_TOP[c]) * f));
    for (let x = MARGINS.left; x < p.w - MARGINS.right; x++) {
      const i = 4 * (y * p.w + x);
      if (Math.abs(p.data[i] - bg[0]) + Math.abs(p.data[i + 1] - bg[1]) + Math.abs(p.data[i + 2] - bg[2]) > 12) n++;
    }
  }
  return n;
}

/** Pixels within `tol` (sum of channel differences) of colour c. */
function near(p: { data: Uint8ClampedArray }, c: readonly number[], tol: number): number {
  let n = 0;
  for (let i = 0; i < p.data.length; i += 4) {
    if (Math.abs(p.data[i] - 255 * c[0]) + Math.abs(p.data[i + 1] - 255 * c[1]) + Math.abs(p.data[i + 2] - 255 * c[2]) < tol) n++;
  }
  return n;
}

describe('3D PNG', () => {
  it('is a PNG of the requested size with a drawn scene (PNG spec, ISO/IEC 15948: signature and IHDR)', async () => {
    const r = renderPng(filter, { camera: 'iso', color: 'fate', rods: 'hyperbolic', width: 900, height: 560 });
    expect([...r.png.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    expect(r.png.readUInt32BE(16)).toBe(900);
    expect(r.png.readUInt32BE(20)).toBe(560);
    const p = await pixels(r.png);
    // Electrodes of a 160 mm long instrument fill a good part of the area: at least 5 % of it.
    const area = (900 - MARGINS.left - MARGINS.right) * (560 - MARGINS.top - MARGINS.bottom);
    expect(nonBackground(p)).toBeGreaterThan(0.05 * area);
    expect(r.triangles).toBeGreaterThan(100);
  });

  it('colours by fate with the legend colours: detected and struck ions both appear', async () => {
    const r = renderPng(filter, { camera: 'side', color: 'fate', rods: 'hyperbolic', width: 900, height: 560 });
    const p = await pixels(r.png);
    // Lines are blended (opacity < 1, anti-aliased), so allow 60/765 of channel difference; the
    // legend swatches alone give about 3 × 16 = 48 pixels, so require clearly more than that.
    expect(near(p, FATE_COLORS.detected, 60)).toBeGreaterThan(200);
    expect(near(p, FATE_COLORS.hit, 60)).toBeGreaterThan(200);
  });

  it('by time of flight (the default): both ends of the colour bar appear along the trajectories, and struck ions end in crosses of the hit colour', async () => {
    const r = renderPng(filter, { camera: 'side', color: 'time', rods: 'hyperbolic', width: 900, height: 560 });
    const p = await pixels(r.png);
    // The colour bar alone is 240 × 11 px spread over the whole map (≈ 10 columns per end colour,
    // 110 pixels); the trajectories add far more of the early (dark) and late colours.
    expect(near(p, valueRamp(0) as number[], 60)).toBeGreaterThan(300);
    expect(near(p, valueRamp(1) as number[], 60)).toBeGreaterThan(300);
    // The value map holds no red, so hit-coloured pixels come only from the crosses (fixture: most
    // ions outside the m/z 219–264 window strike the rods).
    // The trap fixture's ions all stay alive: no crosses, only the red x of the axis triad.
    const none = renderPng(trap, { camera: 'side', color: 'time', rods: 'hyperbolic', width: 900, height: 560 });
    const triadOnly = near(await pixels(none.png), FATE_COLORS.hit, 60);
    expect(triadOnly).toBeLessThan(60);
    // Each cross is two 6 px arms about 1.3 px wide: ≥ 10 pixels each, and many ions struck.
    expect(near(p, FATE_COLORS.hit, 60)).toBeGreaterThan(triadOnly + 100);
  });

  it('the three presets give different pictures and each one shows the trap', async () => {
    const seen = new Set<string>();
    for (const camera of ['iso', 'axial', 'side'] as const) {
      const r = renderPng(trap, { camera, color: 'mz', rods: 'hyperbolic', width: 640, height: 420 });
      seen.add(r.png.toString('base64'));
      expect(nonBackground(await pixels(r.png))).toBeGreaterThan(5000);
    }
    expect(seen.size).toBe(3);
  });

  it('same run and options give the same bytes', () => {
    const a = renderPng(trap, { camera: 'iso', color: 'mz', rods: 'cylindrical', width: 640, height: 420 });
    const b = renderPng(trap, { camera: 'iso', color: 'mz', rods: 'cylindrical', width: 640, height: 420 });
    expect(Buffer.compare(a.png, b.png)).toBe(0);
  });

  it('an unknown camera name is a one-line error naming the choices', () => {
    expect(() => parseCameraName('top')).toThrow(/unknown camera 'top'.*iso\|axial\|side/);
  });
});
