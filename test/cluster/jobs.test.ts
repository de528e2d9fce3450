// `iontrail cluster slurm|kubernetes` job folders without a scheduler: the scripts and manifests
// say what Slurm (sbatch(1): --array, --dependency=afterok, $SLURM_ARRAY_TASK_ID) and Kubernetes
// (batch/v1 Job, completionMode: Indexed, JOB_COMPLETION_INDEX) read, and running each task's
// command by hand with its index set, as the scheduler would, gives the unsharded bytes.

import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { chmodSync, existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse as parseYaml } from 'yaml';
import { Job } from 'kubernetes-models/batch/v1/Job';
import { CLI, iontrail, tempDir } from '../helpers/cli.js';
import { cli, expectSameFolder, shell as sh } from '../shards/compare.js';
import { COAX_OUTER_KEY, coaxScene, filterScene } from '../shards/scenes.js';

const SCENE = filterScene({ name: 'Skerry QF-4 job-folder check', seed: 23, count: 60 });

// An Indexed Job as batch/v1 defines it, checked without a cluster: the manifest against the Job
// schema of kubernetes-models 4.5.1 (generated from the Kubernetes OpenAPI document: field types
// and required fields; it does not refuse unknown fields), then what the Job API documents for
// Indexed mode: completionMode Indexed, completions N, parallelism at most N, restartPolicy Never
// or OnFailure, and JOB_COMPLETION_INDEX from the pod's job-completion-index annotation.
function expectIndexedJob(m: any, n: number): void {
  expect(() => new Job(m).validate(), 'job.yaml against the batch/v1 Job schema').not.toThrow();
  expect([m.apiVersion, m.kind, m.spec.completionMode, m.spec.completions]).toEqual(['batch/v1', 'Job', 'Indexed', n]);
  expect(m.spec.parallelism).toBeGreaterThanOrEqual(1);
  expect(m.spec.parallelism).toBeLessThanOrEqual(n);
  expect(['Never', 'OnFailure']).toContain(m.spec.template.spec.restartPolicy);
  const env = m.spec.template.spec.containers[0].env.find((e: any) => e.name === 'JOB_COMPLETION_INDEX');
  expect(env.valueFrom.fieldRef.fieldPath).toBe("metadata.annotations['batch.kubernetes.io/job-completion-index']");
  // The check can fail: the same manifest with a wrong type or without a container name is refused.
  expect(() => new Job({ ...m, spec: { ...m.spec, completions: String(n) } }).validate()).toThrow(/completions must be integer/);
  const nameless = { ...m.spec.template.spec.containers[0], name: undefined };
  expect(() => new Job({ ...m, spec: { ...m.spec, template: { spec: { ...m.spec.template.spec, containers: [nameless] } } } }).validate()).toThrow(/must have required property name/);
}

const COAX = coaxScene('Skerry C-2 coaxial job check');

function setup() {
  const d = tempDir();
  const scene = join(d, 'scene.yaml');
  writeFileSync(scene, SCENE);
  return { d, scene };
}


describe('iontrail cluster', () => {
  it('slurm: an array script, a merge held by afterok, and their commands give the unsharded bytes', () => {
    const { d, scene } = setup();
    const job = join(d, 'job');
    const out = cli(['cluster', 'slurm', scene, '--shards', '3', '-o', job, '--partition', 'short', '--time', '00:20:00', '--cpus', '2']);
    expect(out).toMatch(/Submit with `sh .*submit\.sh`/);
    const shards = readFileSync(join(job, 'shards.sbatch'), 'utf8');
    for (const line of ['#SBATCH --array=0-2', '#SBATCH --cpus-per-task=2', '#SBATCH --partition=short', '#SBATCH --time=00:20:00']) expect(shards).toContain(line);
    expect(shards).toContain('--shard "${SLURM_ARRAY_TASK_ID}/3"');
    const submit = readFileSync(join(job, 'submit.sh'), 'utf8');
    expect(submit).toMatch(/sbatch --parsable --dependency=afterok:"\$array" .*merge\.sbatch/);
    expect(readFileSync(join(job, 'README.md'), 'utf8')).toMatch(/--dependency=afterok/);
    // As Slurm would: each array task with its id (the #SBATCH lines are comments to bash), then the merge.
    for (let i = 0; i < 3; i++) sh(`bash ${join(job, 'shards.sbatch')}`, { SLURM_ARRAY_TASK_ID: String(i), SLURM_CPUS_PER_TASK: '1' });
    sh(`bash ${join(job, 'merge.sbatch')}`, {});
    const full = join(d, 'full');
    cli(['run', scene, '-o', full]);
    expectSameFolder(full, join(job, 'result'), 'run');
  }, 60_000);

  it('kubernetes: an Indexed Job and a merge Job whose commands give the unsharded sweep', () => {
    const { d, scene } = setup();
    const job = join(d, 'k8s');
    const vary = ['--vary', 'mz=500..504:3'];
    cli(['cluster', 'kubernetes', scene, ...vary, '--shards', '4', '-o', job, '--image', 'registry.example/iontrail:1', '--claim', 'skerry-work']);
    const m = parseYaml(readFileSync(join(job, 'job.yaml'), 'utf8'));
    expectIndexedJob(m, 4);
    const c = m.spec.template.spec.containers[0];
    expect(c.image).toBe('registry.example/iontrail:1');
    expect(m.spec.template.spec.volumes[0].persistentVolumeClaim.claimName).toBe('skerry-work');
    expect(m.spec.template.spec.restartPolicy).toBe('Never');
    const script: string = c.command[2];
    expect(script).toContain('--shard "$JOB_COMPLETION_INDEX/4"');
    const mj = parseYaml(readFileSync(join(job, 'merge-job.yaml'), 'utf8'));
    expect(() => new Job(mj).validate(), 'merge-job.yaml against the batch/v1 Job schema').not.toThrow();
    expect([mj.spec.completions, mj.spec.completionMode]).toEqual([1, undefined]);
    expect(readFileSync(join(job, 'submit-kubernetes.sh'), 'utf8')).toMatch(/kubectl wait --for=condition=complete .*\n.*merge-job\.yaml/);
    // As the cluster would: `iontrail` on PATH in the image, each index, then the merge.
    const bin = join(d, 'bin');
    mkdirSync(bin);
    writeFileSync(join(bin, 'iontrail'), `#!/bin/sh\nexec ${process.execPath} ${CLI} "$@"\n`);
    chmodSync(join(bin, 'iontrail'), 0o755);
    const PATH = `${bin}:${process.env.PATH}`;
    for (let i = 0; i < 4; i++) sh(script, { JOB_COMPLETION_INDEX: String(i), PATH });
    sh(mj.spec.template.spec.containers[0].command[2], { PATH });
    const full = join(d, 'full');
    cli(['sweep', scene, ...vary, '-o', full]);
    expectSameFolder(full, join(job, 'result'), 'sweep');
  }, 60_000);

  it('kubernetes --field: an Indexed Job of the variant solves, no merge Job', () => {
    const { d } = setup();
    const scene = join(d, 'coax.yaml');
    writeFileSync(scene, COAX);
    const job = join(d, 'k8s-field');
    cli(['cluster', 'kubernetes', scene, '--field', '--vary', `${COAX_OUTER_KEY}=3.5mm,4mm,4.5mm`, '--shards', '3', '-o', job]);
    const m = parseYaml(readFileSync(join(job, 'job.yaml'), 'utf8'));
    expectIndexedJob(m, 3);
    expect(m.spec.template.spec.containers[0].command[2]).toMatch(/iontrail field .* --shard "\$JOB_COMPLETION_INDEX\/3" .* -o \S+\/result --force$/);
    expect(existsSync(join(job, 'merge-job.yaml'))).toBe(false);
  });

  it('refuses a bad job before writing anything', () => {
    const { d, scene } = setup();
    const job = join(d, 'bad');
    const cases: [string[], RegExp][] = [
      [['--shards', '3', '--time', '2h'], /--time expects HH:MM:SS or D-HH:MM:SS/],
      [['--shards', '3', '--partition', 'a b'], /--partition expects a partition name/],
      [['--shards', '0'], /--shards expects a whole number of at least 1/],
      [['--shards', '99'], /the run has 8 batches of 8 ions .* give at most 8 shards/],
      [['--shards', '2', '--image', 'x'], /--image and --claim are for kubernetes/],
    ];
    for (const [extra, msg] of cases) {
      const r = iontrail(['cluster', 'slurm', scene, '-o', job, ...extra]);
      expect(r.code, extra.join(' ')).toBe(2);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(msg);
      expect(existsSync(job)).toBe(false);
    }
    // --submit where no sbatch is on PATH: refused before the folder is written.
    const r = spawnSync(process.execPath, [CLI, 'cluster', 'slurm', scene, '--shards', '2', '-o', job, '--submit'], { encoding: 'utf8', env: { ...process.env, PATH: '/nonexistent' } });
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/--submit needs sbatch on PATH/);
    expect(existsSync(job)).toBe(false);
  });
});
