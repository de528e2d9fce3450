// summary.json of a run folder: figures of merit and provenance, filled by the engine. Written
// pretty-printed with a stable key order (the order of issue 3 / the h2 brief) so that the same run
// gives the same bytes; keys the engine adds beyond these are kept, after the known ones.

export interface SpeciesSummary {
  population: number; mz: number; charge: number;
  total: number; detected: number; hit: number;
  /**
   * Reached the detector plane outside the detector; left back through the first entrance
   * (absent from run folders written before these fates existed: read as 0).
   */
  missed?: number; returned?: number;
  alive: number;
  /** detected / total. */
  transmission: number;
  [extra: string]: unknown;
}

export interface RunProvenance {
  tool_version: string;
  /** The scene as resolved (SI numbers), as JSON. */
  scene: unknown;
  scene_file: string | null;
  seed: number;
  command_line: string;
  integrator: Record<string, unknown>;
  workers: number;
  started_at: string;
  [extra: string]: unknown;
}

export interface RunSummary {
  complete: boolean;
  scene_name: string;
  /** Ion fates in all (missed, returned: see SpeciesSummary). */
  ions: { total: number; detected: number; hit: number; missed?: number; returned?: number; alive: number; [extra: string]: unknown };
  /** The detector radius used (null: unbounded) and where it came from (sim/scene/detector.ts). */
  detector?: { radius_m: number | null; source: string };
  species: SpeciesSummary[];
  stats: { steps: number; wall_s: number; [extra: string]: unknown };
  warnings: string[];
  provenance: RunProvenance;
  units: Record<string, unknown>;
  /** Gas cooling fit (e.g. tau_s) when the run had buffer gas. */
  cooling?: Record<string, unknown>;
  [extra: string]: unknown;
}

const ORDER: Record<string, readonly string[]> = {
  '': ['complete', 'scene_name', 'ions', 'detector', 'species', 'stats', 'warnings', 'provenance', 'units', 'cooling'],
  ions: ['total', 'detected', 'hit', 'missed', 'returned', 'alive'],
  species: ['population', 'mz', 'charge', 'total', 'detected', 'hit', 'missed', 'returned', 'alive', 'transmission'],
  stats: ['steps', 'wall_s'],
  provenance: ['tool_version', 'scene', 'scene_file', 'seed', 'command_line', 'integrator', 'workers', 'started_at'],
};

function ordered(value: unknown, order: readonly string[] | undefined): unknown {
  if (order === undefined || value === null || typeof value !== 'object' || Array.isArray(value)) return value;
  const src = value as Record<string, unknown>;
  const out: Record<string, unknown> = {};
  for (const k of order) if (k in src) out[k] = src[k];
  for (const k of Object.keys(src)) if (!(k in out)) out[k] = src[k];
  return out;
}

/** summary.json text: known keys first in the fixed order, two-space indent, final newline. */
export function formatSummary(summary: RunSummary): string {
  const top = ordered(summary, ORDER['']) as Record<string, unknown>;
  for (const key of ['ions', 'stats', 'provenance']) if (key in top) top[key] = ordered(top[key], ORDER[key]);
  if (Array.isArray(top.species)) top.species = top.species.map((s) => ordered(s, ORDER.species));
  return JSON.stringify(top, null, 2) + '\n';
}
