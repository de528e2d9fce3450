// The run estimate (sim/runs/estimate.ts) against what a run really writes, and the 5 GB limit.
// The reference is the run folder itself: the bytes of trajectories.arrow and ions.arrow on disk.

import { afterAll, describe, expect, it } from 'vitest';
import { readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';
import { loadSceneFile } from '../../sim/scene/load.js';
import { runScene } from '../../sim/runs/run-scene.js';
import { estimateRun, formatBytes, parseByteSize, DEFAULT_MAX_OUTPUT } from '../../sim/runs/estimate.js';

const dirs: string[] = [];
const temp = () => { const d = tempDir('iontrail-estimate-'); dirs.push(d); return d; };
afterAll(() => { for (const d of dirs) rmSync(d, { recursive: true, force: true }); });

const folderBytes = (dir: string) => readdirSync(dir).reduce((a, f) => a + statSync(join(dir, f)).size, 0);

describe('run estimate against the bytes written', () => {
  it('trap: the trajectories bound holds and is within 1.5× of the file (ions stay to max_time)', async () => {
    // T-7 cooling, 30 ions: trapped ions live to max_time, so the bound is close; the margin covers
    // the few ions lost early and the Arrow framing of each batch.
    const { scene } = loadSceneFile('scenes/t7-trap-cooling.yaml', { set: ['ions.0.count=20', 'ions.1.count=10', 'run.max_time=1ms'] });
    const e = estimateRun(scene);
    const out = join(temp(), 'run');
    const s = await runScene(scene, { out, workers: 1 });
    const traj = statSync(join(out, 'trajectories.arrow')).size;
    const ions = statSync(join(out, 'ions.arrow')).size;
    expect(traj + ions).toBeLessThanOrEqual(e.output_bytes);
    expect(e.ions * e.points_per_ion * 60).toBeLessThan(1.5 * traj);
    expect(e.output_bytes).toBeLessThan(1.5 * folderBytes(out) + 200_000);
    // The estimate is what summary.json carries.
    expect(s.provenance.estimate).toEqual(e);
    // Integration steps: a bound on the steps the run counted, within 1.5× for trapped ions.
    expect(s.stats.steps).toBeLessThanOrEqual(e.ion_steps);
    expect(e.ion_steps).toBeLessThan(1.5 * s.stats.steps);
  }, 60_000);

  it('filter: an upper bound within 4× (ions leave the filter long before max_time)', async () => {
    // QF-4: the bound assumes every ion stays to max_time (300 µs); a transmitted ion crosses the
    // filter in about a third of it, so the files are smaller, by less than 4×.
    const { scene } = loadSceneFile('scenes/qf4-compact-filter.yaml', { set: ['ions.0.count=60'] });
    const e = estimateRun(scene);
    const out = join(temp(), 'run');
    await runScene(scene, { out, workers: 1 });
    const bytes = folderBytes(out);
    expect(bytes).toBeLessThanOrEqual(e.output_bytes);
    expect(e.output_bytes).toBeLessThan(4 * bytes);
  }, 60_000);

  it('TOF without recording: the ions table alone, within 1.5×', async () => {
    const { scene } = loadSceneFile('scenes/lt1-linear-tof.yaml', { set: ['ions.0.count=300', 'ions.1.count=300', 'ions.2.count=300'] });
    const e = estimateRun(scene);
    expect(e.points_per_ion).toBe(0);
    expect(e.ion_steps).toBe(0); // drift and gaps advance in closed form
    const out = join(temp(), 'run');
    await runScene(scene, { out, workers: 1 });
    const ions = statSync(join(out, 'ions.arrow')).size;
    expect(ions).toBeLessThanOrEqual(e.output_bytes);
    expect(e.output_bytes - 200_000).toBeLessThan(1.5 * ions);
  }, 60_000);
});

describe('sizes', () => {
  it('parses decimal and binary units', () => {
    // SI prefixes are decimal, IEC 80000-13 prefixes binary.
    expect(parseByteSize('20GB')).toBe(20e9);
    expect(parseByteSize('500 MB')).toBe(5e8);
    expect(parseByteSize('2GiB')).toBe(2 * 1024 ** 3);
    expect(parseByteSize('1.5TB')).toBe(1.5e12);
    expect(parseByteSize('4096')).toBe(4096);
    expect(() => parseByteSize('20 parsecs')).toThrow(/expects a size such as 20GB/);
    expect(() => parseByteSize('-3GB')).toThrow(/expects a size/);
    expect(formatBytes(5.7e9)).toBe('5.7 GB');
    expect(DEFAULT_MAX_OUTPUT).toBe(5e9);
  });
});

describe('iontrail run: output limit', () => {
  const scene = (count: number, every: number) => `
name: Skerry T-7 output limit check
stages:
  - type: trap
    r0: 7.07 mm
    rf: { amplitude: 400 V, frequency: 1.05 MHz }
ions:
  - { mz: 609, count: ${count}, position: { spread: 0.3 mm }, energy: 0.05 eV }
run: { steps_per_cycle: 40, max_time: 20 us, record_every: ${every} }
`;

  it('refuses a run estimated above 5 GB with one line, writing nothing', () => {
    // 10⁸ ions recording every 10 steps: the case of the issue (it was heading for terabytes).
    const d = temp();
    writeFileSync(join(d, 's.yaml'), scene(100_000_000, 10));
    const r = iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'out')]);
    expect(r.code).toBe(2);
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^iontrail run: the run would write about [\d.]+ [GT]B \(100000000 ions × \d+ recorded points; .*\), above the 5 GB limit; give --max-output \d+GB to allow it$/);
    expect(readdirSync(d)).toEqual(['s.yaml']);
  });

  it('--max-output lowers and raises the limit', () => {
    const d = temp();
    writeFileSync(join(d, 's.yaml'), scene(50, 1));
    const low = iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'out'), '--max-output', '100kB']);
    expect(low.code).toBe(2);
    expect(low.stderr).toMatch(/above the 100 kB limit/);
    expect(readdirSync(d)).toEqual(['s.yaml']);
    const ok = iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'out'), '--max-output', '1GB', '--json']);
    expect(ok.code, ok.stderr).toBe(0);
    expect(ok.stderr).toMatch(/^estimate: 50 ions, at most [\d.]+ (kB|MB) of output, under 1 s on \d+ workers? \([\d.e+]+ ion-steps at most\)\n/);
    expect(JSON.parse(ok.stdout).provenance.estimate.ions).toBe(50);
    const bad = iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'out2'), '--max-output', 'lots']);
    expect(bad.code).toBe(2);
    expect(bad.stderr.trim()).toBe("iontrail run: --max-output expects a size such as 20GB, 500MB or 2GiB, got 'lots'");
  });

  it('report refuses the same way, leaving no bundle or temporary folder', () => {
    const d = temp();
    writeFileSync(join(d, 's.yaml'), scene(100_000_000, 10));
    const r = iontrail(['report', join(d, 's.yaml'), '-o', join(d, 'out')]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toMatch(/^iontrail report: the run would write about [\d.]+ [GT]B [^\n]*$/);
    expect(readdirSync(d)).toEqual(['s.yaml']);
  });

  it('sweep --collect estimates each point and refuses above the limit', () => {
    const d = temp();
    writeFileSync(join(d, 's.yaml'), scene(100, 0));
    const r = iontrail(['sweep', join(d, 's.yaml'), '--vary', 'mz=600..620:3', '--collect', 'ions.alive', '-o', join(d, 'out'), '--max-output', '1kB']);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toMatch(/^iontrail sweep: the run would write about [\d.]+ kB \(100 ions\), above the 1 kB limit[^\n]*$/);
    const ok = iontrail(['sweep', join(d, 's.yaml'), '--vary', 'mz=600..620:3', '--collect', 'ions.alive', '-o', join(d, 'out')]);
    expect(ok.code, ok.stderr).toBe(0);
    expect(ok.stderr).toMatch(/^per point: estimate: 100 ions, at most [\d.]+ kB of output, .*\nestimate: 3 points, under 1 s in all\n/);
    expect(readdirSync(d).sort()).toEqual(['out', 's.yaml']);
  });
});
