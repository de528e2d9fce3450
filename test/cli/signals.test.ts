// SIGTERM (kill, batch schedulers, container runtimes) stops a run the way Ctrl-C does: the
// finished batches kept in a complete folder marked incomplete, no temporary folder left. The
// exit code is 128 + the signal number, as a shell reports a process the signal killed (POSIX
// shell "Exit Status", common practice): 143 for SIGTERM, 130 for SIGINT (the SIGINT run case is
// test/engine/run-folder-cli.test.ts, the SIGINT report case test/report/bundle.test.ts).

import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { ChildProcess } from 'node:child_process';
import { iontrailAsync, tempDir } from '../helpers/cli.js';
import { expectInterruptedRun } from '../helpers/interrupted.js';

const dirs: string[] = [];
const temp = () => { const d = tempDir('iontrail-signals-'); dirs.push(d); return d; };
afterAll(() => { for (const d of dirs) rmSync(d, { recursive: true, force: true }); });

const FILTER = `
name: Skerry QF-4 long run
stages:
  - type: quadrupole
    length: 150 mm
    r0: 4 mm
    rf: { amplitude: 832 V, frequency: 1.2 MHz }
    dc: 138.3 V
ions:
  - { mz: 502, count: 400000, position: { spread: 0.3 mm }, energy: 5 eV }
run: { steps_per_cycle: 40, max_time: 300 us, record_every: 0 }
`;

/** Start the command, wait until it has been running `ms` after its estimate line, send `signal`. */
async function stopAfter(child: ChildProcess, signal: NodeJS.Signals, ms: number, ready: (stderr: string) => boolean = (e) => /estimate:/.test(e)) {
  let stderr = '', stdout = '';
  child.stderr!.on('data', (d) => { stderr += d; });
  child.stdout!.on('data', (d) => { stdout += d; });
  // Listen for the exit from the start: a child that ends before the signal must fail the test
  // with its output, not leave it waiting for an exit that has already happened.
  let ended = false;
  const exited = new Promise<number | null>((r) => child.on('exit', (c) => { ended = true; r(c); }));
  const t0 = Date.now();
  while (!ready(stderr) && !ended && Date.now() - t0 < 60_000) await new Promise((r) => setTimeout(r, 50));
  await new Promise((r) => setTimeout(r, ms));
  if (ended) throw new Error(`the command ended before ${signal} was sent (exit ${await exited}): ${stderr}`);
  child.kill(signal);
  const code = await exited;
  return { code, stderr, stdout };
}

describe('SIGTERM', () => {
  it('iontrail run: exit 143, the finished batches in a complete folder marked incomplete, no .partial-*', async () => {
    const d = temp();
    writeFileSync(join(d, 's.yaml'), FILTER);
    const out = join(d, 'out');
    const r = await stopAfter(iontrailAsync(['run', join(d, 's.yaml'), '-o', out, '--workers', '2']), 'SIGTERM', 1500);
    expect(r.code, r.stderr).toBe(143);
    expect(readdirSync(d).sort()).toEqual(['out', 's.yaml']);
    expectInterruptedRun(out, 400_000, /interrupted \(SIGTERM\)/);
    expect(r.stdout).toMatch(/INCOMPLETE: interrupted/);
  }, 120_000);

  it('iontrail sweep: keeps the points finished, summary incomplete, says so, exit 143', async () => {
    const d = temp();
    writeFileSync(join(d, 's.yaml'), FILTER.replace('count: 400000', 'count: 2000'));
    const out = join(d, 'out');
    // Direct integration: 2000 ions a point, tens of points a second; 4000 points take minutes.
    const child = iontrailAsync(['sweep', join(d, 's.yaml'), '--vary', 'mz=495..510:4000', '--method', 'direct', '--workers', '2', '-o', out]);
    // No estimate line without --collect: wait a fixed time after start instead.
    const r = await stopAfter(child, 'SIGTERM', 3000, () => true);
    expect(r.code, r.stderr).toBe(143);
    expect(readdirSync(d).sort()).toEqual(['out', 's.yaml']);
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.complete).toBe(false);
    const rows = readFileSync(join(out, 'sweep.csv'), 'utf8').trim().split('\n').slice(1);
    expect(rows.length).toBeGreaterThan(0);
    expect(rows.length).toBeLessThan(4000);
    expect(summary.sweep.points).toBe(rows.length);
    // The rows are the first points of the grid, in order (mz = 495 + 15·k/3999).
    rows.forEach((row, k) => expect(Number(row.split(',')[0])).toBeCloseTo(495 + (15 * k) / 3999, 6));
    expect(summary.peak).toBeNull();
    expect(r.stderr).toMatch(/warning: interrupted \(SIGTERM\): \d+ of 4000 points finished/);
    expect(r.stdout).toMatch(/INCOMPLETE: interrupted/);
  }, 120_000);

  it('iontrail report: exit 143, nothing written', async () => {
    const d = temp();
    const out = join(d, 'out');
    const child = iontrailAsync(['report', 'scenes/t7-trap-cooling.yaml', '-o', out, '--workers', '1', '--set', 'run.max_time=20ms']);
    const r = await stopAfter(child, 'SIGTERM', 1500);
    expect(r.code, r.stderr).toBe(143);
    expect(r.stderr).toMatch(/interrupted; nothing written/);
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(d)).toEqual([]);
  }, 120_000);
});
