// Title and footer text of a figure, from the run's summary.json.

import type { RunSummary } from '../../sim/runfolder/index.js';

export function figureTitle(summary: RunSummary, what: string): string {
  const name = typeof summary.scene_name === 'string' && summary.scene_name !== '' ? summary.scene_name : 'unnamed scene';
  return `${name} — ${what}`;
}

/**
 * "iontrail 0.1.0 · seed 42 · scene scenes/qf4.yaml · incomplete run". Only what fixes the result
 * (version, seed, scene) goes in: no start time and no folder name, so a figure of a merged or
 * re-run folder has the bytes of the unsharded run's figure; times stay in summary.json.
 */
export function footerText(summary: RunSummary): string {
  const p = (summary.provenance ?? {}) as Partial<RunSummary['provenance']>;
  const parts = [
    `iontrail ${p.tool_version ?? '?'}`,
    `seed ${p.seed ?? '?'}`,
    `scene ${p.scene_file ?? '(inline)'}`,
  ];
  if (summary.complete === false) parts.push('INCOMPLETE run (interrupted)');
  return parts.join('  ·  ');
}
