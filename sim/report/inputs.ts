// The inputs table of a report: every value the scene file gives, as written (so pressures keep
// the unit the user wrote: mTorr stays mTorr), and the run settings the loader fills in when the
// scene leaves them out, in engineering units.

import type { Scene } from '../scene/types.js';
import { sceneInputRows, type InputRow } from '../scene/inputs.js';
import { formatSI } from '../units/quantity.js';

/** Run settings the loader resolves with a default (sim/scene/load.ts), with their SI unit. */
function runDefaults(scene: Scene): { name: string; si: number | string; unit: string }[] {
  const r = scene.run;
  const rows: { name: string; si: number | string; unit: string }[] = [
    { name: 'integrator', si: r.integrator, unit: '' },
    { name: 'steps_per_cycle', si: r.stepsPerCycle, unit: '' },
    { name: 'max_time', si: r.maxTime, unit: 's' },
    { name: 'record_every', si: r.recordEvery, unit: '' },
    { name: 'history_every', si: r.historyEvery, unit: 's' },
    { name: 'step_without_rf', si: r.stepNoRf, unit: 's' },
  ];
  if (r.integrator === 'dopri5') rows.push({ name: 'tolerance', si: r.tolerance, unit: '' });
  return rows;
}

export function reportInputRows(scene: Scene, text: string, file: string, set: string[] = []): InputRow[] {
  const rows = sceneInputRows(text, file, set);
  const written = new Set(rows.map((r) => r.key));
  for (const d of runDefaults(scene)) {
    const key = `run.${d.name}`;
    if (written.has(key)) continue;
    const isNum = typeof d.si === 'number';
    rows.push({
      key, block: 'run', name: d.name,
      written: isNum && d.unit ? formatSI(d.si as number, d.unit) : String(d.si),
      si: isNum ? (d.si as number) : null, unit: d.unit, dim: d.unit === 's' ? 'time' : null, overridden: false, default: true,
    });
  }
  return rows;
}
