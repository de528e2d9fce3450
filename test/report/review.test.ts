// The review bundle as a design review reads it, end to end through `iontrail report` on small
// scenes (--set ions.N.count keeps them fast): the verdict against the scene's targets, the inputs
// table with every value and its unit, numbered figures with captions that match, the trap's
// "stored", the reflectron turn in the trajectory sample, the 20 keV energy histogram, and SVG
// figures that keep their text.

import { existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { iontrail, ROOT, tempDir } from '../helpers/cli.js';
import { readTrajectories } from '../../sim/runfolder/index.js';
import { buildFigure } from '../../render/plot/index.js';
import { TARGET_KEYS } from '../../sim/scene/targets.js';
import { sceneKindText } from '../../sim/report/verdict.js';

let root = '';
beforeAll(() => { root = tempDir('iontrail-review-'); });
vi.setConfig({ testTimeout: 120_000, hookTimeout: 120_000 });
afterAll(() => rmSync(root, { recursive: true, force: true }));

const scene = (name: string) => readFileSync(join(ROOT, 'scenes', name), 'utf8');
const json = (dir: string) => JSON.parse(readFileSync(join(dir, 'results.json'), 'utf8'));
const md = (dir: string) => readFileSync(join(dir, 'report.md'), 'utf8');

function report(file: string, out: string, set: string[]): void {
  const r = iontrail(['report', file, '-o', out, '--workers', '1', ...set.flatMap((s) => ['--set', s])]);
  expect(r.stderr).not.toMatch(/Error|error:/);
  expect(r.code).toBe(0);
}

describe('trap mass scan with targets', () => {
  let dir = '';
  let res: any;
  beforeAll(() => {
    // A target every run meets (a share ≥ 0) and one none can (m/Δm ≥ 1e9), and one that does not
    // apply to a scan (stored): the verdict must say pass, fail and not evaluated for them.
    const file = join(root, 'scan.yaml');
    writeFileSync(file, scene('t7-mass-scan.yaml') + 'targets:\n  transmission: 0\n  resolution_50: 1e9\n  stored: 0.5\n  mz_window_low: 60\n');
    dir = join(root, 'scan');
    report(file, dir, ['ions.0.count=6', 'ions.1.count=6', 'ions.2.count=6']);
    res = json(dir);
  });

  it('gives the verdict in results.json from the run\'s own numbers', () => {
    const v = res.verdict;
    expect(v.purpose).toMatch(/^RF ion trap, mass scan by mass-selective instability: Skerry T-7/);
    // A scan with supplementary AC (the LQ-2 demo) is named for resonance ejection instead.
    expect(sceneKindText('trap-scan', { mode: 'resonance-ejection' })).toBe('RF ion trap, mass scan by resonance ejection');
    const by = Object.fromEntries(v.targets.map((t: any) => [t.key, t]));
    // The worst species' resolution is the smallest of the scan's per-species figures (summary.json).
    const summary = JSON.parse(readFileSync(join(dir, 'run', 'summary.json'), 'utf8'));
    const rs = summary.scan.species.map((s: any) => s.resolution);
    // A species without a peak fails the target with no value; else the smallest m/Δm is compared.
    expect(by.resolution_50.actual).toBe(rs.some((x: any) => typeof x !== 'number') ? null : Math.min(...rs));
    expect(by.resolution_50.status).toBe('fail');
    expect(by.transmission.status).toBe('pass');
    expect(by.transmission.actual).toBe(Math.min(...summary.species.map((s: any) => s.detected / s.total)));
    expect(by.stored.status).toBe('not evaluated');
    // LMCO at the ramp start, q_z 0.908 (March & Todd 2005, from memory): m/z 39.07 ≤ 60 passes.
    expect(by.mz_window_low.actual).toBeCloseTo(39.07, 1);
    expect(by.mz_window_low.status).toBe('pass');
    expect(v.status).toBe('fail');
    expect(Object.keys(res.target_keys)).toEqual(TARGET_KEYS);
  });

  it('opens report.md with the verdict, then the safety cautions', () => {
    const text = md(dir);
    const iVerdict = text.indexOf('## Verdict'), iSafety = text.indexOf('## Safety');
    expect(iVerdict).toBeGreaterThan(0);
    expect(iSafety).toBeGreaterThan(iVerdict);
    expect(text).toContain('**Verdict: FAIL: one or more targets are missed.**');
    expect(text).toMatch(/\| resolution\\_50 \| ≥ [^|]+ \| (?:[\d.]+|—) \| m\/z \d+ \| FAIL( \([^|]*\))? \|/);
    expect(text).toContain('lethal');
    expect(text).toContain('## Target keys');
  });

  it('lists every scene value with its unit as written, and its SI value', () => {
    const rows = res.inputs as any[];
    const row = (key: string) => rows.find((r) => r.key === key);
    expect(row('stages.0.r0')).toMatchObject({ block: 'stage 0 (trap)', name: 'r0', written: '7.07 mm', unit: 'm' });
    expect(row('stages.0.r0').si).toBeCloseTo(7.07e-3, 12);
    expect(row('stages.0.rf.ramp.to')).toMatchObject({ written: '1.2 kV', si: 1200, unit: 'V' });
    // 1 Torr = 101325/760 Pa exactly (NIST SP 811, appendix B.8): the pressure stays in mTorr as written.
    expect(row('gas.pressure').written).toBe('1 mTorr');
    expect(row('gas.pressure').si).toBeCloseTo(101325 / 760 / 1000, 9);
    expect(row('ions.1.count')).toMatchObject({ written: '6', overridden: true });
    // Not in the file: the loader's default (max_time/200 for the ensemble history is in the file here).
    expect(row('run.integrator')).toMatchObject({ written: 'rk4', default: true });
    const text = md(dir);
    expect(text).toMatch(/\| stage 0 \(trap\) \| r0 \| 7\.07 mm \|/);
    expect(text).toMatch(/\| gas \| pressure \| 1 mTorr \| 133\.322 mPa \|/);
    expect(text).toMatch(/\| stage 0 \(trap\) \| rf\.ramp\.over \| 5 ms \|/);
  });

  it('numbers the figures in order, in results.json and both documents', () => {
    const figs = res.figures as any[];
    expect(figs.map((f) => f.number)).toEqual(figs.map((_, i) => i + 1));
    const text = md(dir);
    let at = 0;
    for (const f of figs) {
      const i = text.indexOf(`**Figure ${f.number}. ${f.title}.**`);
      expect(i).toBeGreaterThan(at);
      at = i;
    }
    const html = readFileSync(join(dir, 'report.html'), 'utf8');
    for (const f of figs) expect(html).toContain(`<b>Figure ${f.number}. ${f.title}.</b>`);
  });
});

describe('storage trap', () => {
  it('says stored, not transmission 0 %, and a transmission target does not apply', () => {
    const file = join(root, 'cool.yaml');
    writeFileSync(file, scene('t7-trap-cooling.yaml') + 'targets:\n  transmission: 0.5\n  stored: 0.1\n');
    const dir = join(root, 'cool');
    report(file, dir, ['ions.0.count=5', 'ions.1.count=5', 'run.max_time=50 us']);
    const res = json(dir);
    const by = Object.fromEntries(res.verdict.targets.map((t: any) => [t.key, t]));
    expect(by.transmission.status).toBe('not evaluated');
    const stored = Math.min(...res.species.map((s: any) => s.alive / s.total));
    expect(by.stored.actual).toBe(stored);
    expect(by.stored.status).toBe(stored >= 0.1 ? 'pass' : 'fail');
    const text = md(dir);
    const table = text.slice(text.indexOf('## Ions stored and lost'), text.indexOf('## Operating points'));
    expect(table).toContain('| stored |');
    expect(table).not.toContain('transmission');
    // Every fate the engine knows has a column, whatever FATE_NAMES holds (sim/core/batch.ts).
    expect(res.fate_names.length).toBeGreaterThanOrEqual(3);
    for (const s of res.species) expect(Object.keys(s.fates)).toEqual(res.fate_names);
    const fig = res.figures.find((f: any) => f.id === 'transmission');
    expect(fig.title).toBe('Ions stored');
    expect(fig.caption).toContain('stored at the end of the run');
  });
});

describe('quadrupole filter peak', () => {
  it('captions the FWHM and 10 % marks it draws, and judges resolution_50 on the sweep peak', () => {
    const file = join(root, 'qf4.yaml');
    writeFileSync(file, scene('qf4-compact-filter.yaml') + 'targets:\n  resolution_50: 10\n  mz_window_low: 400\n  mz_window_high: 600\n');
    const dir = join(root, 'qf4');
    report(file, dir, ['ions.0.count=60']);
    const res = json(dir);
    const peak = res.figures.find((f: any) => f.id === 'peak');
    expect(peak.caption).toMatch(/full width at 50 % \(FWHM\) and at 10 % of the maximum/);
    const by = Object.fromEntries(res.verdict.targets.map((t: any) => [t.key, t]));
    expect(by.resolution_50.actual).toBe(res.sweep.peak.resolution_50);
    expect(by.resolution_50.status).toBe(res.sweep.peak.resolution_50 >= 10 ? 'pass' : 'fail');
    // A narrow window around m/z 502 cannot reach from 400 to 600.
    const w = res.operating_points[0].mz_window;
    expect(by.mz_window_low.actual).toBe(w.low);
    expect(by.mz_window_high.actual).toBe(w.high);
    expect(by.mz_window_low.status).toBe('fail');
    expect(res.verdict.status).toBe('fail');
  });
});

describe('reflectron TOF', () => {
  let dir = '';
  beforeAll(() => {
    dir = join(root, 'rt1');
    report(join(ROOT, 'scenes/rt1-reflectron-tof.yaml'), dir, ['ions.0.count=20', 'ions.1.count=20', 'ions.2.count=20']);
  });

  it('samples the trajectory inside the reflectron down to the turning point', async () => {
    // Uniform retarding field: an ion of energy qU entering a field V/L turns after p = U·L/V
    // (elementary kinematics; Mamyrin et al., Sov. Phys. JETP 37, 45 (1973)). results.json gives p.
    const res = json(dir);
    const p = res.tof.reflectron.penetration_m;
    const tr = await readTrajectories(join(dir, 'trajectory-sample'), {});
    let zMax = -Infinity;
    for (const z of tr.z) zMax = Math.max(zMax, z);
    const zEntry = 0.01 + 0.8; // source gap 10 mm + drift 0.8 m (scene)
    // Points every max_time/1500 = 200 ns; near the turn the ion moves < 1 mm in that time, and the
    // energy spread (a few eV of 20 keV) moves the turn by < 0.1 %: 1 % covers both.
    expect(Math.abs(zMax - zEntry - p) / p).toBeLessThan(0.01);
  });

  it('draws the final energy as an offset from 20 000 eV', async () => {
    const res = json(dir);
    expect(res.figures.some((f: any) => f.id === 'energy')).toBe(true);
    const { spec } = await buildFigure(join(dir, 'run'), { kind: 'energy', out: 'x.png' });
    expect(spec.panels[0].x.label).toBe('final kinetic energy E − 20 000 eV');
    // The offsets span the source's energy spread (2 ± 1.3 eV FWHM): a few eV, not kilo-eV.
    expect(spec.panels[0].x.max - spec.panels[0].x.min).toBeLessThan(50);
    expect(spec.panels[0].x.min).toBeGreaterThan(-50);
  });

  it('writes SVG figures with their text as <text> and a viewBox', () => {
    const out = join(root, 'traces.svg');
    const r = iontrail(['plot', join(dir, 'trajectory-sample'), '--kind', 'traces', '-o', out, '--width', '900', '--height', '600']);
    expect(r.code).toBe(0);
    const svg = parseSvg(readFileSync(out, 'utf8'));
    expect(svg.root.attrs.viewBox).toBe('0 0 900 600');
    const texts = svg.texts.join('\n');
    expect(texts).toContain('time (µs)');
    expect(texts).toContain('m/z 1000');
    expect(texts).toMatch(/Skerry RT-1 reflectron TOF, three calibrants — time traces/);
  });
});

/**
 * A small XML reader for the figure SVGs: checks that every element closes in order (well-formed)
 * and returns the root element's attributes and the text content of each <text> element.
 */
function parseSvg(xml: string): { root: { name: string; attrs: Record<string, string> }; texts: string[] } {
  const body = xml.replace(/^<\?xml[^>]*\?>\s*/, '');
  const tag = /<(\/?)([A-Za-z][\w:-]*)((?:\s+[\w:-]+="[^"]*")*)\s*(\/?)>|([^<]+)/g;
  const stack: string[] = [];
  const texts: string[] = [];
  let root: { name: string; attrs: Record<string, string> } | null = null;
  let inText = -1;
  let current = '';
  let m: RegExpExecArray | null;
  let consumed = 0;
  const unescape = (s: string) => s.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&amp;/g, '&');
  while ((m = tag.exec(body)) !== null) {
    if (m.index !== consumed) throw new Error(`SVG not well-formed near offset ${consumed}`);
    consumed = tag.lastIndex;
    if (m[5] !== undefined) { if (inText >= 0) current += unescape(m[5]); continue; }
    const [, close, name, attrText, selfClose] = m;
    if (close) {
      if (stack.pop() !== name) throw new Error(`SVG: </${name}> closes the wrong element`);
      if (name === 'text' && stack.length === inText) { texts.push(current); inText = -1; current = ''; }
      continue;
    }
    const attrs: Record<string, string> = {};
    for (const a of attrText.matchAll(/([\w:-]+)="([^"]*)"/g)) attrs[a[1]] = unescape(a[2]);
    if (root === null) root = { name, attrs };
    if (selfClose) continue;
    if (name === 'text') { inText = stack.length; current = ''; }
    stack.push(name);
  }
  if (consumed !== body.length && body.slice(consumed).trim() !== '') throw new Error('SVG: trailing content');
  if (stack.length !== 0) throw new Error(`SVG: unclosed <${stack[stack.length - 1]}>`);
  if (!root || root.name !== 'svg') throw new Error('SVG: root is not <svg>');
  return { root, texts };
}

describe('targets in the scene file: bad input', () => {
  const cases: [string, RegExp][] = [
    ['targets:\n  resolution_50: -5\n', /scan-bad\.yaml:\d+: targets\.resolution_50: must be greater than zero/],
    ['targets:\n  tau_max: 2\n', /scan-bad\.yaml:\d+: targets\.tau_max: expects a time such as 300 us, got '2' \(no unit\)/],
    ['targets:\n  resolution50: 500\n', /targets\.resolution50: unknown key \(did you mean 'resolution_50'\?\)/],
    ['targets:\n  transmission: 1.5\n', /targets\.transmission: must be at most 1, got '1\.5'/],
    ['targets:\n  mz_window_low: 600\n  mz_window_high: 400\n', /targets\.mz_window_high: must be above targets\.mz_window_low \(600\)/],
  ];
  for (const [text, message] of cases) {
    it(`refuses ${text.trim().replace(/\n\s*/g, ' ')} in one line, exit 2, nothing written`, () => {
      const file = join(root, 'scan-bad.yaml');
      writeFileSync(file, scene('t7-mass-scan.yaml') + text);
      const out = join(root, 'never');
      const r = iontrail(['report', file, '-o', out]);
      expect(r.code).toBe(2);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(message);
      expect(existsSync(out)).toBe(false);
    });
  }
});
