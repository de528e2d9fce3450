// The README's examples do what its text says (issue 11: a fresh clone found a `check` example that
// did not pass, a scene snippet that detected nothing and a 2D sweep without a peak). The commands
// and the scene snippet are read from README.md's fenced blocks, never copied here; each command runs
// through the built CLI in a temporary folder, and its claim — the comment above it in the README —
// is checked against the output. Claims are checked as ranges and trends, not exact counts, so that
// they hold when the fates and the detector change (detected counts may fall, peaks stay peaks).
//
// Where only the claim matters, the ion counts are cut with --set ions.K.count=N (stated per
// command below) to keep the suite fast; the m/z windows and trends do not depend on the count.

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { basename, join } from 'node:path';
import { parse as parseYaml } from 'yaml';
import { ROOT, iontrail, tempDir } from '../helpers/cli.js';
import { readSweepFolder, sweepSeries } from '../../render/plot/sweep-figure.js';

const README = readFileSync(join(ROOT, 'README.md'), 'utf8');

interface Block { lang: string; body: string }

/** Fenced code blocks of a Markdown text (``` fences at the start of a line). */
function fencedBlocks(md: string): Block[] {
  const out: Block[] = [];
  for (const m of md.matchAll(/^```([\w-]*)\n([\s\S]*?)^```\s*$/gm)) out.push({ lang: m[1], body: m[2] });
  return out;
}

interface Example {
  /** The line as written in the README. */
  line: string;
  /** The comment lines above it and its trailing comment: the claim. */
  claim: string;
  /** Arguments after `npx iontrail`, optional [..] groups removed. */
  args: string[];
}

// Lines of the shell blocks that are not iontrail commands: installing and the suite itself
// (running `npm test` from a test would recurse; `npm start` is the demo, covered by test/report).
const NOT_RUN = new Set(['npm ci && npm start', 'npm test']);

function examples(): Example[] {
  const out: Example[] = [];
  for (const b of fencedBlocks(README).filter((x) => x.lang === 'sh')) {
    let comments: string[] = [];
    for (const raw of b.body.split('\n')) {
      const line = raw.trim();
      if (line === '') { comments = []; continue; }
      if (line.startsWith('#')) { comments.push(line.slice(1).trim()); continue; }
      const hash = line.indexOf(' #');
      const cmd = (hash >= 0 ? line.slice(0, hash) : line).trim();
      const trailing = hash >= 0 ? line.slice(hash + 2).trim() : '';
      if (NOT_RUN.has(cmd)) { comments = []; continue; }
      // The one shell command besides iontrail: making the output folder (done here with mkdirSync).
      const mk = /^mkdir -p (\S+)$/.exec(cmd);
      if (mk) { out.push({ line, claim: comments.join(' '), args: ['mkdir', mk[1]] }); comments = []; continue; }
      if (!cmd.startsWith('npx iontrail ')) throw new Error(`README shell line neither an iontrail command nor known: '${line}'`);
      if (/["'`$]/.test(cmd)) throw new Error(`README command needs a shell to read: '${line}'`);
      const args = cmd.slice('npx iontrail '.length).replace(/\s*\[[^\]]*\]/g, '').trim().split(/\s+/);
      out.push({ line, claim: [...comments, trailing].join(' '), args });
      comments = [];
    }
  }
  return out;
}

const EXAMPLES = examples();
const tmp = tempDir('iontrail-readme-');
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

/** Scene paths from the repository, output paths into the temporary folder (the cwd of each run). */
function localArgs(args: string[]): string[] {
  return args.map((a) => (a.startsWith('scenes/') ? join(ROOT, a) : a));
}

/** --set ions.K.count=N for every population of the scene named in args. */
function fewerIons(args: string[], n: number): string[] {
  const scene = args.find((a) => a.startsWith('scenes/') && a.endsWith('.yaml'))!;
  const ions = (parseYaml(readFileSync(join(ROOT, scene), 'utf8')) as { ions: unknown[] }).ions;
  return ions.flatMap((_, k) => ['--set', `ions.${k}.count=${n}`]);
}

function runExample(e: Example, extra: string[] = []) {
  const r = iontrail([...localArgs(e.args), ...extra], { cwd: tmp });
  expect(r.code, `${e.line}\n${r.stderr}`).toBe(0);
  expect(r.stdout + r.stderr, e.line).not.toMatch(/\bNaN\b|\bundefined\b/);
  return r;
}

const json = (text: string) => JSON.parse(text);

/** The folder an example writes (its -o), in the temporary folder. */
const outOf = (e: Example) => join(tmp, e.args[e.args.indexOf('-o') + 1]);

// Shards, merges and cluster jobs (README "Beyond one machine"), each as written: a part is a run
// or sweep folder that says its slice; a merge gives the unsharded command's bytes; a job folder
// holds what its scheduler reads.
const SHARD_CHECKERS: Checker[] = [
  {
    name: 'run or sweep --shard I/N: a part folder with its own summary that names its slice',
    matches: (e) => (e.args[0] === 'run' || e.args[0] === 'sweep') && e.args.includes('--shard'),
    check: (e) => {
      runExample(e);
      const [i, n] = e.args[e.args.indexOf('--shard') + 1].split('/').map(num);
      const m = json(readFileSync(join(outOf(e), 'shard.json'), 'utf8'));
      expect([m.shard.index, m.shard.count]).toEqual([i, n]);
      expect(json(readFileSync(join(outOf(e), 'summary.json'), 'utf8')).complete).toBe(true);
    },
  },
  {
    name: 'merge: the folder the unsharded command writes, byte for byte (summary.json apart from wall times and parts)',
    matches: (e) => e.args[0] === 'merge',
    check: (e) => {
      runExample(e);
      const inputs = e.args.slice(1, e.args.indexOf('-o'));
      const part = EXAMPLES.find((x) => x.args.includes('--shard') && inputs.includes(x.args[x.args.indexOf('-o') + 1]))!;
      expect(inputs, 'the merge names every part of its job').toHaveLength(num(part.args[part.args.indexOf('--shard') + 1].split('/')[1]));
      // The unsharded command: the part's arguments without --shard I/N and -o.
      const skip = new Set([part.args.indexOf('--shard'), part.args.indexOf('--shard') + 1, part.args.indexOf('-o'), part.args.indexOf('-o') + 1]);
      const whole = join(tmp, `whole-${basename(outOf(e))}`);
      const r = iontrail([...localArgs(part.args.filter((_, k) => !skip.has(k))), '-o', whole], { cwd: tmp });
      expect(r.code, r.stderr).toBe(0);
      const tables = part.args[0] === 'run' ? ['ions.arrow', 'trajectories.arrow', 'history.arrow'] : ['sweep.csv'];
      for (const f of tables) expect(readFileSync(join(outOf(e), f)).equals(readFileSync(join(whole, f))), f).toBe(true);
      const a = json(readFileSync(join(whole, 'summary.json'), 'utf8')), b = json(readFileSync(join(outOf(e), 'summary.json'), 'utf8'));
      expect(b.provenance.shards.count).toBe(inputs.length);
      expect(b.species ?? b.peak).toEqual(a.species ?? a.peak);
    },
  },
  {
    name: 'cluster slurm: a job array of --shards tasks, a merge held by afterok, submit.sh',
    matches: (e) => e.args[0] === 'cluster' && e.args[1] === 'slurm',
    check: (e) => {
      runExample(e);
      const n = num(e.args[e.args.indexOf('--shards') + 1]);
      expect(readFileSync(join(outOf(e), 'shards.sbatch'), 'utf8')).toContain(`#SBATCH --array=0-${n - 1}`);
      const submit = /sh (\S+submit\.sh)/.exec(e.claim)!;
      expect(submit, e.claim).not.toBeNull();
      expect(readFileSync(join(tmp, submit[1]), 'utf8')).toMatch(/--dependency=afterok/);
    },
  },
  {
    name: 'cluster kubernetes: an Indexed Job of --shards completions and a merge Job',
    matches: (e) => e.args[0] === 'cluster' && e.args[1] === 'kubernetes',
    check: (e) => {
      runExample(e);
      const m = parseYaml(readFileSync(join(outOf(e), 'job.yaml'), 'utf8'));
      expect([m.spec.completionMode, m.spec.completions]).toEqual(['Indexed', num(e.args[e.args.indexOf('--shards') + 1])]);
      expect(m.spec.template.spec.containers[0].command.join(' ')).toContain('$JOB_COMPLETION_INDEX');
      expect(existsSync(join(outOf(e), 'merge-job.yaml'))).toBe(true);
    },
  },
];

/** m/z window (`iontrail check --json`) of the scene's first stage, a quadrupole, optionally at another DC. */
function sceneWindow(args: string[], dc?: string): { low: number; high: number; resolution: number } {
  const scene = args.find((a) => a.startsWith('scenes/'))!;
  const q = (parseYaml(readFileSync(join(ROOT, scene), 'utf8')) as { stages: Record<string, any>[] }).stages[0];
  expect(q.type).toBe('quadrupole');
  const flat = (v: string) => v.replace(/\s+/g, '');
  const r = iontrail(['check', '--analyzer', 'quadrupole', '--r0', flat(q.r0), '--freq', flat(q.rf.frequency), '--rf', flat(q.rf.amplitude),
    '--dc', flat(dc ?? q.dc), '--mz', '502', '--json']);
  expect(r.code, r.stderr).toBe(0);
  return json(r.stdout).mz_window;
}
const num = (s: string) => Number(s);

/** "window m/z 498.9–505.4" in a claim. */
function claimedWindow(claim: string): [number, number] | null {
  const m = /window m\/z ([\d.]+)[–-]([\d.]+)/.exec(claim);
  return m ? [num(m[1]), num(m[2])] : null;
}

/** What each kind of README command claims, and how it is checked. Order matters: run before plot. */
/** timeout: ms, for a check longer than vitest's default (5 s). */
interface Checker { name: string; matches: (e: Example) => boolean; check: (e: Example) => void | Promise<void>; timeout?: number }

/** `type:` of the first stage of the scene an example names. */
function firstStageType(e: Example): string | undefined {
  const scene = e.args.find((a) => a.startsWith('scenes/') && a.endsWith('.yaml'));
  if (scene === undefined) return undefined;
  return (parseYaml(readFileSync(join(ROOT, scene), 'utf8')) as { stages: { type: string }[] }).stages[0]?.type;
}

const CHECKERS: Checker[] = [
  {
    // 300 ions: the claim is that every ion stays in the guide.
    name: 'run, multipole guide in gas: all ions held',
    matches: (e) => e.args[0] === 'run' && firstStageType(e) === 'multipole',
    check: (e) => {
      expect(e.claim).toMatch(/all ions held/);
      runExample(e, fewerIons(e.args, 300));
      const s = json(readFileSync(join(outOf(e), 'summary.json'), 'utf8'));
      expect(s.ions.total).toBe(300);
      expect(s.ions.alive).toBe(300);
    },
  },
  {
    // 30 ions per m/z: the claim is where they leave, not how many.
    name: 'run, linear trap scan: the m/z named ejected through the x rods near the q_x named',
    matches: (e) => e.args[0] === 'run' && firstStageType(e) === 'linear-trap',
    check: (e) => {
      runExample(e, fewerIons(e.args, 30));
      const s = json(readFileSync(join(outOf(e), 'summary.json'), 'utf8'));
      const named = /m\/z ([\d, and]+) ejected/.exec(e.claim)![1].match(/\d+/g)!.map(num);
      const q = num(/near q_x ([\d.]+)/.exec(e.claim)![1]);
      expect(s.scan.species.map((x: { mz: number }) => x.mz)).toEqual(named);
      for (const x of s.scan.species) {
        expect(x.ejected, `m/z ${x.mz}`).toBeGreaterThan(20);
        // The claim rounds q_x to two decimals.
        expect(Math.abs(x.ejection_qx_mean - q)).toBeLessThan(0.01);
      }
    },
  },
  {
    name: 'check, linear trap: stable axes and the axial secular frequency the comment names',
    matches: (e) => e.args[0] === 'check' && e.args.includes('linear-trap'),
    check: (e) => {
      const o = json(runExample(e).stdout);
      expect(e.claim).toMatch(/stable in x and y/);
      expect([o.stable_x, o.stable_y]).toEqual([true, true]);
      const f = num(/axial secular frequency about ([\d.]+) kHz/.exec(e.claim)![1]);
      expect(Math.abs(o.axial_secular_hz / 1e3 - f)).toBeLessThan(0.05);
    },
  },
  {
    name: 'field: the axis Legendre terms the comment names (ideal trap U/2 (1 − z²/z0²) fitted on ±4.5 mm)',
    matches: (e) => e.args[0] === 'field',
    check: (e) => {
      runExample(e);
      const s = json(readFileSync(join(outOf(e), 'summary.json'), 'utf8'));
      const m = /c0 about ([\d.]+) V and c2 about (-?[\d.]+) V, higher terms below ([\d.]+) V/.exec(e.claim)!;
      expect(m, e.claim).not.toBeNull();
      const c = s.axis_legendre.map((t: { c_v: number }) => t.c_v);
      // The comment rounds to 0.1 V.
      expect(Math.abs(c[0] - num(m[1]))).toBeLessThanOrEqual(0.05);
      expect(Math.abs(c[2] - num(m[2]))).toBeLessThanOrEqual(0.05);
      for (let n = 3; n < c.length; n++) expect(Math.abs(c[n])).toBeLessThan(num(m[3]));
    },
  },
  {
    name: 'mkdir -p: the output folder the commands below write into',
    matches: (e) => e.args[0] === 'mkdir',
    check: (e) => { mkdirSync(join(tmp, e.args[1]), { recursive: true }); },
  },
  {
    name: 'check, one m/z, text: the verdict and the window the comment names',
    matches: (e) => e.args[0] === 'check' && !e.args.includes('--json'),
    check: (e) => {
      const out = runExample(e).stdout;
      const mz = num(e.args[e.args.indexOf('--mz') + 1]);
      expect(out).toContain(`verdict: m/z ${mz} passes`);
      const m = /window at this DC\/RF ratio: m\/z ([\d.]+) – ([\d.]+)/.exec(out)!;
      expect(m, out).not.toBeNull();
      const [lo, hi] = [num(m[1]), num(m[2])];
      expect(mz).toBeGreaterThan(lo);
      expect(mz).toBeLessThan(hi);
      const claimed = claimedWindow(e.claim);
      expect(claimed, `the comment names the window: ${e.claim}`).not.toBeNull();
      expect(claimed).toEqual([lo, hi]);
    },
  },
  {
    name: 'check, a comma list of m/z: passes and falls outside as the comment says',
    matches: (e) => e.args[0] === 'check' && e.args.includes('--json') && e.args[e.args.indexOf('--mz') + 1].includes(','),
    check: (e) => {
      const arr = json(runExample(e).stdout);
      const mzs = e.args[e.args.indexOf('--mz') + 1].split(',').map(num);
      expect(arr.map((o: { mz: number }) => o.mz)).toEqual(mzs);
      const passes = [...e.claim.matchAll(/(\d+) passes/g)].map((m) => num(m[1]));
      const outside = /([\d ,and]+) fall outside/.exec(e.claim)![1].match(/\d+/g)!.map(num);
      expect(passes.length + outside.length).toBe(mzs.length);
      for (const o of arr) {
        const inside = o.mz >= o.mz_window.low && o.mz <= o.mz_window.high;
        expect(o.first_region, `m/z ${o.mz}`).toBe(passes.includes(o.mz));
        expect(inside, `m/z ${o.mz}`).toBe(passes.includes(o.mz));
        // An unstable axis has no well: null, never the formula's negative number.
        for (const axis of ['x', 'y']) if (o.beta[axis] === null) expect(o.well_depth_v[axis]).toBeNull();
      }
    },
  },
  {
    name: 'check, trap: held, with the low-mass cut-off the comment names',
    matches: (e) => e.args[0] === 'check' && e.args.includes('trap'),
    check: (e) => {
      const o = json(runExample(e).stdout);
      expect(o.stable).toBe(true);
      expect(o.first_region).toBe(true);
      const m = /low-mass cut-off m\/z (\d+)/.exec(e.claim)!;
      expect(m, e.claim).not.toBeNull();
      expect(Math.round(o.lmco_mz)).toBe(num(m[1]));
      expect(o.mz).toBeGreaterThan(o.lmco_mz);
    },
  },
  {
    // 200 ions: the claim is that m/z 502 is transmitted, not a transmission figure.
    name: 'run: a run folder with counts per fate, m/z 502 transmitted',
    matches: (e) => e.args[0] === 'run' && !e.args.includes('--shard') && firstStageType(e) === 'quadrupole',
    check: (e) => {
      runExample(e, fewerIons(e.args, 200));
      const dir = join(tmp, e.args[e.args.indexOf('-o') + 1]);
      const s = json(readFileSync(join(dir, 'summary.json'), 'utf8'));
      expect(s.complete).toBe(true);
      expect(s.ions.total).toBe(200);
      expect(s.ions.detected).toBeGreaterThan(0);
      expect(s.species[0].mz).toBe(502);
      for (const f of ['ions.arrow', 'trajectories.arrow', 'history.arrow']) expect(existsSync(join(dir, f)), f).toBe(true);
    },
  },
  {
    // Solved on first use into a field cache of this test's own (not the user's).
    name: 'run through a solved field: every ion of the claimed m/z alive at the end',
    matches: (e) => e.args[0] === 'run' && e.args.some((a) => a.includes('t7t')),
    check: (e) => {
      process.env.XDG_CACHE_HOME = join(tmp, 'field-cache');
      runExample(e);
      const m = /all (\d+) ions of m\/z (\d+) stay trapped for (\d+) µs/.exec(e.claim)!;
      expect(m, e.claim).not.toBeNull();
      const s = json(readFileSync(join(outOf(e), 'summary.json'), 'utf8'));
      expect(s.species[0].mz).toBe(num(m[2]));
      expect(s.ions.total).toBe(num(m[1]));
      expect(s.species[0].alive).toBe(num(m[1]));
      expect(s.provenance.scene.run.maxTime).toBeCloseTo(num(m[3]) * 1e-6, 12);
      expect(s.provenance.scene.stages[0].field_path.path).toBe('interpolated grid');
    },
  },
  {
    // The full 1000 ions (about 4 s through the solved entrance region). The claim "about N %" holds
    // within ±4 points: four binomial standard errors at 10 % of 1000 (0.95 %), so a changed seed or
    // fate rule does not flip it, while a prefilter that stopped working (1-2 %) fails it.
    name: 'run through the QF-4P prefilter: about the claimed fraction of the m/z named detected',
    matches: (e) => e.args[0] === 'run' && e.args.some((a) => a.endsWith('qf4p-prefilter.yaml')),
    check: (e) => {
      process.env.XDG_CACHE_HOME = join(tmp, 'field-cache');
      runExample(e);
      const m = /about (\d+) % of (\d+) ions of m\/z ([\d.]+) detected/.exec(e.claim)!;
      expect(m, e.claim).not.toBeNull();
      const s = json(readFileSync(join(outOf(e), 'summary.json'), 'utf8'));
      expect(s.ions.total).toBe(num(m[2]));
      expect(s.species[0].mz).toBe(num(m[3]));
      expect(Math.abs((100 * s.ions.detected) / s.ions.total - num(m[1]))).toBeLessThan(4);
      expect(s.provenance.scene.stages[0].field_path.path).toBe('interpolated grid');
    },
  },
  {
    // That an RF-only prefilter ahead of the main rods raises the transmission at high resolution:
    // W. M. Brubaker, Adv. Mass Spectrom. 4, 293 (1968) (volume and page from memory); common
    // practice since. The two counts are independent binomials, so the difference must exceed three
    // standard errors of a difference, √(p₁(1−p₁)/n₁ + p₂(1−p₂)/n₂), to count as more than the
    // counting error (a 3σ rule: 0.13 % one-sided chance of passing by luck). "About N %" as above,
    // within ±2 points at 1-2 % of 1000 (0.4 % standard error: five of them).
    name: 'run without the QF-4P prefilter: about the claimed fraction, below the prefilter run by more than 3 standard errors',
    matches: (e) => e.args[0] === 'run' && e.args.some((a) => a.endsWith('qf4p-no-prefilter.yaml')),
    check: (e) => {
      process.env.XDG_CACHE_HOME = join(tmp, 'field-cache');
      const withPre = EXAMPLES.find((x) => x.args[0] === 'run' && x.args.some((a) => a.endsWith('qf4p-prefilter.yaml')))!;
      const preFile = join(outOf(withPre), 'summary.json');
      if (!existsSync(preFile)) runExample(withPre);
      runExample(e);
      const m = /about (\d+) %/.exec(e.claim)!;
      expect(m, e.claim).not.toBeNull();
      const a = json(readFileSync(preFile, 'utf8')).ions, b = json(readFileSync(join(outOf(e), 'summary.json'), 'utf8')).ions;
      const p1 = a.detected / a.total, p2 = b.detected / b.total;
      expect(Math.abs(100 * p2 - num(m[1]))).toBeLessThan(2);
      const se = Math.sqrt((p1 * (1 - p1)) / a.total + (p2 * (1 - p2)) / b.total);
      expect(p1 - p2).toBeGreaterThan(3 * se);
    },
  },
  {
    // A solved cylindrical trap's scan (its own field cache): the ejection q_z of the solved
    // field's quadrupole term and the m/z per volt as claimed, within the claim's last digit.
    name: 'run of a solved trap scan: ejection q_z and m/z per volt as claimed',
    matches: (e) => e.args[0] === 'run' && e.args.some((a) => a.includes('c7-cylindrical')),
    check: (e) => {
      process.env.XDG_CACHE_HOME = join(tmp, 'field-cache');
      runExample(e, ['--workers', '1']);
      const m = /m\/z (\d+) leaves at q_z about ([\d.]+) of its solved field, ([\d.]+) Th per volt/.exec(e.claim)!;
      expect(m, e.claim).not.toBeNull();
      const s = json(readFileSync(join(outOf(e), 'summary.json'), 'utf8'));
      const sp = s.scan.species.find((x: { mz: number }) => x.mz === num(m[1]));
      expect(sp.ejected).toBeGreaterThan(0);
      expect(Math.abs(sp.ejection_qz_mean - num(m[2]))).toBeLessThan(0.01);
      expect(Math.abs(s.scan.mz_per_volt - num(m[3]))).toBeLessThan(0.005);
    },
  },
  {
    // The stretch sweep as written (4 solves, 4 × 120 ions): the ejection q_z falls from the
    // first point to the last, each end within 0.003 of the claimed value (the ensemble's
    // spread between seeds is about 0.001).
    name: 'sweep of the cap stretch: the ejection q_z falls as claimed',
    matches: (e) => e.args[0] === 'sweep' && e.args.some((a) => a.includes('hyperboloid.shift=')),
    check: (e) => {
      process.env.XDG_CACHE_HOME = join(tmp, 'field-cache');
      runExample(e, ['--workers', '1']);
      const m = /ejection q_z falls from about ([\d.]+) to about ([\d.]+)/.exec(e.claim)!;
      expect(m, e.claim).not.toBeNull();
      const s = json(readFileSync(join(outOf(e), 'summary.json'), 'utf8'));
      const q = s.collected.points.map((p: Record<string, number>) => p['scan.species.1.ejection_qz_mean']);
      expect(Math.abs(q[0] - num(m[1]))).toBeLessThan(0.003);
      expect(Math.abs(q[q.length - 1] - num(m[2]))).toBeLessThan(0.003);
      expect(q[0] - q[q.length - 1]).toBeGreaterThan(0.004);
    },
  },
  {
    // The full count: the matrix path decides 121 × 2000 ions in about a second.
    name: 'sweep over m/z: a bounded peak at m/z 502 inside the Mathieu window, R10 below R50',
    matches: (e) => e.args[0] === 'sweep' && !e.args.includes('--shard') && e.args.filter((a) => a === '--vary').length === 1 && e.args.some((a) => a.startsWith('mz=')),
    check: (e) => {
      runExample(e);
      const s = json(readFileSync(join(tmp, e.args[e.args.indexOf('-o') + 1], 'summary.json'), 'utf8'));
      const p = s.peak;
      // The window of the scene's own point: exact Floquet edges, `iontrail check`.
      const w = sceneWindow(e.args);
      expect(p.mz).toBeGreaterThan(w.low);
      expect(p.mz).toBeLessThan(w.high);
      expect(Math.abs(p.mz - 502)).toBeLessThan(1.5);
      // A sampled transmission peak is no wider than the window plus one sweep step (0.2) each side.
      expect(p.fwhm_mz).toBeGreaterThan(0);
      expect(p.fwhm_mz).toBeLessThan(w.high - w.low + 0.4);
      expect(p.resolution_10).toBeLessThan(p.resolution_50);
    },
  },
  {
    // 200 ions per point: enough to place each peak to a fraction of its width.
    name: 'sweep over m/z and DC: one bounded peak per DC value, R50 rising toward the apex',
    matches: (e) => e.args[0] === 'sweep' && e.args.filter((a) => a === '--vary').length === 2,
    check: (e) => {
      runExample(e, fewerIons(e.args, 200));
      const s = json(readFileSync(join(tmp, e.args[e.args.indexOf('-o') + 1], 'summary.json'), 'utf8'));
      const dcSpec = e.args.find((a) => a.startsWith('stages.0.dc='))!;
      const n = num(dcSpec.split(':')[1]);
      expect(s.peaks).toHaveLength(n);
      let lastR = 0;
      for (const row of s.peaks) {
        const w = sceneWindow(e.args, `${row.value} V`);
        expect(row.peak, `DC ${row.value} V`).not.toBeNull();
        expect(row.peak.fwhm_mz, `DC ${row.value} V: bounded`).not.toBeNull();
        expect(row.peak.mz).toBeGreaterThan(w.low);
        expect(row.peak.mz).toBeLessThan(w.high);
        // The transmitted peak follows the Mathieu window's resolution (ions of finite amplitude
        // narrow it a little: R50 a little above the window's); 30 % covers both sides.
        expect(row.peak.resolution_50 / w.resolution).toBeGreaterThan(0.7);
        expect(row.peak.resolution_50 / w.resolution).toBeLessThan(1.3);
        expect(row.peak.resolution_50).toBeGreaterThan(lastR);
        lastR = row.peak.resolution_50;
      }
    },
  },
  {
    name: 'plot of the two-key sweep: one curve per DC value, no curve longer than the m/z axis',
    matches: (e) => e.args[0] === 'plot' && e.args.includes('sweep'),
    check: (e) => {
      runExample(e);
      expect(readFileSync(join(tmp, e.args[e.args.indexOf('-o') + 1])).subarray(1, 4).toString()).toBe('PNG');
      const t = readSweepFolder(join(tmp, e.args[1]));
      const series = sweepSeries(t, 'mz');
      const keys = t.summary.sweep.values;
      expect(series).toHaveLength(keys['stages.0.dc']);
      for (const s of series) expect(s.rows).toHaveLength(keys.mz);
      expect(series.reduce((a, s) => a + s.rows.length, 0)).toBe(t.summary.sweep.points);
    },
  },
  ...SHARD_CHECKERS,
  {
    // 20 ions per species: the claim is the bundle's contents, not its figures.
    name: 'report: report.html (self-contained), report.md with PNGs, results.json, run/',
    matches: (e) => e.args[0] === 'report' && !e.args.includes('--beside'),
    check: (e) => {
      runExample(e, fewerIons(e.args, 20));
      const dir = join(tmp, e.args[e.args.indexOf('-o') + 1]);
      const html = readFileSync(join(dir, 'report.html'), 'utf8');
      expect(html).not.toMatch(/(src|href)="(https?:)?\/\//);
      const md = readFileSync(join(dir, 'report.md'), 'utf8');
      expect(md).not.toMatch(/\bNaN\b|\bundefined\b/);
      expect(readdirSync(dir).filter((f) => /^fig-.*\.png$/.test(f)).length).toBeGreaterThan(0);
      expect(json(readFileSync(join(dir, 'results.json'), 'utf8')).provenance).toBeDefined();
      expect(existsSync(join(dir, 'run', 'summary.json'))).toBe(true);
    },
  },
  {
    // As written (200 ions per point, 41 points): the claim is the shift of the peak.
    name: 'report --beside: both peaks, the multipole table and A2, the round-rod peak at A2 × the hyperbolic one',
    matches: (e) => e.args[0] === 'report' && e.args.includes('--beside'),
    // Two 41-point sweeps, one through a solved stage: about 20 s on 2 cores.
    timeout: 90_000,
    check: (e) => {
      // The round rods' field is solved on first use: into this file's cache, as for the T-7T run.
      process.env.XDG_CACHE_HOME = join(tmp, 'field-cache');
      runExample(e);
      const dir = join(tmp, e.args[e.args.indexOf('-o') + 1]);
      const b = json(readFileSync(join(dir, 'results.json'), 'utf8')).beside;
      const [round, hyper] = b.sweeps.map((w: { peak: { mz: number } }) => w.peak.mz);
      const m = b.multipoles.find((x: { scene: number }) => x.scene === 0);
      expect(m.terms.find((t: { n: number }) => t.n === 2).relative_cos).toBe(1);
      // Four-fold rods mirrored in x and y: the first higher term is n = 6 (common practice, no source).
      expect(Math.abs(m.terms.find((t: { n: number }) => t.n === 6).relative_cos)).toBeGreaterThan(1e-6);
      const claim = /A2 about ([\d.]+), the round-rod peak about ([\d.]+) m\/z higher/.exec(e.claim)!;
      expect(claim, e.claim).not.toBeNull();
      // The claim rounds A2 to 4 decimals and the shift to 0.1 m/z.
      expect(Math.abs(m.a2.value - num(claim[1]))).toBeLessThanOrEqual(5e-5);
      expect(Math.abs(round - hyper - num(claim[2]))).toBeLessThanOrEqual(0.05);
      // Douglas & Konenkov, Rapid Commun. Mass Spectrom. 16 (2002) 1425: round rods scale a and q by
      // A2, so the peak moves to A2 × m/z (here (A2 − 1) × 502 ≈ 0.88 m/z). 0.25 m/z: the terms n ≥ 6
      // weigh about 4e-4 of the quadrupole at 0.7 r0 (table: 6.2e-5·1.4⁴ + 9.5e-6·1.4⁸), 0.2 m/z at
      // m/z 502 for ions that far out, and the centres of 200-ion points scatter by about 0.04 m/z.
      expect(Math.abs(round - m.a2.value * hyper)).toBeLessThan(0.25);
      const md = readFileSync(join(dir, 'report.md'), 'utf8');
      expect(md).not.toMatch(/\bNaN\b|\bundefined\b/);
      for (const f of ['fig-peaks-beside.png', 'fig-equipotential-0-0.png']) {
        expect(readFileSync(join(dir, f)).subarray(1, 4).toString(), f).toBe('PNG');
        expect(md).toContain(`(${f})`);
      }
    },
  },
  {
    name: 'plot and render of the run folder: PNG images',
    matches: (e) => (e.args[0] === 'plot' && !e.args.includes('sweep')) || e.args[0] === 'render',
    check: (e) => {
      runExample(e);
      expect(readFileSync(join(tmp, e.args[e.args.indexOf('-o') + 1])).subarray(1, 4).toString()).toBe('PNG');
    },
  },
];

describe('README.md shell examples', () => {
  it('finds the commands, and every command has exactly one checked claim', () => {
    expect(EXAMPLES.length).toBeGreaterThanOrEqual(10);
    for (const e of EXAMPLES) expect(CHECKERS.filter((c) => c.matches(e)).map((c) => c.name), e.line).toHaveLength(1);
    for (const c of CHECKERS) expect(EXAMPLES.some((e) => c.matches(e)), c.name).toBe(true);
  });

  // In README order: plot and render read the run and sweep folders the commands above wrote.
  for (const e of EXAMPLES) {
    it(e.line, async () => {
      await CHECKERS.find((c) => c.matches(e))!.check(e);
    }, CHECKERS.find((c) => c.matches(e))?.timeout);
  }
});

describe('README.md scene snippet', () => {
  // The space-charge packet (a limitation's example) has its test of its own: space-charge.test.ts.
  const yamlBlocks = fencedBlocks(README).filter((b) => b.lang === 'yaml' && !b.body.includes('space_charge:'));
  const snippet = yamlBlocks[0]?.body ?? '';
  const file = join(tmp, 'scene.yaml');
  beforeAll(() => writeFileSync(file, snippet));

  it('there is one, and its name claims m/z 502 at the working point of the check example', () => {
    expect(yamlBlocks).toHaveLength(1);
    const scene = parseYaml(snippet);
    expect(scene.name).toMatch(/m\/z 502 at the working point/);
    const quad = scene.stages.find((s: { type: string }) => s.type === 'quadrupole');
    const check = EXAMPLES.find((e) => e.args[0] === 'check' && !e.args.includes('--json'))!;
    const arg = (k: string) => check.args[check.args.indexOf(k) + 1].replace(/V$/, ' V');
    expect(quad.rf.amplitude).toBe(arg('--rf'));
    expect(quad.dc).toBe(arg('--dc'));
    // The window in the snippet's comment is the one the check example claims (and checks).
    const dcComment = snippet.split('\n').find((l) => /^\s*dc: /.test(l) && l.includes('window'))!;
    expect(claimedWindow(dcComment)).toEqual(claimedWindow(check.claim));
  });

  it('runs and detects most of its m/z 502 ions; nothing prints NaN', () => {
    // 300 ions: the claim is "most", a fraction well above one half (it is about three quarters).
    const out = join(tmp, 'snippet-run');
    const r = iontrail(['run', file, '-o', out, '--set', 'ions.0.count=300'], { cwd: tmp });
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout + r.stderr).not.toMatch(/\bNaN\b/);
    const s = json(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(s.ions.total).toBe(300);
    expect(s.ions.detected / s.ions.total).toBeGreaterThan(0.5);
  });

  it('its commented entries (a trap stage, a buffer gas) are valid scene syntax', () => {
    // Uncommented in place; 5 ions for 20 µs: the loader's verdict is what is checked.
    const variant = snippet.split('\n').map((l) => l.replace(/^(\s*)# /, '$1')).join('\n');
    expect(variant).toMatch(/type: trap/);
    expect(variant).toMatch(/^gas:/m);
    const vf = join(tmp, 'scene-variant.yaml');
    writeFileSync(vf, variant);
    const r = iontrail(['run', vf, '-o', join(tmp, 'variant-run'), '--set', 'ions.0.count=5', '--set', 'run.max_time=20us'], { cwd: tmp });
    expect(r.code, r.stderr).toBe(0);
  });
});
