// results.json of a report bundle: everything the report shows, as data (SI numbers, energies in
// eV), assembled from the resolved scene, the run's summary.json and the Mathieu analysis. Pure:
// no files, no clock; the caller passes timing and paths in.

import type { Scene } from '../scene/types.js';
import type { RunSummary } from '../runfolder/summary.js';
import { finiteOrNull } from '../core/json.js';
import { operatingPointRows, type OperatingPointRow } from './operating-points.js';
import { sceneTraits, type SceneKind } from './scene-kind.js';
import { assumptions, SAFETY_CAUTIONS } from './assumptions.js';
import { verdict, type Verdict } from './verdict.js';
import type { InputRow } from '../scene/inputs.js';
import { FATE_NAMES } from '../core/batch.js';
import { TARGETS, TARGET_KEYS } from '../scene/targets.js';
import type { BesideResult } from './beside.js';

export const RESULTS_FORMAT = 'iontrail-report-results';
export const RESULTS_VERSION = 2;

/** One figure of the bundle; `number` is its figure number in the report (1, 2, ...), in the order shown. */
export interface FigureEntry { id: string; number: number; file: string; title: string; caption: string; width: number; height: number }

export interface SweepResult {
  /** 'done', or 'unavailable' with the reason (no sweep module, not a filter scene, ...). */
  status: 'done' | 'unavailable';
  reason?: string;
  varied?: string;
  points?: number;
  ions_per_point?: number;
  /** Path the sweep took per point: 'matrix' (transfer matrix), 'direct' or 'mixed'. */
  method?: string;
  warnings?: string[];
  peak?: { mz: number; fwhm_mz: number | null; resolution_50: number | null; resolution_10: number | null; transmission: number } | null;
}

export interface ReportInputs {
  scene: Scene;
  summary: RunSummary;
  figures: FigureEntry[];
  sweep: SweepResult | null;
  /** Bundle-relative folder of the main run ('run') and of the trajectory sample, if any. */
  runFolder: string;
  sample: { folder: string; ions_per_population: number; record_every: number } | null;
  commandLine: string;
  sceneFile: string | null;
  /** Every value of the scene file as written and in SI (sim/scene/inputs.ts); null without the scene text. */
  inputs?: InputRow[] | null;
  /** Wall time of the whole report (runs, figures, writing), s. */
  wallTimeS: number;
  /** ISO time the report was started. */
  startedAt: string;
}

export interface ReportResults {
  format: string;
  version: number;
  scene_name: string;
  scene_kind: SceneKind;
  complete: boolean;
  /** Purpose, key numbers and the scene's targets passed or failed. */
  verdict: Verdict;
  /** The supported target keys and what each means (whether the scene gives them or not). */
  target_keys: Record<string, string>;
  /** Scene inputs as written, with SI values; null when the scene text was not available. */
  inputs: InputRow[] | null;
  /** Every fate the engine knows (sim/core/batch.ts FATE_NAMES), in its order; species[].fates counts them. */
  fate_names: string[];
  operating_points: OperatingPointRow[];
  species: { population: number; mz: number; charge: number; total: number; detected: number; hit: number; missed: number; returned: number; alive: number; transmission: number; alive_mean_ke_ev: number | null; fates: Record<string, number> }[];
  /** The detector of the run (summary.json `detector`), or null for run folders without it. */
  detector: { radius_m: number | null; source: string } | null;
  cooling: Record<string, unknown> | null;
  scan: Record<string, unknown> | null;
  tof: Record<string, unknown> | null;
  /** Space-charge figures of a coupled run (summary.json space_charge): stored charges, secular shifts (fractions). */
  space_charge: Record<string, unknown> | null;
  sweep: SweepResult | null;
  /** `report --beside OTHER`: both scenes' m/z sweeps and the multipole tables (sim/report/beside.ts). */
  beside?: BesideResult;
  figures: FigureEntry[];
  assumptions: string[];
  safety_cautions: string[];
  warnings: string[];
  provenance: {
    tool_version: string;
    seed: number;
    scene_file: string | null;
    command_line: string;
    started_at: string;
    report_wall_time_s: number;
    run_wall_time_s: number;
    run_folder: string;
    trajectory_sample: { folder: string; ions_per_population: number; record_every: number } | null;
    integrator: Record<string, unknown>;
    workers: number;
  };
  units: Record<string, string>;
}

const obj = (v: unknown): Record<string, unknown> | null => (v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as Record<string, unknown>) : null);

export function buildResults(inp: ReportInputs): ReportResults {
  const { scene, summary: s } = inp;
  const traits = sceneTraits(scene);
  const warnings = [...s.warnings];
  if (inp.sweep && inp.sweep.status === 'unavailable' && traits.kind === 'quadrupole') {
    warnings.push(`m/z sweep not included: ${inp.sweep.reason ?? 'unavailable'}`);
  }
  for (const w of inp.sweep?.warnings ?? []) warnings.push(`m/z sweep: ${w}`);
  const species = s.species.map((x) => ({
    population: x.population, mz: x.mz, charge: x.charge, total: x.total, detected: x.detected, hit: x.hit,
    missed: x.missed ?? 0, returned: x.returned ?? 0, alive: x.alive,
    transmission: x.transmission,
    alive_mean_ke_ev: typeof x.alive_mean_ke_ev === 'number' ? x.alive_mean_ke_ev : null,
    // Counts by fate name as summary.json gives them; a fate it does not count is 0.
    fates: Object.fromEntries(FATE_NAMES.map((f) => [f, typeof x[f] === 'number' ? (x[f] as number) : 0])),
  }));
  const parts = {
    scene_name: s.scene_name, scene_kind: traits.kind, species,
    operating_points: operatingPointRows(scene),
    cooling: obj(s.cooling), scan: obj(s.scan), tof: obj(s.tof), space_charge: obj(s.space_charge),
    sweep: inp.sweep,
  };
  return {
    format: RESULTS_FORMAT,
    version: RESULTS_VERSION,
    scene_name: s.scene_name,
    scene_kind: traits.kind,
    complete: s.complete,
    verdict: verdict(scene.targets, parts),
    target_keys: Object.fromEntries(TARGET_KEYS.map((k) => [k, TARGETS[k].meaning])),
    inputs: inp.inputs ?? null,
    fate_names: [...FATE_NAMES],
    operating_points: parts.operating_points,
    species,
    cooling: parts.cooling,
    scan: parts.scan,
    tof: parts.tof,
    space_charge: parts.space_charge,
    detector: s.detector ?? null,
    sweep: inp.sweep,
    figures: inp.figures,
    assumptions: assumptions(scene, traits),
    safety_cautions: [...SAFETY_CAUTIONS],
    warnings,
    provenance: {
      tool_version: s.provenance.tool_version,
      seed: s.provenance.seed,
      scene_file: inp.sceneFile,
      command_line: inp.commandLine,
      started_at: inp.startedAt,
      report_wall_time_s: inp.wallTimeS,
      run_wall_time_s: s.stats.wall_s,
      run_folder: inp.runFolder,
      trajectory_sample: inp.sample,
      integrator: s.provenance.integrator,
      workers: s.provenance.workers,
    },
    units: { length: 'm', time: 's', frequency: 'Hz', voltage: 'V', energy: 'eV', well_depth: 'V per charge (well_depth_v) and eV (well_depth_ev)', mz: 'u per elementary charge' },
  };
}

/** results.json text: two-space indent, non-finite numbers as null, final newline. */
export function formatResults(r: ReportResults): string {
  return JSON.stringify(r, finiteOrNull, 2) + '\n';
}
