// A real scheduler: a single-node Slurm (Debian slurm-wlm and munge, started by .ci/slurm-local.sh)
// runs `iontrail cluster slurm --submit`: a job array of 4 shards and the merge held by
// --dependency=afterok; the merged folder must be the unsharded run's bytes. .ci/run starts the
// daemons and passes IONTRAIL_SLURM_CONF; run alone as root, this file installs and starts them
// itself and stops them after. Where that cannot be done (not root, no packages) the test is
// skipped and its name says why.

import { afterAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT, tempDir } from '../helpers/cli.js';
import { cli, expectSameFolder } from '../shards/compare.js';
import { filterScene } from '../shards/scenes.js';

const HELPER = join(ROOT, '.ci/slurm-local.sh');

const SCENE = filterScene({ name: 'Skerry QF-4 cluster check', seed: 19, count: 1100, length: '60 mm', drift: true, angleSpread: true, maxTime: '40 us', recordEvery: 200 });

interface Slurm { conf: string | null; reason: string; ownDir: string | null; setupS: number }

function firstLine(r: { stderr: string; stdout: string }): string {
  return (r.stderr || r.stdout).trim().split('\n').pop() ?? '';
}

/** The Slurm to use: the one .ci/run started, or one of our own (installed if need be). */
function bringUp(): Slurm {
  const t0 = performance.now();
  const given = process.env.IONTRAIL_SLURM_CONF;
  if (given) {
    const ping = spawnSync('scontrol', ['ping'], { env: { ...process.env, SLURM_CONF: given }, encoding: 'utf8' });
    if (ping.status === 0) return { conf: given, reason: '', ownDir: null, setupS: 0 };
  }
  if (process.getuid?.() !== 0) return { conf: null, reason: 'not root: cannot install or start slurmctld, slurmd and munged', ownDir: null, setupS: 0 };
  const inst = spawnSync('bash', [HELPER, 'install'], { encoding: 'utf8', timeout: 600_000 });
  if (inst.status !== 0) return { conf: null, reason: `cannot install slurm-wlm and munge (${firstLine(inst) || `exit ${inst.status}`})`, ownDir: null, setupS: 0 };
  const dir = tempDir('iontrail-slurm-');
  const start = spawnSync('bash', [HELPER, 'start', dir], { encoding: 'utf8', timeout: 120_000 });
  if (start.status !== 0) {
    spawnSync('bash', [HELPER, 'stop', dir]);
    return { conf: null, reason: `Slurm did not start (${firstLine(start)})`, ownDir: null, setupS: 0 };
  }
  return { conf: join(dir, 'slurm.conf'), reason: '', ownDir: dir, setupS: (performance.now() - t0) / 1000 };
}

const slurm = bringUp();
afterAll(() => {
  if (slurm.ownDir) spawnSync('bash', [HELPER, 'stop', slurm.ownDir]);
});

function withSlurm(cmd: string, args: string[]) {
  return spawnSync(cmd, args, { cwd: ROOT, encoding: 'utf8', env: { ...process.env, SLURM_CONF: slurm.conf! } });
}

describe('Slurm job array of shards, merged by a dependent job', () => {
  const name = 'a 4-shard job array and its afterok merge give the unsharded run\'s bytes';
  if (slurm.conf === null) {
    it.skip(`${name} (skipped: ${slurm.reason})`, () => {});
    return;
  }
  it(name, async () => {
    const d = tempDir();
    const scene = join(d, 'scene.yaml');
    writeFileSync(scene, SCENE);
    const job = join(d, 'job');
    const t0 = performance.now();
    const sub = withSlurm(process.execPath, [join(ROOT, 'cli/iontrail.js'), 'cluster', 'slurm', scene, '--shards', '4', '-o', job, '--time', '00:05:00', '--cpus', '1', '--submit']);
    expect(sub.status, sub.stderr).toBe(0);
    const ids = /array job (\d+), merge job (\d+)/.exec(sub.stdout);
    expect(ids, sub.stdout).not.toBeNull();
    const [array, merge] = [ids![1], ids![2]];
    // Wait for both jobs to leave the queue (the merge starts only after every task succeeded).
    const deadline = Date.now() + 180_000;
    while (Date.now() < deadline) {
      const q = withSlurm('squeue', ['-h', '-j', `${array},${merge}`, '-o', '%i %T']);
      if (q.status === 0 && q.stdout.trim() === '') break;
      await new Promise((r) => setTimeout(r, 250));
    }
    const wallS = (performance.now() - t0) / 1000;
    // Every array task and the merge ended COMPLETED (scontrol keeps finished jobs for MinJobAge).
    const show = withSlurm('scontrol', ['show', 'job', array]).stdout + withSlurm('scontrol', ['show', 'job', merge]).stdout;
    const states = [...show.matchAll(/JobState=(\w+)/g)].map((m) => m[1]);
    expect(states, show).toEqual(['COMPLETED', 'COMPLETED', 'COMPLETED', 'COMPLETED', 'COMPLETED']);
    // afterok held the merge: it started no earlier than the last array task ended (1 s clock).
    const time = (job: string, key: string) => [...withSlurm('scontrol', ['show', 'job', job]).stdout.matchAll(new RegExp(`${key}=(\\S+)`, 'g'))].map((m) => Date.parse(`${m[1]}Z`));
    const lastEnd = Math.max(...time(array, 'EndTime'));
    expect(time(merge, 'StartTime')[0]).toBeGreaterThanOrEqual(lastEnd);
    for (let i = 0; i < 4; i++) expect(existsSync(join(job, 'parts', `part-${i}`, 'shard.json')), `part ${i}`).toBe(true);
    expect(readFileSync(join(job, 'logs', 'merge.out'), 'utf8')).toMatch(/merged 4 parts/);
    const full = join(d, 'full');
    cli(['run', scene, '-o', full]);
    expectSameFolder(full, join(job, 'result'), 'run');
    process.stderr.write(`slurm: set-up ${slurm.setupS.toFixed(1)} s, 4-task array and merge ${wallS.toFixed(1)} s\n`);
  }, 240_000);
});
