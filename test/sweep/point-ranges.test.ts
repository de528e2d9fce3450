// A sweep cut into point ranges gives the same points and figures as the whole sweep run at once:
// plan → run a range → reduce, the shape a sharded run needs (determinism by construction: every
// ion's draws are keyed by (seed, ion), no outside source needed).
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { planSweep, reduceSweep, runPointRange, runSweep, type SweepRequest } from '../../sim/sweeps/sweep.js';
import { ROOT } from '../helpers/cli.js';

const file = join(ROOT, 'scenes/qf4-peak-scan.yaml');
const req: SweepRequest = {
  sceneText: readFileSync(file, 'utf8'), sceneFile: 'scenes/qf4-peak-scan.yaml', set: ['ions.0.count=400'],
  vary: ['mz=496..508:13'], scanLines: '0.160..0.166:3', method: 'matrix', workers: 1,
};
const strip = (r: Record<string, unknown>) => ({ ...r, wallSeconds: 0, startedAt: '' });

describe('sweep point ranges', () => {
  it('reduce to the bytes of the whole sweep, however the points are cut', async () => {
    const whole = await runSweep(req);
    const plan = planSweep(req);
    expect(plan.tasks.length).toBe(13 * (1 + 3));
    const cuts = [0, 5, 13, 30, plan.tasks.length];
    const parts = [];
    for (let k = 0; k + 1 < cuts.length; k++) parts.push(...await runPointRange(plan, cuts[k], cuts[k + 1]));
    const cut = reduceSweep(plan, parts);
    expect(JSON.stringify(strip(cut as unknown as Record<string, unknown>))).toBe(JSON.stringify(strip(whole as unknown as Record<string, unknown>)));
    expect(whole.scanLines?.lines.length).toBe(3);
    expect(whole.points.some((p) => p.detected > 0)).toBe(true);
  });
  it('refuses to reduce a sweep with points missing', async () => {
    const plan = planSweep(req);
    const some = await runPointRange(plan, 0, 4);
    expect(() => reduceSweep(plan, some)).toThrow(/a sweep of 52 points got 4/);
  });
});
