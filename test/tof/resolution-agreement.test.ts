// TOF resolving power: one definition, R = t/(2Δt) with Δt the FWHM of the arrival peak (t ∝
// sqrt(m/z) ⇒ Δm/m = 2Δt/t; Cotter, Time-of-Flight Mass Spectrometry, ACS 1997, ch. 2; m/Δm at
// 50 % height, IUPAC Orange Book), computed once (sim/analysis/arrival.ts) and shown the same in
// results.json, the report's table and the arrival histogram's legend. Before issue 11 the table
// read 1935 and the legend 1560 for LT-1 m/z 1200.

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';
import { peakOf, tofResolution } from '../../sim/analysis/arrival.js';
import { readRunFolder } from '../../sim/runfolder/reader.js';
import { arrival } from '../../render/plot/kinds/histogram.js';

const tmp = tempDir('iontrail-tofres-');
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

interface Species { mz: number; detected: number; arrival_time_s: number; fwhm_s: number; resolution_fwhm: number }

const SCENES = ['lt1-linear-tof', 'rt1-reflectron-tof'];
const bundles = new Map<string, string>();

beforeAll(() => {
  for (const name of SCENES) {
    const out = join(tmp, name);
    const r = iontrail(['report', `scenes/${name}.yaml`, '-o', out]);
    if (r.code !== 0) throw new Error(`report ${name}: ${r.stderr}`);
    bundles.set(name, out);
  }
});

/** Rows of the report's arrival-peak table (the table after its caption). */
function peakTable(md: string): string[] {
  const lines = md.split('\n');
  const at = lines.findIndex((l) => l.startsWith('Arrival-time peaks; resolution'));
  expect(at).toBeGreaterThan(-1);
  const rows: string[] = [];
  for (let i = at + 1; i < lines.length; i++) {
    if (lines[i].startsWith('|')) rows.push(lines[i]);
    else if (rows.length > 0) break;
  }
  return rows;
}

const sig4 = (v: number) => String(Number(v.toPrecision(4)));

describe.each(SCENES)('%s: results.json, report table and histogram legend agree', (name) => {
  it('every species shows the same resolution in all three places', async () => {
    const dir = bundles.get(name)!;
    const results = JSON.parse(readFileSync(join(dir, 'results.json'), 'utf8'));
    const species: Species[] = results.tof.species;
    expect(species.length).toBeGreaterThan(1);
    const md = readFileSync(join(dir, 'report.md'), 'utf8');
    const run = await readRunFolder(join(dir, 'run'));
    const fig = await arrival.build(run, { values: new Map(), switches: new Set(), width: 1100, height: 800 });
    for (const s of species) {
      // The definition itself: t/(2·FWHM).
      expect(s.resolution_fwhm).toBeCloseTo(s.arrival_time_s / (2 * s.fwhm_s), 6);
      const shown = sig4(s.resolution_fwhm);
      const row = peakTable(md).find((l) => l.startsWith(`| ${s.mz} |`));
      expect(row, `report.md row for m/z ${s.mz}`).toBeDefined();
      expect(row!.split('|').map((c) => c.trim())).toContain(shown);
      const entry = fig.legend!.find((e) => e.label.startsWith(`m/z ${s.mz}:`));
      expect(entry, `legend entry for m/z ${s.mz}`).toBeDefined();
      expect(entry!.label).toContain(`m/Δm ${shown}`);
    }
  });

  it('the FWHM is that of the arrival times in the ions table, within the sampling error of 400 ions', async () => {
    const dir = bundles.get(name)!;
    const run = await readRunFolder(join(dir, 'run'));
    const species: Species[] = JSON.parse(readFileSync(join(dir, 'results.json'), 'utf8')).tof.species;
    for (const s of species) {
      const t: number[] = [];
      for (let r = 0; r < run.ions.ion.length; r++) if (run.ions.fate[r] === 'detected' && run.ions.mz[r] === s.mz) t.push(run.ions.end_time[r]);
      expect(t.length).toBe(s.detected);
      // Independent arithmetic: the Gaussian-equivalent width 2·sqrt(2 ln 2)·σ. These peaks are
      // close to Gaussian (start-position and energy spreads), so the FWHM lies within 25 % of it;
      // the FWHM of 400 samples itself scatters by about 9 % (1σ, measured on Gaussian samples).
      const m = t.reduce((a, b) => a + b, 0) / t.length;
      const sd = Math.sqrt(t.reduce((a, b) => a + (b - m) ** 2, 0) / (t.length - 1));
      expect(s.fwhm_s / (2 * Math.sqrt(2 * Math.LN2) * sd)).toBeGreaterThan(0.75);
      expect(s.fwhm_s / (2 * Math.sqrt(2 * Math.LN2) * sd)).toBeLessThan(1.25);
      expect(s.arrival_time_s).toBeCloseTo(m, 12);
    }
  });
});

// Deterministic samples (Park–Miller minimal standard generator, CACM 31 (1988) 1192; Box–Muller).
function sampler(seed: number): { uniform: () => number; gauss: () => number } {
  let s = seed;
  const uniform = () => { s = (s * 16807) % 2147483647; return s / 2147483647; };
  return { uniform, gauss: () => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform()) };
}

describe('FWHM of a sampled peak (sim/analysis/arrival.ts peakOf)', () => {
  // 20 000 samples: the estimate's scatter is about 1.3 % (9 % at 400, ∝ n^(−1/2)); 4 % is three times that.
  const N = 20000;

  it('Gaussian: FWHM = 2·sqrt(2 ln 2)·σ (definition of the normal density)', () => {
    const g = sampler(12345);
    const v = Array.from({ length: N }, () => 3e-9 * g.gauss() + 20e-6);
    const pk = peakOf(v)!;
    expect(pk.fwhm / (2 * Math.sqrt(2 * Math.LN2) * 3e-9)).toBeGreaterThan(0.96);
    expect(pk.fwhm / (2 * Math.sqrt(2 * Math.LN2) * 3e-9)).toBeLessThan(1.04);
    expect(tofResolution(v)!.resolution).toBeCloseTo(pk.centre / (2 * pk.fwhm), 9);
  });

  it('two Gaussians of σ 1 and 3 (weights 0.8, 0.2): the FWHM of the core, not 2.355 × the inflated σ', () => {
    // Half maximum of 0.8 φ(x) + 0.2 φ(x/3)/3 solved by bisection here: x½ = 1.2436, FWHM 2.487;
    // the sample σ is sqrt(0.8 + 0.2·9) = 1.61, whose Gaussian width 3.80 would be 50 % too wide.
    const phi = (x: number) => Math.exp(-0.5 * x * x) / Math.sqrt(2 * Math.PI);
    const dens = (x: number) => 0.8 * phi(x) + (0.2 * phi(x / 3)) / 3;
    let a = 0, b = 3;
    for (let i = 0; i < 60; i++) { const c = 0.5 * (a + b); if (dens(c) > dens(0) / 2) a = c; else b = c; }
    const exact = 2 * a;
    const g = sampler(777);
    const v = Array.from({ length: N }, () => g.gauss() * (g.uniform() < 0.8 ? 1 : 3));
    const pk = peakOf(v)!;
    expect(pk.fwhm / exact).toBeGreaterThan(0.96);
    expect(pk.fwhm / exact).toBeLessThan(1.06); // the kernel rounds the cusp a little: biased wide, never narrow
  });

  it('no arrivals: no peak; one value: no width, no resolution', () => {
    expect(tofResolution([])).toBeNull();
    expect(tofResolution([1e-5])!.resolution).toBeNull();
  });
});
