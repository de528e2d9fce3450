// `iontrail run` end to end: the run folder of issue 3 (names kept exactly), byte-identical output
// for 1 and 2 workers, refusal of an existing folder, Ctrl-C leaving a valid incomplete folder.

import { describe, expect, it } from 'vitest';
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { iontrail, iontrailAsync, tempDir } from '../helpers/cli.js';
import { expectInterruptedRun } from '../helpers/interrupted.js';
import { readIons, readSummary, readTrajectories } from '../../sim/runfolder/reader.js';

const SCENE = `
name: Skerry QF-4 determinism check
seed: 42
stages:
  - type: quadrupole
    length: 150 mm
    r0: 4 mm
    rf: { amplitude: 600 V, frequency: 1.2 MHz, phase: 0 deg }
    dc: 100 V
  - type: drift
    length: 20 mm
ions:
  - mz: 502
    count: 700
    position: { x: 0 mm, y: 0 mm, z: 0 mm, spread: 0.3 mm }
    energy: 5 eV
    energy_spread: 0.2 eV
    angle_spread: 1 deg
  - mz: 480
    count: 300
    position: { spread: 0.3 mm }
    energy: 5 eV
run: { steps_per_cycle: 40, max_time: 300 us, record_every: 25 }
`;

describe('iontrail run', () => {
  it('writes the run folder with the named files and columns', () => {
    const d = tempDir();
    writeFileSync(join(d, 's.yaml'), SCENE);
    const r = iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'out'), '--json', '--workers', '1', '--csv']);
    expect(r.code, r.stderr).toBe(0);
    const summary = JSON.parse(r.stdout);
    expect(Object.keys(summary.ions)).toEqual(['total', 'detected', 'hit', 'missed', 'returned', 'alive']);
    expect(summary.ions.total).toBe(1000);
    const i = summary.ions;
    expect(i.detected + i.hit + i.missed + i.returned + i.alive).toBe(1000);
    expect(summary.species).toHaveLength(2);
    expect(summary.species[0].transmission).toBeCloseTo(summary.species[0].detected / 700, 12);
    expect(summary.stats.steps).toBeGreaterThan(0);
    expect(summary.provenance.seed).toBe(42);
    expect(summary.provenance.tool_version).toMatch(/^\d+\.\d+\.\d+/);
    const files = readdirSync(join(d, 'out')).sort();
    expect(files).toEqual(expect.arrayContaining(['summary.json', 'ions.arrow', 'trajectories.arrow', 'ions.csv', 'trajectories.csv']));
    const ions = readIons(join(d, 'out'));
    for (const col of ['ion', 'population', 'mz', 'charge', 'x0', 'y0', 'z0', 'vx0', 'vy0', 'vz0', 'fate', 'end_time',
      'end_x', 'end_y', 'end_z', 'end_vx', 'end_vy', 'end_vz', 'end_ke_ev', 'end_stage', 'collisions', 'entry_rf_phase']) {
      expect((ions as unknown as Record<string, ArrayLike<unknown>>)[col], col).toBeDefined();
      expect((ions as unknown as Record<string, ArrayLike<unknown>>)[col].length, col).toBe(1000);
    }
    // Detected ions left the far end: end_z is the end of the last stage (170 mm).
    const det = ions.fate.map((f, i) => (f === 'detected' ? i : -1)).filter((i) => i >= 0);
    expect(det.length).toBe(summary.ions.detected);
    for (const i of det) expect(ions.end_z[i]).toBeCloseTo(0.17, 12);
    // Hit ions end at the field radius (within one step's travel).
    const csvHead = readFileSync(join(d, 'out', 'ions.csv'), 'utf8').split('\n')[0];
    expect(csvHead.split(',').slice(0, 4)).toEqual(['ion', 'population', 'mz', 'charge']);
  });

  it('gives the same bytes with 1 and 2 workers', () => {
    const d = tempDir();
    writeFileSync(join(d, 's.yaml'), SCENE);
    for (const w of ['1', '2']) {
      const r = iontrail(['run', join(d, 's.yaml'), '-o', join(d, `w${w}`), '--workers', w]);
      expect(r.code, r.stderr).toBe(0);
    }
    for (const f of ['ions.arrow', 'trajectories.arrow', 'history.arrow']) {
      const a = readFileSync(join(d, 'w1', f));
      const b = readFileSync(join(d, 'w2', f));
      expect(a.equals(b), f).toBe(true);
    }
    // summary.json differs only in wall time, start time, worker count and command line.
    const strip = (s: any) => { delete s.stats.wall_s; delete s.stats.ion_steps_per_s; delete s.provenance.started_at; delete s.provenance.workers; delete s.provenance.command_line; return s; };
    expect(strip(readSummary(join(d, 'w1')))).toEqual(strip(readSummary(join(d, 'w2'))));
  });

  it('refuses an existing folder without --force and leaves it untouched', () => {
    const d = tempDir();
    writeFileSync(join(d, 's.yaml'), SCENE.replace('count: 700', 'count: 10').replace('count: 300', 'count: 5'));
    expect(iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'out')]).code).toBe(0);
    const before = readFileSync(join(d, 'out', 'ions.arrow'));
    const r = iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'out'), '--seed', '9']);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/already exists.*--force/);
    expect(readFileSync(join(d, 'out', 'ions.arrow')).equals(before)).toBe(true);
    expect(readdirSync(d).filter((f) => f.includes('partial'))).toEqual([]);
    const f = iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'out'), '--seed', '9', '--force']);
    expect(f.code).toBe(0);
    expect(readSummary(join(d, 'out')).provenance.seed).toBe(9);
  });

  it('applies --set overrides and --seed', () => {
    const d = tempDir();
    writeFileSync(join(d, 's.yaml'), SCENE);
    const r = iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'o'), '--json', '--set', 'ions.0.count=50', '--set', 'ions.1.count=20', '--set', 'stages.0.dc=105V']);
    expect(r.code, r.stderr).toBe(0);
    const s = JSON.parse(r.stdout);
    expect(s.ions.total).toBe(70);
    expect(s.provenance.scene.stages[0].dc).toBe(105);
  });

  it('keeps the finished ions and says incomplete when interrupted', async () => {
    const d = tempDir();
    const long = SCENE.replace('count: 700', 'count: 400000').replace('record_every: 25', 'record_every: 0');
    writeFileSync(join(d, 's.yaml'), long);
    const out = join(d, 'out');
    const child = iontrailAsync(['run', join(d, 's.yaml'), '-o', out, '--workers', '2']);
    // Wait until the run has started writing (its temp folder exists), then interrupt.
    const t0 = Date.now();
    while (!readdirSync(d).some((f) => f.includes('partial')) && Date.now() - t0 < 60_000) await new Promise((r) => setTimeout(r, 50));
    await new Promise((r) => setTimeout(r, 500));
    child.kill('SIGINT');
    const code = await new Promise<number>((r) => child.on('exit', (c) => r(c ?? -1)));
    expect(code).toBe(130);
    expectInterruptedRun(out, 400300, /interrupted \(SIGINT\)/);
  });
});

describe('scene errors', () => {
  const cases: [string, string, RegExp][] = [
    ['unknown key with a hint', SCENE.replace('energy_spread:', 'energy_sprad:'), /s\.yaml:\d+: ions\.0\.energy_sprad: unknown key \(did you mean 'energy_spread'\?\)/],
    ['wrong unit names line, key and unit', SCENE.replace('r0: 4 mm', 'r0: 4 V'), /s\.yaml:7: stages\.0\.r0: expects a length such as 4 mm, got '4 V'/],
    ['missing unit', SCENE.replace('length: 150 mm', 'length: 150'), /s\.yaml:6: stages\.0\.length: expects a length such as 4 mm, got '150' \(no unit\)/],
    ['unknown stage type', SCENE.replace('type: drift', 'type: drfit'), /stages\.1\.type: expects one of .* got 'drfit' \(did you mean 'drift'\?\)/],
    ['zero frequency', SCENE.replace('1.2 MHz', '0 MHz'), /stages\.0\.rf\.frequency: must be greater than zero/],
    ['bad YAML', 'stages: [\n  - type: drift\n', /s\.yaml:\d+: not valid YAML/],
    ['start outside every stage', SCENE.replace('z: 0 mm, spread: 0.3 mm', 'z: -5 mm, spread: 0.3 mm'), /ions\.0\.position\.z: -5 mm lies outside every stage/],
  ];
  for (const [what, text, re] of cases) {
    it(what, () => {
      const d = tempDir();
      writeFileSync(join(d, 's.yaml'), text);
      const r = iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'out')]);
      expect(r.code).toBe(2);
      const lines = r.stderr.trim().split('\n');
      expect(lines, r.stderr).toHaveLength(1);
      expect(lines[0]).toMatch(re);
      expect(existsSync(join(d, 'out'))).toBe(false);
      expect(readdirSync(d).filter((f) => f.includes('partial'))).toEqual([]);
    });
  }
  it('--set on a missing branch is refused', () => {
    const d = tempDir();
    writeFileSync(join(d, 's.yaml'), SCENE);
    const r = iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'out'), '--set', 'stages.7.dc=1V']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--set stages\.7\.dc/);
  });
  it('--set value with a wrong unit names the override', () => {
    const d = tempDir();
    writeFileSync(join(d, 's.yaml'), SCENE);
    const r = iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'out'), '--set', 'stages.0.dc=5mm']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--set stages\.0\.dc: expects a voltage such as 600 V, got '5mm'/);
  });
});

describe('pyarrow round trip', () => {
  it('reads ions.arrow and trajectories.arrow from Python where pyarrow is installed', async () => {
    const probe = spawnSync('python3', ['-c', 'import pyarrow'], { encoding: 'utf8' });
    if (probe.status !== 0) {
      console.warn('SKIPPED: pyarrow is not installed on this machine; the Arrow files are checked from Node only');
      return;
    }
    const d = tempDir();
    writeFileSync(join(d, 's.yaml'), SCENE.replace('count: 700', 'count: 20'));
    expect(iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'o')]).code).toBe(0);
    const py = spawnSync('python3', ['-c', `import pyarrow.ipc as ipc, json
t = ipc.open_file('${join(d, 'o', 'ions.arrow')}').read_all()
r = ipc.open_file('${join(d, 'o', 'trajectories.arrow')}').read_all()
print(json.dumps({'rows': t.num_rows, 'end_ke': t.column('end_ke_ev').to_pylist(), 'points': r.num_rows}))`], { encoding: 'utf8' });
    expect(py.status, py.stderr).toBe(0);
    const got = JSON.parse(py.stdout);
    const ions = readIons(join(d, 'o'));
    expect(got.rows).toBe(ions.ion.length);
    expect(got.end_ke).toEqual(Array.from(ions.end_ke_ev));
    expect(got.points).toBe((await readTrajectories(join(d, 'o'))).t.length);
  });
});
