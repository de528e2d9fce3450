// The self-contained viewer in a real browser: Debian's chromium, headless, via playwright-core.
// WebGL there runs on SwiftShader (CPU). Skips, loudly, only where no chromium binary exists.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCanvas, loadImage } from '@napi-rs/canvas';
import { chromium } from 'playwright-core';
import { chromiumOrWarn } from '../helpers/browser.js';
import { renderHtml } from '../../render/scene3d/html.js';
import { readRunView } from '../../render/scene3d/runInput.js';
import { makeRunFolder } from './fixtures.js';

const exe = chromiumOrWarn('the HTML viewer browser test');

let tmp: string;
let htmlPath: string;
let html: string;

beforeAll(async () => {
  tmp = mkdtempSync(join(tmpdir(), 'iontrail-html-'));
  const run = await readRunView(await makeRunFolder(join(tmp, 'filter'), { kind: 'filter', ions: 30, points: 200 }));
  html = renderHtml(run, { camera: 'iso', color: 'fate', rods: 'hyperbolic' });
  htmlPath = join(tmp, 'view.html');
  writeFileSync(htmlPath, html);
});
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

describe('HTML viewer file', () => {
  it('is one file that loads nothing from outside (no src/href to other files or hosts)', () => {
    expect(html).not.toMatch(/<script[^>]*\ssrc=/i);
    expect(html).not.toMatch(/<link[^>]*\shref=/i);
    expect(html).not.toMatch(/\bimport\s*\(\s*['"]https?:/);
    expect(html).toContain('id="time"');
  });
});

/** Pixels of a PNG screenshot that differ from the viewer's clear colour #f6f4ee by > 24/765. */
async function drawnPixels(png: Buffer): Promise<number> {
  const img = await loadImage(png);
  const c = createCanvas(img.width, img.height);
  const ctx = c.getContext('2d');
  ctx.drawImage(img, 0, 0);
  const d = ctx.getImageData(0, 0, img.width, img.height).data;
  let n = 0;
  for (let i = 0; i < d.length; i += 4) if (Math.abs(d[i] - 0xf6) + Math.abs(d[i + 1] - 0xf4) + Math.abs(d[i + 2] - 0xee) > 24) n++;
  return n;
}

async function rgba(png: Buffer): Promise<Uint8ClampedArray> {
  const img = await loadImage(png);
  const c = createCanvas(img.width, img.height);
  const ctx = c.getContext('2d');
  ctx.drawImage(img, 0, 0);
  return ctx.getImageData(0, 0, img.width, img.height).data;
}

/** Pixels whose colour differs by more than 30/765 between two screenshots of the same size. */
async function differingPixels(a: Buffer, b: Buffer): Promise<number> {
  const [p, q] = [await rgba(a), await rgba(b)];
  let n = 0;
  for (let i = 0; i < p.length; i += 4) if (Math.abs(p[i] - q[i]) + Math.abs(p[i + 1] - q[i + 1]) + Math.abs(p[i + 2] - q[i + 2]) > 30) n++;
  return n;
}

describe.skipIf(!exe)('HTML viewer in headless chromium', () => {
  it('loads with no console errors, no network, and draws a non-blank canvas that the time slider changes', async () => {
    const browser = await chromium.launch({
      executablePath: exe,
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
        '--disable-background-networking', '--disable-component-update', '--disable-sync',
        '--use-angle=swiftshader', '--enable-unsafe-swiftshader'],
    });
    try {
      const page = await browser.newPage({ viewport: { width: 1000, height: 700 } });
      const errors: string[] = [];
      const requests: string[] = [];
      page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
      page.on('pageerror', (e) => errors.push(e.message));
      page.on('request', (r) => { if (!/^(file|blob|data):/.test(r.url())) requests.push(r.url()); });
      await page.goto(pathToFileURL(htmlPath).href);
      await page.waitForSelector('body[data-ready="yes"]', { timeout: 60000 });
      await page.waitForTimeout(300);
      const canvas = page.locator('#view canvas');
      const full = await drawnPixels(await canvas.screenshot());
      const box = await canvas.boundingBox();
      // Electrodes and trajectories of the scene cover well over 1 % of the canvas.
      expect(full).toBeGreaterThan(0.01 * box!.width * box!.height);
      await page.locator('#time').fill('20');
      await page.waitForTimeout(300);
      const early = await drawnPixels(await canvas.screenshot());
      // Early in the flight the ions have covered a fraction of their paths: fewer drawn pixels.
      expect(early).toBeLessThan(full);
      expect(await page.locator('#time-label').textContent()).toMatch(/^t = [\d.]+ (ns|µs|ms)$/);
      // Labels in the canvas: the electrodes' names and voltages from the scene as resolved
      // (fixture: rods at ±(100 V + 600 V cos Ωt)), the scale bar's length and the axis letters.
      const texts = (await page.locator('body').getAttribute('data-labels'))!.split('|');
      expect(texts).toEqual(expect.arrayContaining(['rods x +(100 V + 600 V RF)', 'rods y −(100 V + 600 V RF)', 'x', 'y', 'z']));
      expect(texts.some((t) => /^\d+ mm$/.test(t))).toBe(true);
      // ...drawn into the canvas: hiding them changes a few hundred pixels at least (each of the
      // seven labels is 12–15 px text, some hundreds of pixels of glyphs), and the rest stays.
      await page.locator('#time').fill('1000');
      await page.waitForTimeout(300);
      const withLabels = await canvas.screenshot();
      await page.locator('#labels').click();
      await page.waitForTimeout(300);
      const without = await canvas.screenshot();
      const changed = await differingPixels(withLabels, without);
      expect(changed).toBeGreaterThan(500);
      expect(changed).toBeLessThan(0.2 * box!.width * box!.height);
      expect(errors).toEqual([]);
      expect(requests).toEqual([]);
    } finally {
      await browser.close();
    }
  }, 120_000); // browser start and SwiftShader compile take seconds on a shared 2-core machine
});
