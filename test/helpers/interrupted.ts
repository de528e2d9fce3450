// What an interrupted run folder must hold: summary.json marked incomplete, the ions of the
// batches finished (some, not all), the summary's counts those of the table, and the warning.

import { expect } from 'vitest';
import { readIons, readSummary } from '../../sim/runfolder/reader.js';
import type { RunSummary } from '../../sim/runfolder/summary.js';

export function expectInterruptedRun(out: string, planned: number, signal: RegExp = /interrupted/): RunSummary {
  const s = readSummary(out);
  expect(s.complete).toBe(false);
  const ions = readIons(out);
  expect(ions.ion.length).toBeGreaterThan(0);
  expect(ions.ion.length).toBeLessThan(planned);
  expect(s.ions.total).toBe(ions.ion.length);
  expect(s.warnings.join(' ')).toMatch(signal);
  return s;
}
