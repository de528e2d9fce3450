// The README's space-charge packet (in its list of limitations) does what its text says: run with
// its weight of 1000 the arrival spread is about 2 % wider than tracked without space charge and the
// mean about 60 ps later; with weight 1 both vanish. Read from README.md, never copied here.

import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT, iontrail, tempDir } from '../helpers/cli.js';

const README = readFileSync(join(ROOT, 'README.md'), 'utf8');

function packet(): string {
  const m = /^( *)```yaml\n([\s\S]*?)^\1```/m.exec(README.slice(README.indexOf('A TOF packet:')));
  if (!m) throw new Error('README: no space-charge packet after "A TOF packet:"');
  return m[2].split('\n').map((l) => l.slice(m[1].length)).join('\n');
}

describe('README.md space-charge packet', () => {
  it('widens the arrival spread by about 2 % and delays it by tens of ps; weight 1 changes nothing', () => {
    const text = packet();
    expect(text).toMatch(/space_charge:/);
    const d = tempDir();
    const f = join(d, 'packet.yaml');
    writeFileSync(f, text);
    const get = (extra: string[], out: string) => {
      const r = iontrail(['run', f, '-o', join(d, out), '--json', ...extra]);
      expect(r.code, r.stderr).toBe(0);
      return JSON.parse(r.stdout).space_charge.arrivals[0];
    };
    const a = get([], 'w1000');
    // "about 1.02" and "about 60 ps": measured 1.0205 and 59.6 ps.
    expect(a.arrival_rms_ratio).toBeGreaterThan(1.01);
    expect(a.arrival_rms_ratio).toBeLessThan(1.04);
    expect(a.arrival_shift_s).toBeGreaterThan(30e-12);
    expect(a.arrival_shift_s).toBeLessThan(120e-12);
    const b = get(['--set', 'space_charge.weight=1'], 'w1');
    expect(Math.abs(b.arrival_rms_ratio - 1)).toBeLessThan(1e-3);
    expect(Math.abs(b.arrival_shift_s)).toBeLessThan(1e-12);
  }, 120_000);
});
