// Space charge in composed stages (issue 14): the coupled stepper of sim/engine/coupled-flight.ts
// through `iontrail run` and directly, against Coulomb's law and the Coulomb explosion of a
// uniform sphere; the TOF trend; the one-line refusals.

import { describe, expect, it } from 'vitest';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';
import { loadSceneFile } from '../../sim/scene/load.js';
import { prepareCoupled } from '../../sim/engine/run-coupled.js';
import { CoupledFlight } from '../../sim/engine/coupled-flight.js';
import { gasFactory } from '../../sim/engine/gas-hooks.js';
import { directSolver } from '../../sim/spacecharge/ensemble-step.js';
import { COULOMB_K } from '../../sim/spacecharge/direct.js';
import { ELEMENTARY_CHARGE, ELECTRONVOLT, VACUUM_PERMITTIVITY, ionMassKg } from '../../sim/units/constants.js';
import { uniformSphere } from './clouds.js';
import { readIons, readSummary } from '../../sim/runfolder/index.js';

function csvRows(file: string): Record<string, string>[] {
  const [head, ...rows] = readFileSync(file, 'utf8').trim().split('\n');
  const keys = head.split(',');
  return rows.map((r) => Object.fromEntries(r.split(',').map((v, k) => [keys[k], v])));
}

function run(d: string, name: string, text: string, extra: string[] = []) {
  const f = join(d, `${name}.yaml`);
  writeFileSync(f, text);
  return iontrail(['run', f, '-o', join(d, name), '--json', ...extra]);
}

describe('two ions at rest in a field-free drift tube (Coulomb\'s law)', () => {
  it('move apart with kinetic energies summing to z1 z2 e²/(4π ε0)(1/d − 1/D) within 1e-6', () => {
    const d = tempDir();
    // z1 = 2 (m/z 50), z2 = 1 (m/z 100), 1 mm apart on the axis, at rest. The pair time
    // τ = √(4π ε0 μ d³/(z1 z2 e²)) ≈ 0.3 ms; a step of τ/1500 keeps the Verlet energy error
    // near (h/τ)² ≈ 4e-7 (second order; Hairer, Lubich & Wanner 2006, Sect. I.1.4). A softening of
    // 1 nm changes the pair energy by ε²/(2d²) = 5e-13.
    const r = run(d, 'pair', `
name: Skerry drift pair
stages:
  - { type: drift, length: 1 m }
space_charge: { method: direct, weight: 1, softening: 1 nm }
ions:
  - { mz: 50, charge: 2, count: 1, position: { z: 499.5 mm }, energy: 0 eV }
  - { mz: 100, charge: 1, count: 1, position: { z: 500.5 mm }, energy: 0 eV }
run: { max_time: 3 ms, step_without_rf: 0.2 us, record_every: 0 }
`, ['--csv']);
    expect(r.code, r.stderr).toBe(0);
    const rows = csvRows(join(d, 'pair', 'ions.csv'));
    expect(rows.map((w) => w.fate)).toEqual(['alive', 'alive']);
    const D = Math.abs(Number(rows[1].end_z) - Number(rows[0].end_z));
    const ke = (Number(rows[0].end_ke_ev) + Number(rows[1].end_ke_ev)) * ELECTRONVOLT;
    const want = (2 * ELEMENTARY_CHARGE ** 2 / (4 * Math.PI * VACUUM_PERMITTIVITY)) * (1 / 1e-3 - 1 / D);
    expect(D / 1e-3).toBeGreaterThan(5); // well apart: most of the energy released
    expect(Math.abs(ke / want - 1)).toBeLessThan(1e-6);
    expect(JSON.parse(r.stdout).provenance.integrator.step_chosen_from).toBe('run.step_without_rf');
  });
});

// Coulomb explosion of a uniformly charged sphere at rest, in a long drift tube: each shell keeps
// its enclosed charge, r(t) = r0 f(t), (df/dt)² = (2/τ²)(1 − 1/f), τ² = m R0³/(k Q q) (Reiser,
// Theory and Design of Charged Particle Beams, Wiley 2008, the uniform-sphere expansion), so
//   t(f) = (τ/√2) [ √(f(f − 1)) + ln(√f + √(f − 1)) ],
// and an ion from r0 has gained q Q(<r0)/(4π ε0) (1/r0 − 1/r): q Q(<r0)/(4π ε0 r0) as r → ∞.
const tOfF = (f: number, tau: number) => (tau / Math.SQRT2) * (Math.sqrt(f * (f - 1)) + Math.log(Math.sqrt(f) + Math.sqrt(f - 1)));
function fOfT(t: number, tau: number): number {
  let lo = 1, hi = 2;
  while (tOfF(hi, tau) < t) hi *= 2;
  for (let k = 0; k < 200; k++) { const mid = 0.5 * (lo + hi); if (tOfF(mid, tau) < t) lo = mid; else hi = mid; }
  return 0.5 * (lo + hi);
}

describe('Coulomb explosion of a uniform sphere in a drift tube (Reiser)', () => {
  it('outer radius follows R0·f(t) within 2 %, each ion gains q Q(<r0)/(4π ε0)(1/r0 − 1/r)', async () => {
    const N = 2000, R0 = 50e-6, m = ionMassKg(100, 1), q = ELEMENTARY_CHARGE;
    const tau = Math.sqrt((m * R0 ** 3) / (COULOMB_K * N * q * q));
    const d = tempDir();
    const f = join(d, 'sphere.yaml');
    writeFileSync(f, `
stages:
  - { type: drift, length: 1 m }
space_charge: { method: direct, weight: 1 }
ions:
  - { mz: 100, count: ${N}, position: { z: 500 mm, spread: 10 um, spread_z: 10 um }, energy: 0 eV }
run: { max_time: ${3 * tau} s, record_every: 0 }
`);
    const { scene } = loadSceneFile(f);
    const plan = prepareCoupled(scene);
    const b = plan.batch;
    // The scene draws Gaussian starts; the test places the ions uniformly in the sphere instead.
    const u = uniformSphere(N, R0, m, q, 7);
    const r0 = new Float64Array(N);
    for (let i = 0; i < N; i++) {
      b.x[i] = u.x[i]; b.y[i] = u.y[i]; b.z[i] = 0.5 + u.z[i];
      r0[i] = Math.hypot(u.x[i], u.y[i], u.z[i]);
    }
    const flight = new CoupledFlight(scene, b);
    // τ/100: the explosion test of test/spacecharge/explosion.test.ts found h = τ/100 and τ/400 to agree to 1e-6.
    const steps = 300;
    await flight.run({ h: (3 * tau) / steps, steps, solver: directSolver, softening: plan.softening, weight: 1, gasFor: gasFactory(scene), rec: null, hist: null });
    const fEnd = fOfT(3 * tau, tau);
    expect(fEnd).toBeGreaterThan(2.5);
    // Outer shell (r0 > 0.9 R0). Tolerance 2 % (the issue's); a random sample of N = 2000 point
    // charges lags the fluid solution by about 1 % (explosion.test.ts measured it).
    let s = 0, c = 0;
    const rad = (i: number) => Math.hypot(b.x[i], b.y[i], b.z[i] - 0.5);
    for (let i = 0; i < N; i++) if (r0[i] > 0.9 * R0) { s += rad(i) / r0[i]; c++; }
    expect(c).toBeGreaterThan(100);
    expect(Math.abs(s / c / fEnd - 1)).toBeLessThan(0.02);
    // Energy per ion from its enclosed charge (counted from the drawn ions; no shell crossing).
    const order = Array.from(r0.keys()).sort((i, j) => r0[i] - r0[j]);
    const ratios: number[] = [];
    order.forEach((i, rank) => {
      if (r0[i] < 0.3 * R0) return; // few ions inside: the enclosed charge is grainy there
      const want = COULOMB_K * q * (rank * q) * (1 / r0[i] - 1 / rad(i));
      ratios.push((0.5 * m * (b.vx[i] ** 2 + b.vy[i] ** 2 + b.vz[i] ** 2)) / want);
    });
    ratios.sort((u, v) => u - v);
    const median = ratios[ratios.length >> 1];
    const within = ratios.filter((x) => Math.abs(x - 1) < 0.05).length / ratios.length;
    // The median ion gains what the smooth sphere gives, within 2 % (measured 0.998). Each ion
    // also trades energy with its nearest neighbours, which the smooth sphere does not have
    // (the microfield of a random cloud, ~ N^(−1/3) of the mean field: explosion.test.ts, where a
    // lattice sphere without it holds every ion to 10 %): measured 10th and 90th percentiles 0.85
    // and 1.19 at N = 2000, so the spread is bounded at ±25 %.
    expect(ratios[Math.floor(0.1 * ratios.length)]).toBeGreaterThan(0.75);
    expect(ratios[Math.floor(0.9 * ratios.length)]).toBeLessThan(1.25);
    expect(Math.abs(median - 1)).toBeLessThan(0.02);
  }, 60_000);
});

const tof = (weight: number, count = 300) => `
name: Skerry RT-1 packet with space charge
seed: 5
stages:
  - { type: accelerate, length: 10 mm, voltage: 20 kV }
  - { type: drift, length: 0.8 m, aperture: 20 mm, detect_returning: true }
  - { type: reflectron, length: 0.5 m, voltage: 25 kV }
space_charge: { method: direct, weight: ${weight} }
ions:
  - { mz: 1000, count: ${count}, position: { z: 1 mm, spread: 0.2 mm, spread_z: 0.2 mm }, energy: 0.1 eV }
run: { max_time: 60 us, record_every: 0 }
`;

// A linear TOF (one gap, 1 m drift): no reflectron to refocus the energy spread the packet's own
// field adds, so the arrival spread shows it directly.
const linear = (weight: number) => `
name: Skerry LT-1 packet with space charge
seed: 5
stages:
  - { type: accelerate, length: 10 mm, voltage: 20 kV }
  - { type: drift, length: 1 m, aperture: 20 mm }
space_charge: { method: direct, weight: ${weight} }
ions:
  - { mz: 1000, count: 300, position: { z: 1 mm, spread: 0.2 mm, spread_z: 0.2 mm }, energy: 0.1 eV }
run: { max_time: 40 us, record_every: 0 }
`;

describe('TOF packets with space charge', () => {
  it('arrival spread and delay grow with the weight (fact of the trade, common practice, no source); bytes independent of workers', () => {
    const d = tempDir();
    const out = [1, 100, 1000].map((w) => {
      const r = run(d, `w${w}`, linear(w), ['--workers', '1']);
      expect(r.code, r.stderr).toBe(0);
      return JSON.parse(r.stdout).space_charge.arrivals[0];
    });
    expect(out.map((a) => a.detected)).toEqual([300, 300, 300]);
    // 300 charges: the single-ion spread within 1e-3 (measured 7e-5); then wider and later
    // (measured ratios 1.0012 and 1.020, shifts 0.9 ps and 60 ps).
    expect(Math.abs(out[0].arrival_rms_ratio - 1)).toBeLessThan(1e-3);
    expect(out[1].arrival_rms_ratio).toBeGreaterThan(out[0].arrival_rms_ratio);
    expect(out[2].arrival_rms_ratio).toBeGreaterThan(out[1].arrival_rms_ratio + 0.01);
    expect(out[2].arrival_shift_s).toBeGreaterThan(10 * Math.abs(out[1].arrival_shift_s));
    // summary.json holds the figures printed, and they are those of the ions table (d: the
    // detected ions' mean arrival time, recomputed from ions.arrow, to rounding).
    const sum = readSummary(join(d, 'w1000')) as unknown as { space_charge: { arrivals: unknown[] } };
    expect(sum.space_charge.arrivals[0]).toEqual(out[2]);
    const ions = readIons(join(d, 'w1000'));
    const t = Array.from(ions.end_time as ArrayLike<number>).filter((_, i) => ions.fate[i] === 'detected');
    expect(t).toHaveLength(300);
    expect(Math.abs(t.reduce((u, v) => u + v, 0) / t.length / out[2].mean_arrival_s - 1)).toBeLessThan(1e-12);
    const r2 = run(d, 'w100-2', linear(100), ['--workers', '2']);
    expect(r2.code, r2.stderr).toBe(0);
    expect(readFileSync(join(d, 'w100-2', 'ions.arrow')).equals(readFileSync(join(d, 'w100', 'ions.arrow')))).toBe(true);
  }, 120_000);

  it('with the tree: the same bytes on 1 and 3 workers (threads share the leaves, each ion summed by one)', () => {
    const d = tempDir();
    // 1,500 ions: enough leaves (~60) that three threads each take some.
    const text = linear(100).replace('method: direct', 'method: tree').replace('count: 300', 'count: 1500');
    const a = run(d, 't1', text, ['--workers', '1']), b = run(d, 't3', text, ['--workers', '3']);
    expect(a.code, a.stderr).toBe(0);
    expect(b.code, b.stderr).toBe(0);
    expect(JSON.parse(a.stdout).space_charge.arrivals[0].detected).toBe(1500);
    expect(readFileSync(join(d, 't3', 'ions.arrow')).equals(readFileSync(join(d, 't1', 'ions.arrow')))).toBe(true);
  }, 120_000);

  it('records trajectories ion by ion, a point at each plane crossed', () => {
    const d = tempDir();
    const r = run(d, 'rec', tof(10, 20).replace('record_every: 0', 'record_every: 2'), ['--csv']);
    expect(r.code, r.stderr).toBe(0);
    const pts = csvRows(join(d, 'rec', 'trajectories.csv'));
    const ion0 = pts.filter((p) => p.ion === '0').map((p) => Number(p.t));
    expect(ion0.length).toBeGreaterThan(5);
    for (let k = 1; k < ion0.length; k++) expect(ion0[k]).toBeGreaterThanOrEqual(ion0[k - 1]);
    // The packet enters the reflectron at z = 810 mm and turns back: some point lies beyond it.
    expect(pts.some((p) => p.ion === '0' && Number(p.z) > 0.811)).toBe(true);
  });
});

describe('space charge: bad input is one line, exit 2, nothing written', () => {
  const cases: [string, string, RegExp][] = [
    ['a weight below 1', tof(0.5), /space_charge\.weight.*at least 1/],
    ['a softening larger than the cloud', tof(1).replace('weight: 1 }', 'weight: 1, softening: 5 mm }'), /space_charge\.softening: 5 mm is larger than the starting ion cloud/],
    ['a run larger than the memory', tof(1, 100_000_000), /needs about .* GB of memory, more than/],
  ];
  for (const [what, text, msg] of cases) {
    it(what, () => {
      const d = tempDir();
      const r = run(d, 'bad', text);
      expect(r.code).toBe(2);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(msg);
      expect(existsSync(join(d, 'bad'))).toBe(false);
    });
  }
});
