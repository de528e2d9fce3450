// The verdict of a report: the scene's purpose, its key numbers, and each design target of the
// scene (sim/scene/targets.ts) passed or failed. Pure: reads the assembled results only.

import { TARGETS, TARGET_KEYS, type TargetKey, type Targets } from '../scene/targets.js';
import type { OperatingPointRow } from './operating-points.js';
import type { SceneKind } from './scene-kind.js';

export interface KeyNumber {
  /** Stable id, e.g. "transmission", "resolution_50", "tau". */
  key: string;
  label: string;
  /** SI value (energies in eV, m/z in u/e, shares 0..1); null when the run gives none. */
  value: number | null;
  /** Unit of value: 's', 'm', '' for m/z, 'fraction' for shares. */
  unit: string;
  /** The species (m/z) it belongs to, when per species. */
  mz?: number;
}

export type TargetStatus = 'pass' | 'fail' | 'not evaluated';

export interface TargetCheck {
  key: TargetKey;
  meaning: string;
  /** '≥' or '≤': which way passes. */
  compare: '≥' | '≤';
  target: number;
  /** The value compared (the worst species where per species); null when not evaluated. */
  actual: number | null;
  unit: string;
  /** m/z of the worst species, when per species. */
  mz?: number;
  status: TargetStatus;
  /** Why a target was not evaluated. */
  reason?: string;
}

export interface Verdict {
  /** 'pass': every evaluated target met; 'fail': one or more missed; 'not evaluated': targets given, none applies; 'no targets': the scene states none. */
  status: 'pass' | 'fail' | 'not evaluated' | 'no targets';
  purpose: string;
  key_numbers: KeyNumber[];
  targets: TargetCheck[];
}

/** What the verdict reads of the results (the parts of results.json it needs). */
export interface VerdictInput {
  scene_name: string;
  scene_kind: SceneKind;
  species: { mz: number; total: number; detected: number; alive: number }[];
  operating_points: OperatingPointRow[];
  cooling: Record<string, unknown> | null;
  scan: Record<string, unknown> | null;
  tof: Record<string, unknown> | null;
  space_charge: Record<string, unknown> | null;
  sweep: { status: string; reason?: string; peak?: { mz: number; fwhm_mz: number | null; resolution_50: number | null; resolution_10: number | null; transmission: number } | null } | null;
}

export const SCENE_KIND_TEXT: Record<SceneKind, string> = {
  quadrupole: 'quadrupole mass filter',
  trap: 'RF ion trap (storage)',
  'trap-scan': 'RF ion trap, mass scan',
  'tof-linear': 'linear time-of-flight analyzer',
  'tof-reflectron': 'reflectron time-of-flight analyzer',
  other: 'ion-optical scene',
};

/** The scene kind in words, with the way a trap scan ejects (results.json scan.mode). */
export function sceneKindText(kind: SceneKind, scan: Record<string, unknown> | null): string {
  if (kind !== 'trap-scan') return SCENE_KIND_TEXT[kind] ?? kind;
  const how = scan?.mode === 'resonance-ejection' ? 'resonance ejection' : scan?.mode === 'instability' ? 'mass-selective instability' : null;
  return how ? `${SCENE_KIND_TEXT[kind]} by ${how}` : SCENE_KIND_TEXT[kind];
}

const numOrNull = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
const list = (v: unknown): Record<string, unknown>[] => (Array.isArray(v) ? (v as Record<string, unknown>[]) : []);

/** Per-species values of one figure; `worst` is the smallest (for ≥) or largest (for ≤). */
interface PerSpecies { mz: number; value: number | null }

function storedShare(s: VerdictInput['species'][number]): number { return s.total > 0 ? s.alive / s.total : 0; }
function detectedShare(s: VerdictInput['species'][number]): number { return s.total > 0 ? s.detected / s.total : 0; }

/** The first operating-point row of the first RF stage at the start of the run. */
function firstWindowRow(r: VerdictInput): OperatingPointRow | undefined {
  return r.operating_points.find((o) => o.at !== 'ramp end') ?? r.operating_points[0];
}

export function keyNumbers(r: VerdictInput): KeyNumber[] {
  const out: KeyNumber[] = [];
  const k = r.scene_kind;
  const storage = k === 'trap';
  for (const s of r.species) {
    out.push(storage
      ? { key: 'stored', label: 'stored at the end of the run', value: storedShare(s), unit: 'fraction', mz: s.mz }
      : { key: 'transmission', label: k === 'trap-scan' ? 'ejected onto the detector' : 'transmission (detected share)', value: detectedShare(s), unit: 'fraction', mz: s.mz });
  }
  const peak = r.sweep?.status === 'done' ? r.sweep.peak ?? null : null;
  if (k === 'quadrupole') {
    out.push({ key: 'resolution_50', label: 'peak resolution m/Δm at 50 % height (m/z sweep)', value: peak?.resolution_50 ?? null, unit: '' });
    out.push({ key: 'resolution_10', label: 'peak resolution m/Δm at 10 % height (m/z sweep)', value: peak?.resolution_10 ?? null, unit: '' });
    out.push({ key: 'peak_transmission', label: 'transmission at the peak (m/z sweep)', value: peak?.transmission ?? null, unit: 'fraction' });
  }
  const w = firstWindowRow(r);
  if (w && w.analyzer === 'quadrupole') {
    out.push({ key: 'mz_window_low', label: 'm/z window, lower edge', value: w.mz_window?.low ?? null, unit: '' });
    const high = w.mz_window?.high ?? null;
    // RF only (U = 0) has no upper edge: say so instead of leaving an empty cell.
    out.push({ key: 'mz_window_high', label: high === null ? 'm/z window, upper edge (none: RF only)' : 'm/z window, upper edge', value: high, unit: '' });
  } else if (w && w.analyzer === 'trap') {
    out.push({ key: 'lmco', label: `low-mass cut-off${w.at === 'ramp start' ? ' at the start of the ramp' : ''}`, value: w.lmco_mz, unit: '' });
  }
  if (k === 'trap-scan') {
    for (const s of list(r.scan?.species)) out.push({ key: 'resolution_50', label: 'scan resolution m/Δm at FWHM', value: numOrNull(s.resolution), unit: '', mz: numOrNull(s.mz) ?? undefined });
  }
  if (k === 'tof-linear' || k === 'tof-reflectron') {
    for (const s of list(r.tof?.species)) out.push({ key: 'resolution_fwhm', label: 'TOF resolution t/(2Δt) at FWHM', value: numOrNull(s.resolution_fwhm), unit: '', mz: numOrNull(s.mz) ?? undefined });
  }
  if (r.cooling && k !== 'trap-scan') out.push({ key: 'tau', label: 'cooling time constant τ', value: numOrNull(r.cooling.tau_s), unit: 's' });
  if (r.space_charge) {
    out.push({ key: 'real_charges', label: 'stored charges (capacity point: simulated ions × weight × z)', value: numOrNull(r.space_charge.real_charges), unit: '' });
    out.push({ key: 'frequency_shift_z', label: 'secular-frequency shift along z (fraction of the single-ion value)', value: numOrNull(r.space_charge.frequency_shift_z), unit: 'fraction' });
    out.push({ key: 'frequency_shift_r', label: 'secular-frequency shift along r (fraction of the single-ion value)', value: numOrNull(r.space_charge.frequency_shift_r), unit: 'fraction' });
  }
  return out;
}

const notEvaluated = (reason: string) => ({ values: null as PerSpecies[] | null, reason });

/** The values a target is compared with, or why it does not apply. */
function valuesFor(key: TargetKey, r: VerdictInput): { values: PerSpecies[] | null; reason?: string; unit?: string } {
  const k = r.scene_kind;
  const peak = r.sweep?.status === 'done' ? r.sweep.peak ?? null : null;
  const w = firstWindowRow(r);
  switch (key) {
    case 'transmission':
      if (k === 'trap') return notEvaluated('a storage trap detects no ions: use the target stored');
      return { values: r.species.map((s) => ({ mz: s.mz, value: detectedShare(s) })), unit: 'fraction' };
    case 'stored':
      if (k !== 'trap') return notEvaluated('only a storage trap keeps ions at the end of the run');
      return { values: r.species.map((s) => ({ mz: s.mz, value: storedShare(s) })), unit: 'fraction' };
    case 'resolution_50':
      if (k === 'quadrupole') return peak ? { values: [{ mz: peak.mz, value: peak.resolution_50 }] } : notEvaluated(`no m/z sweep: ${r.sweep?.reason ?? 'not run'}`);
      if (k === 'trap-scan') return { values: list(r.scan?.species).map((s) => ({ mz: numOrNull(s.mz) ?? NaN, value: numOrNull(s.resolution) })) };
      return notEvaluated(k.startsWith('tof') ? 'a time-of-flight scene is judged by resolution_fwhm' : 'no peak to measure in this scene');
    case 'resolution_10':
      if (k !== 'quadrupole') return notEvaluated('only a filter peak (m/z sweep) has a 10 % width here');
      return peak ? { values: [{ mz: peak.mz, value: peak.resolution_10 }] } : notEvaluated(`no m/z sweep: ${r.sweep?.reason ?? 'not run'}`);
    case 'resolution_fwhm':
      if (k !== 'tof-linear' && k !== 'tof-reflectron') return notEvaluated('only a time-of-flight scene has arrival-time peaks');
      return { values: list(r.tof?.species).map((s) => ({ mz: numOrNull(s.mz) ?? NaN, value: numOrNull(s.resolution_fwhm) })) };
    case 'tau_max':
      if (!r.cooling || k === 'trap-scan') return notEvaluated('no buffer-gas cooling figure in this scene');
      return { values: [{ mz: NaN, value: numOrNull(r.cooling.tau_s) }], unit: 's' };
    case 'mz_window_low':
      if (!w) return notEvaluated('no RF stage: no m/z window');
      return { values: [{ mz: NaN, value: w.analyzer === 'trap' ? w.lmco_mz : w.mz_window?.low ?? null }] };
    case 'mz_window_high':
      if (!w || w.analyzer !== 'quadrupole') return notEvaluated('only a filter has an upper m/z edge');
      // RF only (no DC): no upper edge, every m/z above the lower edge passes.
      return { values: [{ mz: NaN, value: w.mz_window === null ? null : w.mz_window.high ?? Infinity }] };
    case 'frequency_shift_max':
      if (!r.space_charge) return notEvaluated('no space charge in this scene');
      return { values: ['frequency_shift_z', 'frequency_shift_r'].map((f) => { const v = numOrNull(r.space_charge![f]); return { mz: NaN, value: v === null ? null : Math.abs(v) }; }), unit: 'fraction' };
  }
}

const COMPARE: Record<TargetKey, '≥' | '≤'> = {
  transmission: '≥', stored: '≥', resolution_50: '≥', resolution_10: '≥', resolution_fwhm: '≥',
  tau_max: '≤', mz_window_low: '≤', mz_window_high: '≥', frequency_shift_max: '≤',
};

export function checkTargets(targets: Targets | undefined, r: VerdictInput): TargetCheck[] {
  const out: TargetCheck[] = [];
  if (!targets) return out;
  for (const key of TARGET_KEYS) {
    const target = targets[key];
    if (target === undefined) continue;
    const compare = COMPARE[key];
    const base = { key, meaning: TARGETS[key].meaning, compare, target };
    const got = valuesFor(key, r);
    const unit = got.unit ?? (key === 'tau_max' ? 's' : '');
    if (got.values === null || got.values.length === 0) {
      out.push({ ...base, actual: null, unit, status: 'not evaluated', reason: got.reason ?? 'no value in this run' });
      continue;
    }
    // A species without a value (no peak found) fails: the target asks for every species.
    const missing = got.values.find((v) => v.value === null);
    if (missing) {
      out.push({ ...base, actual: null, unit, ...(Number.isFinite(missing.mz) ? { mz: missing.mz } : {}), status: 'fail', reason: 'no value: no peak or no fit in this run' });
      continue;
    }
    const worst = got.values.reduce((a, b) => (compare === '≥' ? (b.value! < a.value! ? b : a) : (b.value! > a.value! ? b : a)));
    const ok = compare === '≥' ? worst.value! >= target : worst.value! <= target;
    out.push({ ...base, actual: worst.value, unit, ...(Number.isFinite(worst.mz) && got.values.length > 1 ? { mz: worst.mz } : {}), status: ok ? 'pass' : 'fail' });
  }
  return out;
}

export function verdict(targets: Targets | undefined, r: VerdictInput): Verdict {
  const checks = checkTargets(targets, r);
  const status: Verdict['status'] = checks.length === 0 ? 'no targets'
    : checks.some((c) => c.status === 'fail') ? 'fail'
      : checks.some((c) => c.status === 'pass') ? 'pass' : 'not evaluated';
  return { status, purpose: `${sceneKindText(r.scene_kind, r.scan)}: ${r.scene_name}`, key_numbers: keyNumbers(r), targets: checks };
}
