// Ctrl-C stops a coupled (space-charge) run where it is: the ions still in flight kept as alive at
// the time reached, the folder complete and marked incomplete, exit 130 (128 + SIGINT, the POSIX
// shell's exit status of a process the signal stopped; common practice).

import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { iontrailAsync, tempDir } from '../helpers/cli.js';

const LONG = `
name: Skerry LT-1 long packet
stages:
  - { type: accelerate, length: 10 mm, voltage: 20 kV }
  - { type: drift, length: 1 m, aperture: 20 mm }
space_charge: { method: direct, weight: 10 }
ions:
  - { mz: 1000, count: 1500, position: { z: 1 mm, spread: 0.2 mm, spread_z: 0.2 mm }, energy: 0.1 eV }
run: { max_time: 40 us, step_without_rf: 0.2 ns, record_every: 0 }
`;

describe('SIGINT in a coupled run', () => {
  it('keeps what finished, says it is incomplete, exit 130', async () => {
    const d = tempDir();
    writeFileSync(join(d, 's.yaml'), LONG);
    const out = join(d, 'out');
    const child = iontrailAsync(['run', join(d, 's.yaml'), '-o', out, '--workers', '1']);
    let stderr = '';
    child.stderr!.on('data', (x) => { stderr += x; });
    const exited = new Promise<number | null>((r) => child.on('exit', (c) => r(c)));
    const t0 = Date.now();
    while (!/estimate:/.test(stderr) && Date.now() - t0 < 60_000) await new Promise((r) => setTimeout(r, 50));
    await new Promise((r) => setTimeout(r, 2000));
    child.kill('SIGINT');
    expect(await exited, stderr).toBe(130);
    const s = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(s.complete).toBe(false);
    expect(s.warnings.join(' ')).toMatch(/interrupted \(SIGINT\): the coupled run stopped at t = .* µs of max_time 40 µs/);
    expect(s.ions.total).toBe(1500);
    expect(s.ions.alive).toBeGreaterThan(0);
  }, 120_000);
});
