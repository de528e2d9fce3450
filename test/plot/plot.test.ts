// 2D figures from synthetic run folders: structural checks (size, ink in the plot area, the series
// colours present), every kind, PNG and SVG, and the bad-input rules (one-line error, exit 2, no file).

import { existsSync, readdirSync, readFileSync, rmSync, statSync, truncateSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { KINDS, buildFigure, plotRun } from '../../render/plot/index.js';
import { ELEMENTARY_CHARGE, ATOMIC_MASS_UNIT } from '../../sim/units/constants.js';
import { repoRoot } from '../bench/cbuild.js';
import { REGION_FILL, seriesColor } from '../../render/common/palette.js';
import { speciesColors } from '../../render/common/species.js';

// Species colours of the synthetic filter run (m/z 502, 219, 1000): one per species by m/z rank.
const FILTER_MZ = [502, 219, 1000];
const speciesOf = (mzs: number[]) => (i: number) => speciesColors(mzs)(mzs[i]);
const filterSpecies = speciesOf(FILTER_MZ);
import { main } from '../../cli/main.js';
import { tempRoot, writeSyntheticRun } from '../runfolder/synthetic.js';
import { countColor, countInk, decodePng } from './pixels.js';

let root = '';
let filterRun = '';
let trapRun = '';

beforeAll(async () => {
  root = tempRoot('plot');
  filterRun = join(root, 'qf4');
  trapRun = join(root, 't7');
  await writeSyntheticRun(filterRun, { mz: [502, 219, 1000], perPopulation: 4, pointsPerIon: 1500 });
  await writeSyntheticRun(trapRun, { mz: [502, 219], perPopulation: 3, pointsPerIon: 300, history: true, trap: true });
});
afterAll(() => rmSync(root, { recursive: true, force: true }));

async function png(dir: string, kind: string, extra: Record<string, string> = {}, switches: string[] = [], size = { width: 900, height: 600 }) {
  const out = join(root, `${kind}-${Object.values(extra).join('_')}-${switches.join('_')}.png`);
  await plotRun(dir, { kind, out, ...size, values: new Map(Object.entries(extra)), switches: new Set(switches) });
  return decodePng(readFileSync(out));
}

describe('every kind renders', () => {
  const cases: [string, () => string][] = [
    ['traces', () => filterRun], ['stability', () => filterRun], ['phase', () => filterRun], ['xy', () => filterRun],
    ['arrival', () => filterRun], ['energy', () => filterRun], ['cooling', () => trapRun],
  ];
  it('lists exactly the kinds tested here', () => {
    // radial needs a multipole run with gas: its own block below.
    expect(KINDS.map((k) => k.name).sort()).toEqual([...cases.map((c) => c[0]), 'radial'].sort());
  });
  for (const [kind, dir] of cases) {
    it(`${kind}: requested size, ink inside the plot area, first series colour present`, async () => {
      const r = await png(dir(), kind);
      expect([r.width, r.height]).toEqual([900, 600]);
      // The middle of the page (where the panels are) carries data and axes, not just paper.
      expect(countInk(r, 100, 120, 880, 540)).toBeGreaterThan(500);
      // Density figures use the ramp instead of the series colours.
      // Species figures use the species palette; cooling (an ensemble figure) the series colours.
      const first = kind === 'cooling' ? seriesColor(0) : filterSpecies(0);
      if (kind !== 'phase' && kind !== 'xy') expect(countColor(r, first, 40, 60, 90, 900, 560)).toBeGreaterThan(20);
    });
  }
});

describe('traces', () => {
  it('draws the chosen ions in their species colours and RF period marks', async () => {
    // Ions 0 and 5: populations 0 (m/z 502) and 1 (m/z 219), four ions per population.
    const r = await png(filterRun, 'traces', { ions: '0,5', panels: 'x,ke' }, ['rf-marks']);
    expect(countColor(r, filterSpecies(0), 30)).toBeGreaterThan(200);
    expect(countColor(r, filterSpecies(1), 30)).toBeGreaterThan(200);
    expect(countColor(r, filterSpecies(2), 20)).toBe(0); // no ion of m/z 1000 asked for
  });
  it('refuses an unknown panel quantity and ions without points', async () => {
    await expect(png(filterRun, 'traces', { panels: 'x,q' })).rejects.toThrow(/--panels: unknown quantity 'q'/);
    await expect(png(filterRun, 'traces', { ions: '999' })).rejects.toThrow(/no recorded points for ions 999/);
  });
});

describe('stability', () => {
  it('fills the first region and marks each species in its own colour', async () => {
    const r = await png(filterRun, 'stability');
    expect(countColor(r, REGION_FILL, 4)).toBeGreaterThan(20000);
    for (let i = 0; i < 3; i++) expect(countColor(r, filterSpecies(i), 30)).toBeGreaterThan(20);
  });
  it('draws the trap diagram in (q_z, a_z)', async () => {
    const r = await png(trapRun, 'stability');
    expect(countColor(r, REGION_FILL, 4)).toBeGreaterThan(20000);
    // The q_z = 0.908 edge is dashed in vermillion, shared with series 1 (also a species here).
    expect(countColor(r, seriesColor(1), 30)).toBeGreaterThan(100);
  });
});

describe('stability with an RF ramp', () => {
  it('shows where each species goes and the low-mass cut-off at both ends of the ramp', async () => {
    // Skerry T-7 mass-scan demo (200 V → 1.2 kV over 5 ms, r0 7.07 mm, z0 5 mm, 1.05 MHz, no DC).
    // The cut-off at the end, against the closed form q_z = 8eV/(m(r0² + 2z0²)Ω²) solved for m at
    // the q_z = 0.908 edge (DESIGN.md trap convention; March & Todd 2005, edge value from memory).
    const dir = join(root, 'ramp');
    const code = await main(['run', join(repoRoot(), 'scenes/t7-mass-scan.yaml'), '-o', dir,
      '--set', 'ions.0.count=4', '--set', 'ions.1.count=4', '--set', 'ions.2.count=4', '--set', 'run.max_time=20 us']);
    expect(code).toBe(0);
    const { spec } = await buildFigure(dir, { kind: 'stability', out: join(root, 'ramp.png') });
    const labels = spec.legend.map((l) => l.label);
    expect(labels).toContain('RF ramp 200 → 1200 V over 5 ms: q of each species along its arrow');
    const edge = labels.find((l) => l.includes('low-mass cut-off'))!;
    const m = edge.match(/m\/z ([\d.]+) at the start, ([\d.]+) at the end of the ramp/)!;
    const omega = 2 * Math.PI * 1.05e6, D = 7.07e-3 ** 2 + 2 * 5e-3 ** 2;
    const mzAt = (V: number) => (8 * ELEMENTARY_CHARGE * V) / (0.908 * D * omega * omega) / ATOMIC_MASS_UNIT;
    // Four significant figures on the label.
    expect(Math.abs(Number(m[1]) - mzAt(200)) / mzAt(200)).toBeLessThan(1e-3);
    expect(Math.abs(Number(m[2]) - mzAt(1200)) / mzAt(1200)).toBeLessThan(1e-3);
    await plotRun(dir, { kind: 'stability', out: join(root, 'ramp.png') });
    const r = await decodePng(readFileSync(join(root, 'ramp.png')));
    // The arrows run past the q_z edge (q ends at 6× its start): series colours right of the edge.
    const scan = speciesOf([100, 150, 200]);
    for (let i = 0; i < 3; i++) expect(countColor(r, scan(i), 30, 700, 120, 1090, 700)).toBeGreaterThan(20);
  });
});

describe('scatter kinds', () => {
  it('draws marks in population colours with --style scatter', async () => {
    const r = await png(filterRun, 'xy', { style: 'scatter', source: 'points' });
    for (let i = 0; i < 3; i++) expect(countColor(r, filterSpecies(i), 60)).toBeGreaterThan(50);
  });
  it('phase space from end states', async () => {
    const r = await png(filterRun, 'phase', { source: 'end' });
    expect(countColor(r, filterSpecies(0), 30)).toBeGreaterThan(10);
  });
});

describe('SVG output', () => {
  it('writes an SVG of the requested size with the series colours', async () => {
    const out = join(root, 'traces.svg');
    await plotRun(filterRun, { kind: 'traces', out, width: 800, height: 500, values: new Map([['ions', '0,5']]) });
    const text = readFileSync(out, 'utf8');
    expect(text).toMatch(/^<\?xml[^>]*>\s*<svg[^>]*width="800"[^>]*height="500"/);
    expect(text.toUpperCase()).toContain(filterSpecies(0).toUpperCase());
    expect(text.trimEnd().endsWith('</svg>')).toBe(true);
  });
});

describe('plot bad input (CLI)', () => {
  let err = '';
  afterEach(() => vi.restoreAllMocks());
  async function cli(args: string[]): Promise<number> {
    err = '';
    vi.spyOn(process.stderr, 'write').mockImplementation((s: string | Uint8Array) => { err += String(s); return true; });
    return main(['plot', ...args]);
  }
  const noFileLeft = (dir: string, name: string) => readdirSync(dir).filter((f) => f.includes(name));

  it('not a run folder', async () => {
    const out = join(root, 'bad1.png');
    expect(await cli([root, '--kind', 'traces', '-o', out])).toBe(2);
    expect(err).toMatch(/not a run folder \(no summary.json\)/);
    expect(err.trim().split('\n').length).toBe(1);
    expect(noFileLeft(root, 'bad1')).toEqual([]);
  });
  it('unknown kind, with a hint', async () => {
    expect(await cli([filterRun, '--kind', 'trace', '-o', join(root, 'bad2.png')])).toBe(2);
    expect(err).toMatch(/unknown --kind 'trace' \(did you mean 'traces'\?\)/);
  });
  it('output folder missing', async () => {
    expect(await cli([filterRun, '--kind', 'traces', '-o', join(root, 'nope', 'x.png')])).toBe(2);
    expect(err).toMatch(/output folder .*nope does not exist/);
  });
  it('unsupported output type', async () => {
    expect(await cli([filterRun, '--kind', 'traces', '-o', join(root, 'x.jpg')])).toBe(2);
    expect(err).toMatch(/unsupported file type 'jpg'/);
  });
  it('truncated Arrow file: one line, exit 2, no partial output', async () => {
    const dir = join(root, 'trunc');
    await writeSyntheticRun(dir, { pointsPerIon: 100 });
    const p = join(dir, 'trajectories.arrow');
    truncateSync(p, statSync(p).size - 100);
    const outDir = join(root, 'outs');
    mkdirSync(outDir, { recursive: true });
    expect(await cli([dir, '--kind', 'traces', '-o', join(outDir, 'tr.png')])).toBe(2);
    expect(err).toMatch(/trajectories.arrow: truncated Arrow IPC file/);
    expect(readdirSync(outDir)).toEqual([]);
  });
  it('a flag of another kind is refused by name', async () => {
    expect(await cli([filterRun, '--kind', 'stability', '--panels', 'x', '-o', join(root, 'b.png')])).toBe(2);
    expect(err).toMatch(/unknown option --panels/);
  });
  it('writes the file on success (exit 0) and leaves no temp file', async () => {
    const outDir = join(root, 'ok');
    mkdirSync(outDir, { recursive: true });
    expect(await cli([filterRun, '--kind', 'energy', '-o', join(outDir, 'e.png')])).toBe(0);
    expect(readdirSync(outDir)).toEqual(['e.png']);
    expect(existsSync(join(outDir, 'e.png'))).toBe(true);
  });
});

describe('radial', () => {
  // A small CG-8-like octupole run in helium (scenes/cg8-octupole-guide.yaml with 300 ions, 20 µs):
  // the figure needs a stage with an effective potential and a gas temperature.
  let guideRun = '';
  beforeAll(async () => {
    guideRun = join(root, 'cg8');
    const { parseScene } = await import('../../sim/scene/load.js');
    const { runScene } = await import('../../sim/runs/run-scene.js');
    const text = readFileSync(join(repoRoot(), 'scenes/cg8-octupole-guide.yaml'), 'utf8');
    await runScene(parseScene(text, 'cg8-octupole-guide.yaml', { set: ['ions.0.count=300', 'run.max_time=20.03125us'] }), { out: guideRun, workers: 1 });
  });
  it('draws the annuli in the species colour and the Boltzmann curve; refuses a run without a multipole', async () => {
    const r = await png(guideRun, 'radial');
    expect([r.width, r.height]).toEqual([900, 600]);
    expect(countInk(r, 100, 120, 880, 540)).toBeGreaterThan(500);
    expect(countColor(r, speciesColors([500])(500), 60, 60, 90, 900, 560)).toBeGreaterThan(20);
    await expect(png(filterRun, 'radial')).rejects.toThrow(/no stage with an effective potential/);
  });
});
