// `iontrail demo` (what `npm start` runs) writes a review bundle for every demo scene, and a report's
// results do not depend on the number of workers (DESIGN.md: same scene + seed ⇒ same bytes).
import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';

const tmp = tempDir('iontrail-demo-');
afterAll(() => rmSync(tmp, { recursive: true, force: true }));
// The demo's electrode scenes solve their fields into a cache of this test's own.
process.env.XDG_CACHE_HOME = join(tmp, 'field-cache');

describe('demo', () => {
  it('writes report.html, report.md, results.json and run/ for each demo scene and prints the per-species lines', () => {
    const out = join(tmp, 'demo');
    const r = iontrail(['demo', '-o', out]);
    expect(r.code, r.stderr).toBe(0);
    for (const scene of ['qf4-compact-filter', 't7-trap-cooling', 't7-mass-scan', 'lt1-linear-tof', 'rt1-reflectron-tof', 'qf4r-round-rods', 't7t-truncated-trap', 'c7-cylindrical-trap']) {
      for (const f of ['report.html', 'report.md', 'results.json', 'run/summary.json']) expect(existsSync(join(out, scene, f)), `${scene}/${f}`).toBe(true);
      expect(r.stdout).toContain(`$ iontrail report scenes/${scene}.yaml -o ${join(out, scene)} --force`);
      expect(r.stdout).toContain(`report: ${join(out, scene, 'report.html')}`);
    }
    expect(r.stdout).toMatch(/m\/z 502: \d+ detected, \d+ hit, \d+ missed, \d+ returned, \d+ alive of 1000 \(transmission [\d.]+ %\)/);
    expect(r.stdout).toMatch(/cooling: tau [\d.]+ ms/);
    expect(r.stdout).toMatch(/verified on the bench/);
    // The solved scenes: the round-rod filter passes its m/z 502 ions, the truncated trap holds m/z 200,
    // the cylindrical trap's scan ejects some of its m/z 200 ions onto the detector.
    expect(r.stdout).toMatch(/m\/z 502: \d+ detected, \d+ hit, \d+ missed, \d+ returned, \d+ alive of 100 \(/);
    expect(r.stdout).toMatch(/m\/z 200: 0 detected, 0 hit, 0 missed, 0 returned, 100 alive of 100 \(/);
    expect(r.stdout).toMatch(/m\/z 200: [1-9]\d* detected, \d+ hit, \d+ missed, \d+ returned, 0 alive of 60 \(/);
  }, 300_000); // eight scenes at full size on a shared 2-core machine (about 30 s alone)
});

describe('workers', () => {
  it('results.json and the ions table are the same with 1 and 2 workers, apart from timing and the worker count', () => {
    const run = (w: number) => {
      const dir = join(tmp, `lt1-w${w}`);
      const r = iontrail(['report', 'scenes/lt1-linear-tof.yaml', '-o', dir, '--workers', String(w)]);
      expect(r.code, r.stderr).toBe(0);
      const j = JSON.parse(readFileSync(join(dir, 'results.json'), 'utf8'));
      for (const k of ['report_wall_time_s', 'run_wall_time_s', 'started_at', 'workers', 'command_line']) delete j.provenance[k];
      return { j, ions: readFileSync(join(dir, 'run', 'ions.arrow')) };
    };
    const a = run(1), b = run(2);
    expect(b.j).toEqual(a.j);
    expect(b.ions.equals(a.ions)).toBe(true);
  }, 120_000);
});
