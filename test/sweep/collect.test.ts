// Sweeps that collect run-summary figures per point (full engine runs): the trap's capacity curve.
// Fact of the trade (common practice, no source): in a 3D RF trap the secular frequency of the
// stored cloud falls as the number of stored ions grows. The single-ion value comes from the
// Mathieu β (March & Todd 2005), so with one real charge per ion the shift is within the
// spectral resolution of the run (≈ 1/200 µs = 5 kHz on a 43 kHz line, interpolated: < 1%).

import { describe, expect, it } from 'vitest';
import { readFileSync, existsSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir, ROOT } from '../helpers/cli.js';

describe('sweep --collect', () => {
  it('gives the capacity curve of the T-7 trap: frequency shift falls with stored charge', () => {
    const d = tempDir();
    const r = iontrail(['sweep', join(ROOT, 'scenes/t7-capacity.yaml'), '--vary', 'space_charge.weight=1..301:3',
      '--set', 'ions.0.count=80', '--collect', 'space_charge.real_charges,space_charge.frequency_shift_z,space_charge.frequency_shift_r',
      '-o', join(d, 'cap'), '--workers', '2']);
    expect(r.code, r.stderr).toBe(0);
    const lines = readFileSync(join(d, 'cap', 'sweep.csv'), 'utf8').trim().split('\n');
    expect(lines[0]).toBe('space_charge.weight,total,detected,transmission,transmission_low,transmission_high,space_charge.real_charges,space_charge.frequency_shift_z,space_charge.frequency_shift_r');
    const rows = lines.slice(1).map((l) => l.split(',').map(Number));
    expect(rows.map((x) => x[6])).toEqual([80, 80 * 151, 80 * 301]);
    expect(Math.abs(rows[0][7])).toBeLessThan(0.01);
    expect(rows[1][7]).toBeLessThan(rows[0][7] - 0.01);
    expect(rows[2][7]).toBeLessThan(rows[1][7]);
    expect(rows[2][8]).toBeLessThan(rows[1][8]);
    const summary = JSON.parse(readFileSync(join(d, 'cap', 'summary.json'), 'utf8'));
    expect(summary.collected.figures).toHaveLength(3);
    // The renderer draws the curve from the sweep folder.
    const p = iontrail(['plot', join(d, 'cap'), '--kind', 'sweep', '--x', 'space_charge.real_charges', '--y', 'space_charge.frequency_shift_z', '-o', join(d, 'cap.png')]);
    expect(p.code, p.stderr).toBe(0);
    expect(readFileSync(join(d, 'cap.png')).subarray(1, 4).toString()).toBe('PNG');
  });

  it('refuses --collect with --method matrix and a bad path, leaving nothing', () => {
    const d = tempDir();
    const a = iontrail(['sweep', join(ROOT, 'scenes/qf4-peak-scan.yaml'), '--vary', 'mz=500..504:3', '--method', 'matrix', '--collect', 'ions.total', '-o', join(d, 'x')]);
    expect(a.code).toBe(2);
    expect(a.stderr).toMatch(/--collect .* --method matrix/);
    const b = iontrail(['sweep', join(ROOT, 'scenes/qf4-peak-scan.yaml'), '--vary', 'mz=500..504:3', '--collect', 'ions..total', '-o', join(d, 'y')]);
    expect(b.code).toBe(2);
    expect(b.stderr.trim().split('\n')).toHaveLength(1);
    expect(existsSync(join(d, 'x')) || existsSync(join(d, 'y'))).toBe(false);
    const c = iontrail(['plot', join(d), '--kind', 'sweep', '-o', join(d, 'z.png')]);
    expect(c.code).toBe(2);
    expect(c.stderr).toMatch(/not a sweep folder/);
  });
});
