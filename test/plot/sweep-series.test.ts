// Which rows of a sweep draw as one curve (render/plot/sweep-figure.ts sweepSeries): the varied
// keys other than x split the curves; an x that is a result column (the real charge of a weight
// sweep, one value per weight) follows the first varied key and must not split it into one-point
// curves. Common practice of plotting, no source.

import { describe, expect, it } from 'vitest';
import { joinSweeps, sweepSeries } from '../../render/plot/sweep-figure.js';
import type { SweepTable } from '../../render/plot/sweep-figure.js';

const table = (keys: string[], columns: string[], rows: number[][], name?: string): SweepTable =>
  ({ dir: 'sweep', columns, rows, summary: { sweep: { keys }, scene_name: name } }) as unknown as SweepTable;

describe('sweep curves', () => {
  it('a weight sweep plotted against its real charges is one curve of every point', () => {
    const t = table(['space_charge.weight'], ['space_charge.weight', 'space_charge.real_charges', 'shift'],
      [[1, 120, 0], [80, 9600, -0.03], [160, 19200, -0.06]]);
    const s = sweepSeries(t, 'space_charge.real_charges');
    expect(s).toHaveLength(1);
    expect(s[0].rows).toHaveLength(3);
  });

  it('two varied keys against the first: one curve per value of the second', () => {
    const t = table(['mz', 'dc'], ['mz', 'dc', 'transmission'], [[500, 1, 0.1], [501, 1, 0.2], [500, 2, 0.3], [501, 2, 0.4]]);
    const s = sweepSeries(t, 'mz');
    expect(s.map((g) => g.rows.length)).toEqual([2, 2]);
    expect(s[0].label).toMatch(/^dc = 1/);
  });

  it('two varied keys against a result column: the curves still split by the second key', () => {
    const t = table(['mz', 'dc'], ['mz', 'dc', 'fwhm', 'transmission'], [[500, 1, 0.5, 0.1], [501, 1, 0.6, 0.2], [500, 2, 0.7, 0.3], [501, 2, 0.8, 0.4]]);
    expect(sweepSeries(t, 'fwhm').map((g) => g.rows.length)).toEqual([2, 2]);
  });

  it('several one-key sweep folders of one key: one curve per folder, named by its scene', () => {
    const a = table(['mz'], ['mz', 'transmission'], [[500, 0.1], [501, 0.2]], 'with prefilter');
    const b = table(['mz'], ['mz', 'transmission'], [[500, 0.01], [501, 0.02], [502, 0]], 'without prefilter');
    const s = joinSweeps([a, b]).series('mz');
    expect(s.map((g) => [g.label, g.rows.length])).toEqual([['with prefilter', 2], ['without prefilter', 3]]);
  });

  it('folders of different keys, or of two keys, are refused rather than drawn on one axis', () => {
    const a = table(['mz'], ['mz', 'transmission'], [[500, 0.1]]);
    expect(() => joinSweeps([a, table(['stages.0.dc'], ['stages.0.dc', 'transmission'], [[1, 0.1]])])).toThrow(/columns differ/);
    expect(() => joinSweeps([a, table(['mz', 'dc'], ['mz', 'transmission'], [[500, 0.1]])])).toThrow(/two keys/);
  });
});
