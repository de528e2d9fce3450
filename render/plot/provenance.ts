// Title and footer text of a figure, from the run's summary.json.

import { basename, resolve } from 'node:path';
import type { RunSummary } from '../../sim/runfolder/index.js';

export function figureTitle(summary: RunSummary, what: string): string {
  const name = typeof summary.scene_name === 'string' && summary.scene_name !== '' ? summary.scene_name : 'unnamed scene';
  return `${name} — ${what}`;
}

/** "iontrail 0.1.0 · seed 42 · scene scenes/qf4.yaml · run out/qf4 · 2026-01-01T00:00Z · incomplete run". */
export function footerText(summary: RunSummary, dir: string): string {
  const p = (summary.provenance ?? {}) as Partial<RunSummary['provenance']>;
  const parts = [
    `iontrail ${p.tool_version ?? '?'}`,
    `seed ${p.seed ?? '?'}`,
    `scene ${p.scene_file ?? '(inline)'}`,
    `run ${basename(resolve(dir))}`,
  ];
  if (p.started_at) parts.push(`started ${p.started_at}`);
  if (summary.complete === false) parts.push('INCOMPLETE run (interrupted)');
  return parts.join('  ·  ');
}
