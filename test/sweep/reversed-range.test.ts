// A reversed --vary range (B below A) is refused, through the CLI as a user meets it: before the
// fix, `--vary mz=514..490:10` ran and reported FWHM −5.15 (widths are high − low crossings).
// The rule is the project's own (documented in `sweep --help` and the README): exit 2, one line
// that gives the range the right way round, no sweep folder written.

import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';
import { peakFigures } from '../../sim/analysis/peak.js';

const tmp = tempDir('iontrail-reversed-');
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

describe('sweep --vary with a reversed range', () => {
  it('m/z 514..490 is refused with exit 2, the ascending form named, nothing written', () => {
    const out = join(tmp, 'mz');
    const r = iontrail(['sweep', 'scenes/qf4-peak-scan.yaml', '--vary', 'mz=514..490:10', '-o', out]);
    expect(r.code).toBe(2);
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toContain('mz=490..514:10');
    expect(existsSync(out)).toBe(false);
  });

  it('a scene key with units (DC 105 V..95 V) is refused the same way', () => {
    const out = join(tmp, 'dc');
    const r = iontrail(['sweep', 'scenes/qf4-peak-scan.yaml', '--vary', 'mz=496..508:5', '--vary', 'stages.0.dc=105V..95V:3', '-o', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('stages.0.dc=95V..105V:3');
    expect(existsSync(out)).toBe(false);
  });

  it('a range of one value (A = B) is refused', () => {
    const r = iontrail(['sweep', 'scenes/qf4-peak-scan.yaml', '--vary', 'mz=502..502:5', '-o', join(tmp, 'same')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/A below B/);
  });

  it('sweep --help says so', () => {
    const r = iontrail(['sweep', '--help']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/A below B/);
    expect(r.stdout).toContain('refused');
  });

  it('the ascending range gives a positive FWHM around m/z 502 (the QF-4 window, `iontrail check`: 499.1–504.5)', () => {
    const r = iontrail(['sweep', 'scenes/qf4-peak-scan.yaml', '--vary', 'mz=490..514:49', '-o', join(tmp, 'up'), '--json', '--set', 'ions.0.count=300']);
    expect(r.code).toBe(0);
    const peak = JSON.parse(r.stdout).peak;
    expect(peak.fwhm_mz).toBeGreaterThan(0);
    // The Mathieu window at this U/V is 5.4 wide; a sampled transmission peak is at most that wide.
    expect(peak.fwhm_mz).toBeLessThan(5.4 + 2 * 0.5);
    expect(peak.mz).toBeGreaterThan(499.1);
    expect(peak.mz).toBeLessThan(504.5);
  });

  it('peakFigures itself refuses a falling x rather than returning a negative width', () => {
    expect(() => peakFigures([3, 2, 1], [0, 1, 0])).toThrow(/increase/);
  });
});
