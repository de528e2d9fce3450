// `iontrail report` end to end: the bundle of each demo scene kind (filter, trap with gas, trap mass
// scan, linear and reflectron TOF), run with fewer ions so the suite stays short. Checks the
// results.json structure and that its numbers are the run's and the closed-form Mathieu values,
// that every referenced figure is a real PNG, that report.html loads nothing from outside and
// escapes the scene's strings, and that bad input leaves nothing behind.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';
import { chromiumOrWarn } from '../helpers/browser.js';
import { loadImage } from '@napi-rs/canvas';
import { iontrail, iontrailAsync, tempDir, ROOT } from '../helpers/cli.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';

interface Bundle { name: string; dir: string; code: number; stderr: string }

let tmp: string;
const bundles = new Map<string, Bundle>();

// Fewer ions than the demo scenes (the report's logic does not depend on the count); the filter
// keeps enough ions for its m/z sweep to have a peak.
const CASES: { name: string; scene: string; set: string[] }[] = [
  { name: 'filter', scene: 'scenes/qf4-compact-filter.yaml', set: ['ions.0.count=150'] },
  { name: 'trap', scene: 'scenes/t7-trap-cooling.yaml', set: ['ions.0.count=20', 'ions.1.count=10', 'run.max_time=1ms'] },
  { name: 'scan', scene: 'scenes/t7-mass-scan.yaml', set: ['ions.0.count=15', 'ions.1.count=15', 'ions.2.count=15'] },
  { name: 'linear', scene: 'scenes/lt1-linear-tof.yaml', set: ['ions.0.count=80', 'ions.1.count=80', 'ions.2.count=80'] },
  { name: 'reflectron', scene: 'scenes/rt1-reflectron-tof.yaml', set: ['ions.0.count=80', 'ions.1.count=80', 'ions.2.count=80'] },
];

const NASTY = '<script>alert(1)</script> & "QF-4" \'test\'';

function makeBundle(name: string, scene: string, set: string[]): Bundle {
  const dir = join(tmp, name);
  const r = iontrail(['report', scene, '-o', dir, '--workers', '1', ...set.flatMap((s) => ['--set', s])]);
  const b = { name, dir, code: r.code, stderr: r.stderr };
  bundles.set(name, b);
  return b;
}

beforeAll(() => {
  tmp = tempDir('iontrail-report-');
  for (const c of CASES) makeBundle(c.name, c.scene, c.set);
  // A scene whose name carries markup and an ampersand (escaping check).
  const text = readFileSync(join(ROOT, 'scenes/qf4-compact-filter.yaml'), 'utf8')
    .replace(/^name: .*$/m, `name: ${JSON.stringify(NASTY)}`);
  writeFileSync(join(tmp, 'nasty.yaml'), text);
  makeBundle('nasty', join(tmp, 'nasty.yaml'), ['ions.0.count=40']);
}, 300_000); // five runs, a sweep and ~30 figures on a shared 2-core machine

afterAll(() => rmSync(tmp, { recursive: true, force: true }));

const results = (b: Bundle) => JSON.parse(readFileSync(join(b.dir, 'results.json'), 'utf8'));
const readSummaryOf = (b: Bundle) => JSON.parse(readFileSync(join(b.dir, 'run', 'summary.json'), 'utf8'));
const runSummary = (b: Bundle) => JSON.parse(readFileSync(join(b.dir, 'run', 'summary.json'), 'utf8'));
const html = (b: Bundle) => readFileSync(join(b.dir, 'report.html'), 'utf8');

describe('bundle layout', () => {
  it('every scene kind writes report.html, report.md, results.json and run/ and exits 0', () => {
    for (const b of bundles.values()) {
      expect(b.code, `${b.name}: ${b.stderr}`).toBe(0);
      for (const f of ['report.html', 'report.md', 'results.json', 'run/summary.json', 'run/ions.arrow']) {
        expect(existsSync(join(b.dir, f)), `${b.name}/${f}`).toBe(true);
      }
    }
    // No temporary folder left beside the bundles.
    expect(readdirSync(tmp).filter((f) => f.includes('.partial-'))).toEqual([]);
  });

  it('results.json names the scene kind and carries the sections that kind calls for', () => {
    const kinds: Record<string, string> = { filter: 'quadrupole', trap: 'trap', scan: 'trap-scan', linear: 'tof-linear', reflectron: 'tof-reflectron' };
    for (const [name, kind] of Object.entries(kinds)) {
      const r = results(bundles.get(name)!);
      expect(r.format).toBe('iontrail-report-results');
      expect(r.version).toBe(2);
      expect(r.scene_kind).toBe(kind);
      for (const key of ['scene_name', 'operating_points', 'species', 'figures', 'assumptions', 'safety_cautions', 'warnings', 'provenance', 'units']) {
        expect(r, `${name}.${key}`).toHaveProperty(key);
      }
      expect(r.safety_cautions.join(' ')).toMatch(/verify .* on the bench/);
      expect(r.safety_cautions.join(' ')).toMatch(/lethal/);
      expect(r.safety_cautions.join(' ')).toMatch(/electrical-safety codes.*qualified staff/);
      for (const key of ['tool_version', 'seed', 'scene_file', 'command_line', 'report_wall_time_s']) expect(r.provenance).toHaveProperty(key);
      expect(r.provenance.report_wall_time_s).toBeGreaterThan(0);
    }
    expect(results(bundles.get('trap')!).cooling).not.toBeNull();
    expect(results(bundles.get('scan')!).scan.spectrum.counts.length).toBeGreaterThan(0);
    expect(results(bundles.get('linear')!).tof.source).toBeDefined();
    expect(results(bundles.get('reflectron')!).tof.reflectron).toBeDefined();
    expect(results(bundles.get('filter')!).sweep.status).toBe('done');
  });

  it('figures per kind: stability for RF scenes, cooling with gas, spectrum for a scan, arrival/calibration/focus for TOF, traces and 3D always', () => {
    const ids = (name: string) => results(bundles.get(name)!).figures.map((f: { id: string }) => f.id);
    expect(ids('filter')).toEqual(expect.arrayContaining(['stability', 'transmission', 'peak', 'traces', '3d']));
    expect(ids('trap')).toEqual(expect.arrayContaining(['stability', 'transmission', 'cooling', 'traces', '3d']));
    expect(ids('scan')).toEqual(expect.arrayContaining(['stability', 'spectrum', 'traces', '3d']));
    expect(ids('linear')).toEqual(expect.arrayContaining(['arrival', 'calibration', 'source-focus', 'traces', '3d']));
    expect(ids('reflectron')).toEqual(expect.arrayContaining(['arrival', 'calibration', 'reflectron', 'traces', '3d']));
    expect(ids('linear')).not.toContain('stability');
  });
});

describe('numbers come from the run and the field', () => {
  it('species, cooling, scan and tof blocks are those of run/summary.json', () => {
    for (const b of bundles.values()) {
      const r = results(b), s = runSummary(b);
      expect(r.species.map((x: { detected: number }) => x.detected)).toEqual(s.species.map((x: { detected: number }) => x.detected));
      expect(r.species.map((x: { transmission: number }) => x.transmission)).toEqual(s.species.map((x: { transmission: number }) => x.transmission));
      expect(r.cooling ?? null).toEqual(s.cooling ?? null);
      expect(r.scan ?? null).toEqual(s.scan ?? null);
      expect(r.tof ?? null).toEqual(s.tof ?? null);
      expect(r.scene_name).toBe(s.scene_name);
      expect(r.provenance.seed).toBe(s.provenance.seed);
    }
  });

  it('filter a and q match a = 8eU/(m r0² Ω²), q = 4eV/(m r0² Ω²), with (−a, −q) for y', () => {
    // Closed forms: P. H. Dawson, "Quadrupole Mass Spectrometry and its Applications" (1976), ch. 2
    // (from memory; the same forms as DESIGN.md). Scene values: QF-4 as resolved in the run
    // (r0 4 mm, 1.2 MHz, m/z 502; RF and DC read from the scene so the demo's working point may move).
    const r = results(bundles.get('filter')!);
    const row = r.operating_points[0];
    const st = (readSummaryOf(bundles.get('filter')!) as any).provenance.scene.stages[0];
    const m = 502 * ATOMIC_MASS_UNIT, w = 2 * Math.PI * st.rf.frequency, r0 = st.r0;
    const a = (8 * ELEMENTARY_CHARGE * st.dc) / (m * r0 * r0 * w * w);
    const q = (4 * ELEMENTARY_CHARGE * st.rf.amplitude) / (m * r0 * r0 * w * w);
    // Same formula in double precision: agreement to rounding (1e-12 relative).
    expect(row.axes[0].a).toBeCloseTo(a, 12);
    expect(Math.abs(row.axes[0].q / q - 1)).toBeLessThan(1e-12);
    expect(Math.abs(row.axes[1].q / -q - 1)).toBeLessThan(1e-12);
    expect(row.axes[1].a).toBeCloseTo(-a, 12);
    // Secular frequency ω/2π = β f / 2 (Dawson 1976, ch. 2; common practice): consistent with β.
    expect(row.axes[0].secular_frequency_hz / (row.axes[0].beta * 1.2e6 / 2)).toBeCloseTo(1, 12);
  });

  it('ramped trap: a row at the ramp start and end; the low-mass cut-off scales with V (m/z = 8eV/(q_z (r0²+2z0²) Ω²))', () => {
    // March & Todd, "Quadrupole Ion Trap Mass Spectrometry" (2005), ch. 2: at fixed q_z the m/z on
    // the edge is proportional to V, so LMCO(end)/LMCO(start) = V_end/V_start = 1200/200.
    const rows = results(bundles.get('scan')!).operating_points.filter((x: { population: number }) => x.population === 0);
    expect(rows.map((x: { at: string }) => x.at)).toEqual(['ramp start', 'ramp end']);
    expect(rows[1].lmco_mz / rows[0].lmco_mz).toBeCloseTo(6, 9);
    const r0 = 7.07e-3, z0 = 5e-3, w = 2 * Math.PI * 1.05e6;
    const lmco = (8 * ELEMENTARY_CHARGE * 200) / (rows[0].q_eject * (r0 * r0 + 2 * z0 * z0) * w * w) / ATOMIC_MASS_UNIT;
    expect(rows[0].lmco_mz / lmco).toBeCloseTo(1, 9);
  });

  it('the HTML shows the run\'s figures of merit (formatted from results.json, not typed)', () => {
    const r = results(bundles.get('reflectron')!);
    const h = html(bundles.get('reflectron')!);
    for (const s of r.tof.species) expect(h).toContain(`<td class="n">${Number(s.resolution_fwhm.toPrecision(4))}</td>`);
    const f = results(bundles.get('filter')!);
    expect(html(bundles.get('filter')!)).toContain(`<td class="n">${Number(f.operating_points[0].axes[0].q.toPrecision(4))}</td>`);
  });
});

/** PNG structure: signature and IHDR (ISO/IEC 15948:2004 / W3C PNG, §5.2 and §11.2.2). */
function pngSize(buf: Buffer): { width: number; height: number } {
  const sig = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
  expect(buf.subarray(0, 8).equals(sig)).toBe(true);
  expect(buf.toString('latin1', 12, 16)).toBe('IHDR');
  return { width: buf.readUInt32BE(16), height: buf.readUInt32BE(20) };
}

describe('figures', () => {
  it('every figure in results.json exists as a valid, decodable PNG of the stated size, and report.md links exactly those', async () => {
    for (const b of bundles.values()) {
      const r = results(b);
      expect(r.figures.length).toBeGreaterThan(2);
      for (const f of r.figures) {
        const buf = readFileSync(join(b.dir, f.file));
        expect(pngSize(buf)).toEqual({ width: f.width, height: f.height });
        const img = await loadImage(buf);
        expect(img.width).toBe(f.width);
      }
      const md = readFileSync(join(b.dir, 'report.md'), 'utf8');
      const linked = [...md.matchAll(/!\[[^\]]*\]\(([^)]+)\)/g)].map((m) => m[1]);
      expect(linked).toEqual(r.figures.map((f: { file: string }) => f.file));
      const onDisk = readdirSync(b.dir).filter((f) => /^fig-.*\.png$/.test(f)).sort();
      expect(onDisk).toEqual(r.figures.map((f: { file: string }) => f.file).sort());
    }
  });

  it('report.html inlines one data-URI image per figure, byte-identical to the PNG beside it', () => {
    for (const b of bundles.values()) {
      const r = results(b);
      const srcs = [...html(b).matchAll(/<img src="data:image\/png;base64,([A-Za-z0-9+/=]+)"/g)].map((m) => m[1]);
      expect(srcs.length).toBe(r.figures.length);
      r.figures.forEach((f: { file: string }, i: number) => expect(Buffer.from(srcs[i], 'base64').equals(readFileSync(join(b.dir, f.file)))).toBe(true));
    }
  });
});

describe('self-contained and escaped HTML', () => {
  it('has no external URL (http:, https:, //), no script and no link element', () => {
    for (const b of bundles.values()) {
      // Base64 payloads may hold '//' by chance; they are image bytes, not addresses.
      const text = html(b).replace(/data:image\/png;base64,[A-Za-z0-9+/=]+/g, 'data:');
      expect(text).not.toMatch(/https?:/i);
      expect(text).not.toMatch(/\/\//);
      expect(text).not.toMatch(/<script/i);
      expect(text).not.toMatch(/<link/i);
      expect(text).not.toMatch(/url\(/i);
    }
  });

  it('escapes the scene name in report.html and report.md; results.json keeps it verbatim', () => {
    const b = bundles.get('nasty')!;
    expect(b.code, b.stderr).toBe(0);
    const h = html(b);
    expect(h).not.toContain('<script>');
    expect(h).not.toContain('alert(1)</');
    expect(h).toContain('&lt;script&gt;alert(1)&lt;&#47;script&gt; &amp; &quot;QF-4&quot; &#39;test&#39;');
    expect(h).not.toMatch(/ & /);
    expect(results(b).scene_name).toBe(NASTY);
    const md = readFileSync(join(b.dir, 'report.md'), 'utf8');
    expect(md).not.toContain('<script>');
    expect(md).toContain('&lt;script&gt;alert(1)&lt;/script&gt; &amp;');
  });
});

describe('bad input: one line, exit 2, nothing left behind', () => {
  const leftovers = (parent: string) => readdirSync(parent);

  it('missing scene file', () => {
    const parent = tempDir('iontrail-report-bad-');
    const r = iontrail(['report', join(parent, 'no-such.yaml'), '-o', join(parent, 'out')]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/no-such\.yaml: cannot read the scene file/);
    expect(leftovers(parent)).toEqual([]);
    rmSync(parent, { recursive: true, force: true });
  });

  it('unknown --set key', () => {
    const parent = tempDir('iontrail-report-bad-');
    const r = iontrail(['report', 'scenes/lt1-linear-tof.yaml', '-o', join(parent, 'out'), '--set', 'stages.0.voltige=3kV']);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/voltige/);
    expect(leftovers(parent)).toEqual([]);
    rmSync(parent, { recursive: true, force: true });
  });

  it('unknown flag and missing -o', () => {
    const a = iontrail(['report', 'scenes/lt1-linear-tof.yaml', '-o', join(tmp, 'x'), '--forse']);
    expect(a.code).toBe(2);
    expect(a.stderr).toMatch(/unknown option --forse \(did you mean --force\?\)/);
    const b = iontrail(['report', 'scenes/lt1-linear-tof.yaml']);
    expect(b.code).toBe(2);
    expect(b.stderr).toMatch(/missing -o DIR/);
    expect(existsSync(join(tmp, 'x'))).toBe(false);
  });

  it('existing DIR is refused without --force and left untouched; --force replaces it whole', () => {
    const parent = tempDir('iontrail-report-bad-');
    const out = join(parent, 'out');
    mkdirSync(out);
    writeFileSync(join(out, 'keep.txt'), 'mine');
    const r = iontrail(['report', 'scenes/lt1-linear-tof.yaml', '-o', out, '--set', 'ions.0.count=10', '--set', 'ions.1.count=10', '--set', 'ions.2.count=10']);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/already exists \(give --force/);
    expect(readdirSync(out)).toEqual(['keep.txt']);
    const f = iontrail(['report', 'scenes/lt1-linear-tof.yaml', '-o', out, '--force', '--set', 'ions.0.count=10', '--set', 'ions.1.count=10', '--set', 'ions.2.count=10']);
    expect(f.code, f.stderr).toBe(0);
    expect(existsSync(join(out, 'keep.txt'))).toBe(false);
    expect(existsSync(join(out, 'report.html'))).toBe(true);
    expect(leftovers(parent)).toEqual(['out']);
    rmSync(parent, { recursive: true, force: true });
  }, 60_000);

  it('Ctrl-C during the run: exit 130, no DIR and no temporary folder', async () => {
    const parent = tempDir('iontrail-report-int-');
    const out = join(parent, 'out');
    // A run of several seconds (trap cooling over 20 ms) so the signal lands inside it.
    const child = iontrailAsync(['report', 'scenes/t7-trap-cooling.yaml', '-o', out, '--workers', '1', '--set', 'run.max_time=20ms']);
    let stderr = '';
    child.stderr!.on('data', (d) => { stderr += d; });
    await new Promise((r) => setTimeout(r, 2500));
    child.kill('SIGINT');
    const code = await new Promise<number | null>((r) => child.on('exit', (c) => r(c)));
    expect(code, stderr).toBe(130);
    expect(stderr).toMatch(/interrupted; nothing written/);
    expect(readdirSync(parent)).toEqual([]);
    rmSync(parent, { recursive: true, force: true });
  }, 90_000);

  it('missing parent folder of DIR', () => {
    const r = iontrail(['report', 'scenes/lt1-linear-tof.yaml', '-o', join(tmp, 'no', 'such', 'dir')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/parent folder .* does not exist/);
  });
});

const exe = chromiumOrWarn('the report.html browser test');

describe.skipIf(!exe)('report.html in headless chromium', () => {
  it('opens offline with no console errors and no requests, and shows every figure (naturalWidth > 0)', async () => {
    const browser = await chromium.launch({
      executablePath: exe,
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
        '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    try {
      for (const b of bundles.values()) {
        const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
        const errors: string[] = [];
        const requests: string[] = [];
        page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
        page.on('pageerror', (e) => errors.push(e.message));
        page.on('request', (r) => { if (!/^(file|data):/.test(r.url())) requests.push(r.url()); });
        await page.goto(pathToFileURL(join(b.dir, 'report.html')).href, { waitUntil: 'load' });
        const imgs = await page.$$eval('img', (list) => list.map((i) => ({ complete: (i as HTMLImageElement).complete, w: (i as HTMLImageElement).naturalWidth, shown: i.getBoundingClientRect().width })));
        expect(imgs.length, b.name).toBe(results(b).figures.length);
        for (const i of imgs) {
          expect(i.complete).toBe(true);
          expect(i.w).toBeGreaterThan(0);
          // Laid out on the page, not collapsed (the page is 1280 px wide; figures scale to the column).
          expect(i.shown).toBeGreaterThan(400);
        }
        expect(await page.locator('h1').textContent()).toBe(results(b).scene_name);
        expect(errors, b.name).toEqual([]);
        expect(requests, b.name).toEqual([]);
        await page.close();
      }
    } finally {
      await browser.close();
    }
  }, 120_000); // browser start on a shared 2-core machine
});
