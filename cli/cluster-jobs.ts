// Job folders for a cluster's own scheduler: a Slurm job array (one task per shard,
// $SLURM_ARRAY_TASK_ID → --shard) with a merge job held by --dependency=afterok, or a Kubernetes
// Indexed Job (JOB_COMPLETION_INDEX → --shard) with its merge Job. Field solves of geometry
// variants need no merge: every task writes its own variant folders into JOB_DIR/result
// (cli/field-variants.ts). Only text is written here; the scheduler runs the shards and the merge
// with the iontrail that wrote the folder.

import { stringify as yamlStringify } from 'yaml';

export interface ClusterJob {
  /** Job name (letters, digits, '-'), from the scene file's name. */
  name: string;
  /** 'run', 'sweep' or 'field' (geometry variants) and their arguments, scene file first (absolute paths). */
  command: 'run' | 'sweep' | 'field';
  args: string[];
  shards: number;
  /** Absolute job folder; parts go to JOB_DIR/parts/part-I, the merge to JOB_DIR/result. */
  dir: string;
  /** The command that starts iontrail on a node (node and the absolute path of cli/iontrail.js). */
  iontrail: string[];
  /** Folder the tasks run in (the scene file's relative paths, if any, resolve from it). */
  workdir: string;
  cpus: number;
}

/** POSIX shell single quotes. */
export function shellQuote(s: string): string {
  return /^[A-Za-z0-9_@%+=:,./-]+$/.test(s) ? s : `'${s.replace(/'/g, `'\\''`)}'`;
}

const q = (xs: string[]) => xs.map(shellQuote).join(' ');

export function partDir(job: ClusterJob, index: string): string {
  return `${job.dir}/parts/part-${index}`;
}

/** Runs and sweeps write parts and merge them; variant solves write their folders in place. */
function merges(job: ClusterJob): boolean {
  return job.command !== 'field';
}

/** Where task INDEX (a shell word) writes. */
function taskOut(job: ClusterJob, index: string): string {
  return merges(job) ? `${shellQuote(`${job.dir}/parts`)}/part-${index}` : shellQuote(`${job.dir}/result`);
}

function mergeArgs(job: ClusterJob, parts: string[]): string[] {
  return [...job.iontrail, 'merge', ...parts, '-o', `${job.dir}/result`, '--force'];
}

export interface SlurmOptions { partition?: string; time?: string }

/** shards.sbatch, merge.sbatch and submit.sh. */
export function slurmFiles(job: ClusterJob, o: SlurmOptions): Record<string, string> {
  const head = (name: string, extra: string[]) => [
    '#!/bin/bash',
    `#SBATCH --job-name=${name}`,
    ...extra,
    ...(o.partition ? [`#SBATCH --partition=${o.partition}`] : []),
    ...(o.time ? [`#SBATCH --time=${o.time}`] : []),
    'set -euo pipefail',
    `cd ${shellQuote(job.workdir)}`,
  ];
  const shard = [
    ...head(`${job.name}-shards`, [
      `#SBATCH --array=0-${job.shards - 1}`,
      '#SBATCH --ntasks=1',
      `#SBATCH --cpus-per-task=${job.cpus}`,
      `#SBATCH --output=${job.dir}/logs/shard-%a.out`,
    ]),
    merges(job)
      ? '# One array task per shard: task I writes part I of N (--force: a requeued task replaces its part).'
      : '# One array task per shard: task I solves its variants into result/ (--force: a requeued task replaces them).',
    `exec ${q([...job.iontrail, job.command, ...job.args])} --shard "\${SLURM_ARRAY_TASK_ID}/${job.shards}" --workers "\${SLURM_CPUS_PER_TASK:-${job.cpus}}" -o ${taskOut(job, '"${SLURM_ARRAY_TASK_ID}"')} --force`,
  ];
  if (!merges(job)) {
    const submit = [
      '#!/bin/sh',
      '# Submit the shard array; each task writes its variant folders into the result folder.',
      'set -eu',
      `mkdir -p ${shellQuote(`${job.dir}/logs`)} ${shellQuote(`${job.dir}/result`)}`,
      `array=$(sbatch --parsable ${shellQuote(`${job.dir}/shards.sbatch`)} | cut -d';' -f1)`,
      'echo "array job $array"',
    ];
    return {
      'shards.sbatch': shard.join('\n') + '\n',
      'submit.sh': submit.join('\n') + '\n',
      'README.md': `Submit with \`sh ${job.dir}/submit.sh\`: it runs \`sbatch\` on shards.sbatch (a job array of ${job.shards} tasks, each solving its slice of the geometry variants); the variant folders appear in ${job.dir}/result as one machine writes them (no merge step), logs in ${job.dir}/logs.\n`,
    };
  }
  const parts = Array.from({ length: job.shards }, (_, i) => partDir(job, String(i)));
  const merge = [
    ...head(`${job.name}-merge`, ['#SBATCH --ntasks=1', '#SBATCH --cpus-per-task=1', `#SBATCH --output=${job.dir}/logs/merge.out`]),
    '# Runs once every array task has ended well (submit.sh holds it with --dependency=afterok).',
    `exec ${q(mergeArgs(job, parts))}`,
  ];
  const submit = [
    '#!/bin/sh',
    '# Submit the shard array, then the merge, which waits for every task of the array to succeed.',
    'set -eu',
    `mkdir -p ${shellQuote(`${job.dir}/logs`)} ${shellQuote(`${job.dir}/parts`)}`,
    `array=$(sbatch --parsable ${shellQuote(`${job.dir}/shards.sbatch`)} | cut -d';' -f1)`,
    `merge=$(sbatch --parsable --dependency=afterok:"$array" ${shellQuote(`${job.dir}/merge.sbatch`)} | cut -d';' -f1)`,
    'echo "array job $array, merge job $merge"',
  ];
  return {
    'shards.sbatch': shard.join('\n') + '\n',
    'merge.sbatch': merge.join('\n') + '\n',
    'submit.sh': submit.join('\n') + '\n',
    'README.md': `Submit with \`sh ${job.dir}/submit.sh\`: it runs \`sbatch\` on shards.sbatch (a job array of ${job.shards} tasks, one per shard) and then on merge.sbatch with \`--dependency=afterok\` on the array; the merged folder appears at ${job.dir}/result, logs in ${job.dir}/logs.\n`,
  };
}

export interface KubernetesOptions { image: string; claim: string }

/** job.yaml (an Indexed Job), merge-job.yaml and submit-kubernetes.sh. */
export function kubernetesFiles(job: ClusterJob, o: KubernetesOptions): Record<string, string> {
  const volume = { volumes: [{ name: 'work', persistentVolumeClaim: { claimName: o.claim } }] };
  const mount = [{ name: 'work', mountPath: job.workdir }];
  const container = (name: string, script: string, cpus: number, env: object[] = []) => ({
    name, image: o.image, workingDir: job.workdir, command: ['/bin/sh', '-c', script],
    ...(env.length > 0 ? { env } : {}),
    resources: { requests: { cpu: String(cpus) }, limits: { cpu: String(cpus) } }, volumeMounts: mount,
  });
  // The Job controller sets JOB_COMPLETION_INDEX itself in Indexed mode; it is also given from the
  // pod's completion-index annotation through the downward API, so the manifest says where the
  // index comes from (Kubernetes documentation, "Indexed Job for Parallel Processing with Static
  // Work Assignment"; from memory, not checked against a cluster here).
  const indexEnv = [{ name: 'JOB_COMPLETION_INDEX', valueFrom: { fieldRef: { fieldPath: "metadata.annotations['batch.kubernetes.io/job-completion-index']" } } }];
  const shardScript = `exec ${q([...job.iontrail, job.command, ...job.args])} --shard "$JOB_COMPLETION_INDEX/${job.shards}" --workers ${job.cpus} -o ${taskOut(job, '"$JOB_COMPLETION_INDEX"')} --force`;
  const shards = {
    apiVersion: 'batch/v1', kind: 'Job',
    metadata: { name: `${job.name}-shards` },
    spec: {
      completions: job.shards, parallelism: job.shards, completionMode: 'Indexed', backoffLimit: 3 * job.shards,
      template: { spec: { restartPolicy: 'Never', containers: [container('shard', shardScript, job.cpus, indexEnv)], ...volume } },
    },
  };
  if (!merges(job)) {
    const submit = ['#!/bin/sh', '# The variant solves as one Indexed Job; each index writes its variant folders into the result folder.', 'set -eu',
      `kubectl apply -f ${shellQuote(`${job.dir}/job.yaml`)}`, `kubectl wait --for=condition=complete --timeout=-1s job/${job.name}-shards`];
    return {
      'job.yaml': yamlStringify(shards, { lineWidth: 0 }),
      'submit-kubernetes.sh': submit.join('\n') + '\n',
      'README.md': `Submit with \`sh ${job.dir}/submit-kubernetes.sh\`: it applies job.yaml (an Indexed Job of ${job.shards} completions, JOB_COMPLETION_INDEX → --shard, each solving its slice of the geometry variants into ${job.dir}/result; no merge step) and waits for it to complete; the claim ${o.claim} must hold ${job.workdir} at the same path and the image ${o.image} must run iontrail.\n`,
    };
  }
  const parts = Array.from({ length: job.shards }, (_, i) => partDir(job, String(i)));
  const merge = {
    apiVersion: 'batch/v1', kind: 'Job',
    metadata: { name: `${job.name}-merge` },
    spec: { completions: 1, backoffLimit: 2, template: { spec: { restartPolicy: 'Never', containers: [container('merge', `exec ${q(mergeArgs(job, parts))}`, 1)], ...volume } } },
  };
  const submit = [
    '#!/bin/sh',
    '# The shards as one Indexed Job; the merge Job once every index has completed.',
    'set -eu',
    `kubectl apply -f ${shellQuote(`${job.dir}/job.yaml`)}`,
    `kubectl wait --for=condition=complete --timeout=-1s job/${job.name}-shards`,
    `kubectl apply -f ${shellQuote(`${job.dir}/merge-job.yaml`)}`,
  ];
  return {
    'job.yaml': yamlStringify(shards, { lineWidth: 0 }),
    'merge-job.yaml': yamlStringify(merge, { lineWidth: 0 }),
    'submit-kubernetes.sh': submit.join('\n') + '\n',
    'README.md': `Submit with \`sh ${job.dir}/submit-kubernetes.sh\`: it applies job.yaml (an Indexed Job of ${job.shards} completions, JOB_COMPLETION_INDEX → --shard), waits for it to complete and applies merge-job.yaml; the claim ${o.claim} must hold ${job.workdir} at the same path and the image ${o.image} must run iontrail.\n`,
  };
}
