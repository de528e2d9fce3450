// The report as a document model — sections of paragraphs, tables, lists and figures — built from
// results.json data only. The HTML and Markdown writers both serialize this, so the two files say
// the same thing. Strings here are plain text; the writers escape them.

import type { ReportResults, FigureEntry } from '../../sim/report/results.js';
import type { OperatingPointRow } from '../../sim/report/operating-points.js';
import { formatSI } from '../../sim/units/quantity.js';
import { TOF_RESOLUTION_DEFINITION } from '../../sim/analysis/arrival.js';
import { sceneKindText, type Verdict, type KeyNumber, type TargetCheck } from '../../sim/report/verdict.js';
import type { InputRow } from '../../sim/scene/inputs.js';

export type Block =
  | { kind: 'p'; text: string; strong?: boolean }
  | { kind: 'table'; caption?: string; head: string[]; rows: string[][]; numeric?: boolean[] }
  | { kind: 'list'; items: string[] }
  | { kind: 'cautions'; items: string[] }
  | { kind: 'figure'; figure: FigureEntry };

export interface Section { id: string; title: string; blocks: Block[] }
export interface ReportDoc { title: string; subtitle: string; sections: Section[] }

const DASH = '—';

/** Significant-figure number, or a dash for null/NaN. */
export function num(v: unknown, digits = 4): string {
  if (typeof v !== 'number' || !Number.isFinite(v)) return DASH;
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e6 || a < 1e-4) return v.toExponential(digits - 1).replace('e+', 'e');
  return String(Number(v.toPrecision(digits)));
}

/** SI-prefixed value with unit, or a dash. */
export function si(v: unknown, unit: string, digits = 4): string {
  if (typeof v !== 'number' || !Number.isFinite(v)) return DASH;
  return formatSI(v, unit, digits);
}

const pct = (v: unknown): string => (typeof v === 'number' && Number.isFinite(v) ? `${(100 * v).toFixed(1)} %` : DASH);
const int = (v: unknown): string => (typeof v === 'number' && Number.isFinite(v) ? Math.round(v).toLocaleString('en-US') : DASH);


function windowText(r: OperatingPointRow): string {
  const w = r.mz_window;
  if (r.analyzer === 'trap') return r.lmco_mz === null ? DASH : `LMCO m/z ${num(r.lmco_mz, 5)} (q_z ${num(r.q_eject, 4)})`;
  if (!w) return 'scan line misses the first region';
  return w.high === null ? `m/z ≥ ${num(w.low, 5)} (RF only)` : `m/z ${num(w.low, 5)} to ${num(w.high, 5)}`;
}

function operatingPointTable(rows: OperatingPointRow[]): Block[] {
  const blocks: Block[] = [];
  const stages = [...new Set(rows.map((r) => r.stage))];
  for (const st of stages) {
    const rs = rows.filter((r) => r.stage === st);
    const first = rs[0];
    const body: string[][] = [];
    for (const r of rs) {
      r.axes.forEach((x, i) => {
        body.push([
          i === 0 ? `m/z ${num(r.mz, 6)}${r.charge !== 1 ? ` (z ${r.charge > 0 ? '+' : ''}${r.charge})` : ''}` : '',
          i === 0 ? (r.at === 'fixed' ? si(r.rf_v, 'V') : `${si(r.rf_v, 'V')} (${r.at})`) : '',
          x.axis,
          num(x.a, 4), num(x.q, 4),
          x.stable ? num(x.beta, 4) : 'unstable',
          si(x.secular_frequency_hz, 'Hz'),
          `${num(x.well_depth_v, 3)}${x.well_depth_valid ? '' : ' *'}`,
          i === 0 ? windowText(r) : '',
          i === 0 ? (r.first_region ? 'yes' : r.stable ? 'stable, not first region' : 'no') : '',
        ]);
      });
    }
    blocks.push({
      kind: 'table',
      caption: `Stage ${st}: ${first.analyzer === 'trap' ? 'RF trap' : 'quadrupole filter'}, f ${si(first.freq_hz, 'Hz')}, DC ${si(first.dc_v, 'V')}; RF zero-to-peak, electrode to ground`,
      head: ['species', 'RF', 'axis', 'a', 'q', 'β (exact)', 'secular freq.', 'well depth (V)', first.analyzer === 'trap' ? 'low-mass cut-off' : 'm/z window', 'first region'],
      rows: body,
      numeric: [false, true, false, true, true, true, true, true, false, false],
    });
  }
  const anyInvalid = rows.some((r) => r.axes.some((x) => !x.well_depth_valid));
  blocks.push({ kind: 'p', text: 'β from the Floquet monodromy matrix of one RF period; secular frequency βf/2; well depth: Dehmelt pseudopotential per unit charge at the electrode distance.' + (anyInvalid ? ' * |q| ≥ 0.4: outside the range where the pseudopotential depth holds; read it as an indication only.' : '') });
  return blocks;
}

/** Column titles of the fates; a fate the engine adds later shows under its own name. */
function fateLabel(fate: string, storage: boolean): string {
  if (fate === 'alive') return storage ? 'stored at the end' : 'in flight at max_time';
  if (fate === 'hit') return 'struck an electrode';
  return fate;
}

function speciesTable(r: ReportResults): Block {
  const storage = r.scene_kind === 'trap';
  const fates = r.fate_names;
  const share = storage ? 'stored' : r.scene_kind === 'trap-scan' ? 'ejected onto the detector' : 'transmission';
  return {
    kind: 'table',
    head: ['m/z', 'z', 'ions', ...fates.map((f) => fateLabel(f, storage)), share, storage ? 'mean KE stored (eV)' : 'mean KE in flight (eV)'],
    rows: r.species.map((s) => [num(s.mz, 6), String(s.charge), int(s.total), ...fates.map((f) => int(s.fates[f] ?? 0)),
      pct(storage ? (s.total > 0 ? s.alive / s.total : NaN) : s.transmission), num(s.alive_mean_ke_ev, 3)]),
    numeric: [true, true, true, ...fates.map(() => true), true, true],
  };
}

function keyValue(k: { value: number | null; unit: string }): string {
  if (k.value === null) return DASH;
  if (k.unit === 'fraction') return pct(k.value);
  if (k.unit === '') return num(k.value, 5);
  return si(k.value, k.unit);
}

function targetValue(c: TargetCheck, v: number | null): string {
  if (v === null) return DASH;
  if (!Number.isFinite(v)) return 'no upper edge';
  if (c.unit === 'fraction') return c.key === 'frequency_shift_max' ? `${num(v, 3)} (${pct(v)})` : pct(v);
  if (c.unit) return si(v, c.unit);
  return num(v, 5);
}

const VERDICT_TEXT: Record<Verdict['status'], string> = {
  pass: 'PASS: every evaluated target is met.',
  fail: 'FAIL: one or more targets are missed.',
  'not evaluated': 'NOT EVALUATED: none of the targets applies to this scene.',
  'no targets': 'No targets: the scene states none (top-level key targets:, see "Target keys"); key numbers only.',
};

function verdictBlocks(r: ReportResults): Block[] {
  const v = r.verdict;
  const blocks: Block[] = [
    { kind: 'p', text: `Purpose: ${v.purpose}.` },
    { kind: 'p', text: `Verdict: ${VERDICT_TEXT[v.status]}`, strong: true },
  ];
  if (!r.complete) blocks.push({ kind: 'p', text: 'INCOMPLETE RUN: the verdict covers the finished ions only.', strong: true });
  if (v.targets.length > 0) {
    blocks.push({
      kind: 'table', caption: 'Targets of the scene (worst species where per species)',
      head: ['target', 'required', 'simulated', 'species', 'result'],
      rows: v.targets.map((c) => [c.key, `${c.compare} ${targetValue(c, c.target)}`, targetValue(c, c.actual), c.mz !== undefined ? `m/z ${num(c.mz, 6)}` : '',
        c.status === 'pass' ? 'pass' : c.status === 'fail' ? `FAIL${c.reason ? ` (${c.reason})` : ''}` : `not evaluated (${c.reason ?? ''})`]),
      numeric: [false, true, true, false, false],
    });
  }
  blocks.push({
    kind: 'table', caption: 'Key numbers',
    head: ['figure', 'species', 'value'],
    rows: v.key_numbers.map((k: KeyNumber) => [k.label, k.mz !== undefined ? `m/z ${num(k.mz, 6)}` : '', keyValue(k)]),
    numeric: [false, false, true],
  });
  return blocks;
}

function inputBlocks(rows: InputRow[] | null): Block[] {
  if (rows === null) return [{ kind: 'p', text: 'The scene file text was not available to this report: see the resolved scene (SI) in run/summary.json provenance.scene.' }];
  const body = rows.map((x) => {
    // Compound units (m^2, m^2/(V s)) take no prefix: a plain number with the SI unit.
    const siText = x.si === null ? '' : x.unit === '' ? num(x.si, 6) : /[\^/]/.test(x.unit) ? `${num(x.si, 6)} ${x.unit}` : si(x.si, x.unit, 6);
    const note = x.default ? 'default' : x.overridden ? '--set' : '';
    return [x.block, x.name, x.written, siText === x.written ? '' : siText, note];
  });
  return [
    { kind: 'p', text: 'Every value of the scene file, in the units written there (pressures too: a pressure given in mTorr stays in mTorr); the SI column shows the value the engine uses (prefixed SI units, pressures in Pa, energies in eV). "default": not in the file, filled in by the loader; "--set": given on the command line.' },
    { kind: 'table', head: ['block', 'key', 'value (as written)', 'SI', 'source'], rows: body, numeric: [false, false, true, true, false] },
  ];
}

function coolingBlocks(c: Record<string, unknown>): Block[] {
  return [{
    kind: 'table',
    head: ['figure', 'value'],
    rows: [
      ['cooling time constant τ', c.tau_s === null ? 'not fitted (energy does not fall over the run)' : si(c.tau_s, 's')],
      ['initial mean kinetic energy', si(c.initial_mean_ke_ev, 'eV')],
      ['final mean kinetic energy', si(c.final_mean_ke_ev, 'eV')],
      ['final RMS radius', si(c.final_rms_radius_m, 'm')],
      ['final RMS z', si(c.final_rms_z_m, 'm')],
      ['collisions per ion', num(c.collisions_per_ion, 4)],
    ],
    numeric: [false, true],
  }];
}

function scanBlocks(s: Record<string, unknown>): Block[] {
  const sp = (Array.isArray(s.species) ? s.species : []) as Record<string, unknown>[];
  // The ejecting coordinate: z for the 3D trap, x (radial, through the slotted rods) for a linear trap.
  const k = s.ejection_qx !== undefined ? 'qx' : 'qz', label = k === 'qx' ? 'q_x' : 'q_z';
  return [
    {
      kind: 'table',
      caption: `${String(s.mode ?? 'scan')} scan: ejection ${label} ${num(s[`ejection_${k}`], 5)}, calibration ${num(s.mz_per_volt, 5)} m/z per volt of RF, scan rate ${num(s.scan_rate_mz_per_s, 4)} m/z per second`,
      head: ['m/z', 'ejected', 'apparent m/z', 'FWHM (m/z)', 'resolution m/Δm', `mean ejection ${label}`, `expected ${label}`],
      rows: sp.map((x) => [num(x.mz, 6), int(x.ejected), num(x.apparent_mz, 6), num(x.fwhm_mz, 3), num(x.resolution, 4), num(x[`ejection_${k}_mean`], 4), num(x[`ejection_${k}_expected`], 4)]),
      numeric: [true, true, true, true, true, true, true],
    },
  ];
}

function tofBlocks(t: Record<string, unknown>): Block[] {
  const sp = (Array.isArray(t.species) ? t.species : []) as Record<string, unknown>[];
  const refl = sp.some((x) => 'linear_equivalent_resolution' in x);
  const out: Block[] = [{
    kind: 'table',
    caption: `Arrival-time peaks; resolution ${TOF_RESOLUTION_DEFINITION}`,
    head: ['m/z', 'detected', 'arrival time', 'FWHM', 'resolution', 'energy FWHM', ...(refl ? ['FWHM without reflectron', 'resolution without reflectron'] : [])],
    rows: sp.map((x) => [num(x.mz, 6), int(x.detected), si(x.arrival_time_s, 's', 6), si(x.fwhm_s, 's', 3), num(x.resolution_fwhm, 4), si(x.energy_fwhm_ev, 'eV', 3),
      ...(refl ? [si(x.linear_equivalent_fwhm_s, 's', 3), num(x.linear_equivalent_resolution, 4)] : [])]),
    numeric: [true, true, true, true, true, true, true, true],
  }];
  const cal = t.calibration as Record<string, unknown> | null | undefined;
  const rows: string[][] = [];
  if (cal) rows.push(['mass calibration t = t0 + k·√(m/z)', `t0 = ${si(cal.t0_s, 's')}, k = ${si(cal.k_s_per_sqrt_mz, 's', 6)}`]);
  const src = t.source as Record<string, unknown> | undefined;
  if (src) {
    rows.push(['source: start from back plate', si(src.start_from_back_plate_m, 'm')]);
    rows.push(['source: extraction / acceleration field', `${si(src.extraction_field_v_per_m, 'V/m')} / ${si(src.acceleration_field_v_per_m, 'V/m')}`]);
    rows.push(['first-order space-focus distance (Wiley–McLaren)', si(src.space_focus_distance_m, 'm')]);
    rows.push(['field-free path to the detector', si(src.drift_to_detector_m, 'm')]);
    rows.push(['extraction voltage for focus at the detector', si(src.extraction_voltage_for_focus_at_detector_v, 'V')]);
    if (typeof src.reference === 'string') rows.push(['reference', src.reference]);
  }
  const r = t.reflectron as Record<string, unknown> | undefined;
  if (r) {
    rows.push(['reflectron voltage', si(r.voltage_v, 'V')]);
    rows.push(['voltage for first-order energy focus (L = 4p)', si(r.voltage_for_energy_focus_v, 'V', 5)]);
    rows.push(['energy per charge entering the reflectron', si(r.energy_per_charge_v, 'V', 5)]);
    rows.push(['penetration depth p', si(r.penetration_m, 'm')]);
    rows.push(['field-free path L', si(r.field_free_path_m, 'm')]);
    if (typeof r.reference === 'string') rows.push(['reference', r.reference]);
  }
  if (rows.length > 0) out.push({ kind: 'table', head: ['figure', 'value'], rows, numeric: [false, true] });
  return out;
}

function sweepBlocks(r: ReportResults): Block[] {
  const s = r.sweep;
  if (!s) return [];
  if (s.status !== 'done') return [{ kind: 'p', text: `m/z sweep not included: ${s.reason ?? 'unavailable'}.` }];
  const p = s.peak;
  return [{
    kind: 'table',
    caption: `m/z sweep ${s.varied ?? 'mz'}: ${s.points ?? '?'} points of ${s.ions_per_point ?? '?'} ions each, ${s.method === 'matrix' ? 'exact transfer-matrix path' : `${s.method ?? '?'} path`}; resolution m/Δm at 50 % and 10 % of the peak height`,
    head: ['peak m/z', 'FWHM (m/z)', 'resolution at 50 %', 'resolution at 10 %', 'transmission at the peak'],
    rows: p ? [[num(p.mz, 6), num(p.fwhm_mz, 3), num(p.resolution_50, 4), num(p.resolution_10, 4), pct(p.transmission)]] : [[DASH, DASH, DASH, DASH, DASH]],
    numeric: [true, true, true, true, true],
  }];
}

/** `report --beside OTHER`: the two peaks in one table, then the multipole table of each planar electrodes stage. */
function besideBlocks(b: NonNullable<ReportResults['beside']>): Block[] {
  const out: Block[] = [{
    kind: 'table',
    caption: `m/z sweep ${b.varied}: ${b.mz.length} points of ${b.ions_per_point} ions each, the same points and --set values for both scenes; resolution m/Δm at 50 % and 10 % of the peak height`,
    head: ['scene', 'file', 'path', 'peak m/z', 'FWHM (m/z)', 'resolution at 50 %', 'resolution at 10 %', 'transmission at the peak'],
    rows: b.sweeps.map((w) => {
      const p = w.peak;
      return [w.scene_name, w.scene_file, w.method, ...(p ? [num(p.mz, 6), num(p.fwhm_mz, 3), num(p.resolution_50, 4), num(p.resolution_10, 4), pct(p.transmission)] : [DASH, DASH, DASH, DASH, DASH])];
    }),
    numeric: [false, false, false, true, true, true, true, true],
  }];
  const [p0, p1] = b.sweeps.map((w) => w.peak);
  for (const m of b.multipoles) {
    // Orders below 1e-9 of the quadrupole term are the solver's round-off (odd orders of a mirrored set).
    const big = m.terms.filter((t) => t.n === 2 || Math.abs(t.relative_cos) > 1e-9 || Math.abs(t.relative_sin) > 1e-9);
    out.push({
      kind: 'table',
      caption: `${b.sweeps[m.scene].scene_name}, stage ${m.stage}: multipoles of the planar solve at the electrodes' dc volts, Φ = Σ (cos_v cos nθ + sin_v sin nθ)(r / ${num(m.reference_radius_m * 1e3, 3)} mm)^n; relative to the n = 2 cos term; orders below 1e-9 of it not shown`,
      head: ['n', 'cos_v (V)', 'sin_v (V)', 'cos_v / A2', 'sin_v / A2'],
      rows: big.map((t) => [String(t.n), num(t.cos_v, 6), num(t.sin_v, 3), num(t.relative_cos, 4), num(t.relative_sin, 3)]),
      numeric: [true, true, true, true, true],
    });
    if (m.a2) {
      const me = m.scene === 0 ? p0 : p1, other = m.scene === 0 ? p1 : p0;
      const expected = other ? other.mz * m.a2.value : null;
      out.push({ kind: 'p', text: `A2 of stage ${m.stage} against the ideal quadrupole of r0 ${num(m.a2.r0_m * 1e3, 4)} mm at DC ${num(m.a2.dc_v, 6)} V (stage ${m.a2.against_stage} of ${b.sweeps[m.a2.against_scene].scene_name}): ${num(m.a2.value, 6)}. `
        + `a and q scale with A2, so the peak sits at A2 × the ideal filter's m/z (Douglas and Konenkov, Rapid Commun. Mass Spectrom. 16 (2002) 1425): expected m/z ${num(expected, 6)}, swept ${num(me?.mz ?? null, 6)}.` });
    }
  }
  return out;
}

export function reportDocument(r: ReportResults): ReportDoc {
  const sections: Section[] = [];
  sections.push({ id: 'verdict', title: 'Verdict', blocks: verdictBlocks(r) });
  sections.push({ id: 'safety', title: 'Safety', blocks: [{ kind: 'cautions', items: r.safety_cautions }] });
  sections.push({ id: 'inputs', title: 'Scene inputs', blocks: inputBlocks(r.inputs) });
  const res: Block[] = [speciesTable(r)];
  const det = r.detector;
  if (det) {
    const size = det.radius_m === null ? 'unbounded (every ion reaching it counts)' : `radius ${num(det.radius_m * 1e3, 3)} mm`;
    res.push({ kind: 'p', text: `Detector: a disc in the exit plane of the last stage, ${size}, from ${det.source === 'scene' ? 'the scene file' : det.source === 'none' ? 'no aperture or RF stage' : `the ${det.source}`}; an ion crossing that plane outside it is counted as missed.` });
  }
  if (!r.complete) res.unshift({ kind: 'p', text: 'INCOMPLETE RUN: interrupted before every ion finished; the figures cover the finished ions only.' });
  const ionsTitle = r.scene_kind === 'trap' ? 'Ions stored and lost' : r.scene_kind === 'trap-scan' ? 'Ions ejected and lost' : 'Ions and transmission';
  sections.push({ id: 'results', title: ionsTitle, blocks: res });
  if (r.operating_points.length > 0) sections.push({ id: 'operating-points', title: 'Operating points', blocks: operatingPointTable(r.operating_points) });
  if (r.sweep) sections.push({ id: 'peak', title: 'Peak shape and resolution', blocks: sweepBlocks(r) });
  if (r.beside) sections.push({ id: 'beside', title: 'Peak beside the other filter, and multipoles', blocks: besideBlocks(r.beside) });
  if (r.cooling && r.scene_kind !== 'trap-scan') sections.push({ id: 'cooling', title: 'Buffer-gas cooling', blocks: coolingBlocks(r.cooling) });
  if (r.scan) sections.push({ id: 'scan', title: 'Mass scan', blocks: scanBlocks(r.scan) });
  if (r.tof) sections.push({ id: 'tof', title: 'Time of flight', blocks: tofBlocks(r.tof) });
  if (r.figures.length > 0) sections.push({ id: 'figures', title: 'Figures', blocks: r.figures.map((f) => ({ kind: 'figure', figure: f }) as Block) });
  sections.push({ id: 'target-keys', title: 'Target keys', blocks: [
    { kind: 'p', text: 'Targets a scene may state under the top-level key targets: (e.g. targets: { resolution_50: 500, transmission: 0.5 }); shares are fractions 0..1, tau_max is a time with its unit. A target that does not apply to the scene is listed as not evaluated.' },
    { kind: 'table', head: ['key', 'passes when'], rows: Object.entries(r.target_keys).map(([k, m]) => [k, m]), numeric: [false, false] },
  ] });
  sections.push({ id: 'assumptions', title: 'Model assumptions and limits', blocks: [{ kind: 'list', items: r.assumptions }] });
  if (r.warnings.length > 0) sections.push({ id: 'warnings', title: 'Warnings', blocks: [{ kind: 'list', items: r.warnings }] });
  const p = r.provenance;
  sections.push({
    id: 'provenance', title: 'Provenance',
    blocks: [{
      kind: 'table', head: ['item', 'value'], numeric: [false, false],
      rows: [
        ['tool', `iontrail ${p.tool_version}`],
        ['scene file', p.scene_file ?? '(none)'],
        ['seed', String(p.seed)],
        ['command line', p.command_line],
        ['started', p.started_at],
        ['report wall time', si(p.report_wall_time_s, 's', 3)],
        ['run wall time', si(p.run_wall_time_s, 's', 3)],
        ['integrator', Object.entries(p.integrator).filter(([, v]) => v !== undefined && v !== null).map(([k, v]) => `${k} ${typeof v === 'number' ? num(v, 6) : String(v)}`).join(', ')],
        ['workers', String(p.workers)],
        ['run folder', `${p.run_folder}/ (summary.json, ions.arrow, history.arrow${p.trajectory_sample ? '' : ', trajectories.arrow when recorded'})`],
        ...(p.trajectory_sample ? [['trajectory sample', `${p.trajectory_sample.folder}/: ${p.trajectory_sample.ions_per_population} ions per species from the same start distributions, recorded every ${p.trajectory_sample.record_every} steps (the scene records none)`]] : []),
      ],
    }],
  });
  return {
    title: r.scene_name,
    subtitle: `Design review: ${sceneKindText(r.scene_kind, r.scan as Record<string, unknown> | null)} · iontrail ${p.tool_version} · seed ${p.seed}`,
    sections,
  };
}
