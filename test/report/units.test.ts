// Pure parts of the report: escaping, scene classification, the operating-point rows of a ramp and
// the results.json text. No runs, no files.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { escapeHtml } from '../../render/report/html.js';
import { escapeMarkdown } from '../../render/report/markdown.js';
import { reportDocument, num } from '../../render/report/document.js';
import { parseScene } from '../../sim/scene/load.js';
import { sceneTraits } from '../../sim/report/scene-kind.js';
import { operatingPointRows } from '../../sim/report/operating-points.js';
import { buildResults, formatResults } from '../../sim/report/results.js';
import type { RunSummary } from '../../sim/runfolder/summary.js';
import { ROOT } from '../helpers/cli.js';

const scene = (file: string, set: string[] = []) => parseScene(readFileSync(join(ROOT, 'scenes', file), 'utf8'), file, { set });

describe('escaping', () => {
  it('HTML: the five characters of OWASP XSS Prevention rule #1 and /, :, =, ` become entities', () => {
    // OWASP Cross Site Scripting Prevention Cheat Sheet, "Output encoding for HTML contexts".
    const e = escapeHtml('<a href="x">\'&\'</a> http://h `=`');
    expect(e).not.toMatch(/[<>"'`=]/);
    expect(e).not.toMatch(/&(?!amp;|lt;|gt;|quot;|#39;|#47;|#58;|#96;|#61;)/);
    expect(e).not.toContain('//');
    expect(e).not.toContain('http:');
    expect(e).toBe('&lt;a href&#61;&quot;x&quot;&gt;&#39;&amp;&#39;&lt;&#47;a&gt; http&#58;&#47;&#47;h &#96;&#61;&#96;');
  });

  it('Markdown: emphasis, code, links and table pipes are escaped; raw HTML is not passed through', () => {
    // CommonMark 0.31 §2.4 (backslash escapes of ASCII punctuation); GFM tables (escaped pipe).
    expect(escapeMarkdown('*b* _i_ `c` [l](u) a|b <i>&')).toBe('\\*b\\* \\_i\\_ \\`c\\` \\[l\\](u) a\\|b &lt;i&gt;&amp;');
    expect(escapeMarkdown('two\nlines')).toBe('two lines');
  });
});

describe('scene kinds of the demo scenes', () => {
  it('filter, trap, scan, linear and reflectron TOF', () => {
    expect(sceneTraits(scene('qf4-compact-filter.yaml')).kind).toBe('quadrupole');
    expect(sceneTraits(scene('t7-trap-cooling.yaml'))).toMatchObject({ kind: 'trap', gas: true, rf: true });
    expect(sceneTraits(scene('t7-mass-scan.yaml')).kind).toBe('trap-scan');
    expect(sceneTraits(scene('lt1-linear-tof.yaml'))).toMatchObject({ kind: 'tof-linear', twoFieldSource: true, rf: false, recordsTrajectories: false });
    expect(sceneTraits(scene('rt1-reflectron-tof.yaml')).kind).toBe('tof-reflectron');
  });
});

describe('operating-point rows', () => {
  it('a fixed RF gives one row per species; a ramp gives start and end rows with q ∝ V', () => {
    // q = 8zeV/(m (r0² + 2z0²) Ω²) (DESIGN.md trap convention; March & Todd 2005, ch. 2): linear in V.
    const fixed = operatingPointRows(scene('t7-trap-cooling.yaml'));
    expect(fixed.map((r) => [r.at, r.mz])).toEqual([['fixed', 609], ['fixed', 100]]);
    const ramp = operatingPointRows(scene('t7-mass-scan.yaml'));
    expect(ramp).toHaveLength(6);
    const [start, end] = ramp.filter((r) => r.mz === 150);
    expect(start.at).toBe('ramp start');
    expect(end.at).toBe('ramp end');
    expect(end.axes[0].q / start.axes[0].q).toBeCloseTo(1200 / 200, 12);
    // q_z 0.2365 at 200 V is stable, 1.419 at 1.2 kV is past the a_z = 0 edge (0.908): Mathieu stability.
    expect(start.first_region).toBe(true);
    expect(end.axes[0].stable).toBe(false);
  });

  it('no RF stage, no rows', () => {
    expect(operatingPointRows(scene('lt1-linear-tof.yaml'))).toEqual([]);
  });
});

describe('results.json', () => {
  const summary = (): RunSummary => ({
    complete: true, scene_name: 'Skerry LT-1 test', ions: { total: 1, detected: 1, hit: 0, alive: 0 },
    species: [{ population: 0, mz: 1000, charge: 1, total: 1, detected: 1, hit: 0, alive: 0, transmission: 1, alive_mean_ke_ev: null }],
    stats: { steps: 3, wall_s: 0.1 }, warnings: [],
    provenance: { tool_version: '0.1.0', scene: {}, scene_file: 'x.yaml', seed: 5, command_line: 'iontrail report', integrator: { method: 'rk4' }, workers: 1, started_at: '2026-01-01T00:00:00Z' },
    units: {},
    cooling: { tau_s: null, final_rms_radius_m: Number.NaN },
  });

  it('writes non-finite numbers as null and keeps the run\'s values', () => {
    const r = buildResults({ scene: scene('lt1-linear-tof.yaml'), summary: summary(), figures: [], sweep: null, runFolder: 'run', sample: null, commandLine: 'iontrail report x', sceneFile: 'x.yaml', wallTimeS: 1, startedAt: 't' });
    const back = JSON.parse(formatResults(r));
    expect(back.cooling).toEqual({ tau_s: null, final_rms_radius_m: null });
    expect(back.species[0].transmission).toBe(1);
    expect(back.provenance.seed).toBe(5);
    // A dash, not "NaN", where the document shows a missing number.
    expect(num(Number.NaN)).toBe('—');
    const doc = reportDocument(r);
    expect(doc.sections.map((s) => s.id)).toEqual(['verdict', 'safety', 'inputs', 'results', 'cooling', 'target-keys', 'assumptions', 'provenance']);
  });
});
