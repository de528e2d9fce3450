// iontrail cluster slurm|kubernetes SCENE [run or sweep options] --shards N -o JOB_DIR
//   [--partition P --time HH:MM:SS --cpus C] [--submit] | [--image I --claim PVC]

import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs, flag, type FlagSpec } from '../args.js';
import { UsageError } from '../errors.js';
import { parseCount } from './run.js';
import { loadSceneFile } from '../../sim/scene/load.js';
import { SceneError } from '../../sim/scene/schema.js';
import { planBatches } from '../../sim/engine/batches.js';
import { fieldProblemOf } from '../../sim/stages/registry.js';
import { sliceRange } from '../../sim/runs/shard.js';
import { planSweep, type SweepMethod } from '../../sim/sweeps/sweep.js';
import { parseVariantAxis, planVariants, variantsOf } from '../../sim/sweeps/field-variants.js';
import { folderBeside, swapFolderIntoPlace } from '../../sim/core/atomic.js';
import { TOOL_VERSION } from '../../sim/version.js';
import { kubernetesFiles, slurmFiles, type ClusterJob } from '../cluster-jobs.js';

export const describe = 'write (and submit) a Slurm job array or a Kubernetes Indexed Job that runs a scene in shards and merges them';

const USAGE = 'usage: iontrail cluster slurm|kubernetes SCENE.yaml --shards N -o JOB_DIR [--vary KEY=A..B:N]... [--set key=value]... [--seed N] '
  + '[--method M] [--scan-lines A..B:N] [--collect PATH,...] [--max-output SIZE] [--field [--stage N]] [--cpus C] [--partition P] [--time HH:MM:SS] [--submit] [--image IMAGE] [--claim PVC] [--force]';

const HELP = `${USAGE}

Writes JOB_DIR for the cluster's own scheduler: N shards of \`iontrail run\` (or of \`iontrail sweep\`
when --vary is given), each a part folder JOB_DIR/parts/part-I, and a merge into JOB_DIR/result
(the bytes one machine would write). With --field, N shards of \`iontrail field --vary\`: each task
solves its slice of the geometry variants into JOB_DIR/result (variant-K folders, no merge step).
The job is checked here first (scene, sweep, N against the batches, points or variants), so a bad
job is refused before it reaches the queue.

slurm:       shards.sbatch (a job array, one task per shard, $SLURM_ARRAY_TASK_ID → --shard),
             merge.sbatch (held by --dependency=afterok on the array), submit.sh, README.md
kubernetes:  job.yaml (an Indexed Job, JOB_COMPLETION_INDEX → --shard), merge-job.yaml,
             submit-kubernetes.sh (applies the job, waits for completion, applies the merge), README.md

  --shards N           number of shards (array tasks or completions)
  -o, --out JOB_DIR    job folder; its parent must exist
  --cpus C             CPUs per shard, given to --workers (default 1)
  --partition P        Slurm partition (default: the cluster's)
  --time HH:MM:SS      Slurm time limit per task (also D-HH:MM:SS)
  --submit             Slurm: run submit.sh now (needs sbatch on PATH)
  --image IMAGE        Kubernetes: container image that runs iontrail (default iontrail:${TOOL_VERSION})
  --claim PVC          Kubernetes: persistent volume claim mounted at this folder's path (default iontrail-work)
  --force              replace an existing JOB_DIR
  --field              field solves of the --vary geometry variants (KEY=a,b,c or KEY=A..B:N)
  --stage N            with --field: the electrodes stage to solve
  --vary, --set, --seed, --method, --scan-lines, --collect, --max-output   as for run and sweep
  -h, --help           this text
`;

export const FLAGS: FlagSpec = {
  values: ['out', 'shards', 'cpus', 'partition', 'time', 'image', 'claim', 'vary', 'set', 'seed', 'method', 'scan-lines', 'collect', 'max-output', 'stage'],
  switches: ['submit', 'force', 'help', 'field'],
  repeatable: ['set', 'vary'],
  aliases: { o: 'out', h: 'help' },
};

const CLI = resolve(dirname(fileURLToPath(import.meta.url)), '../../../cli/iontrail.js');

export async function run(argv: string[]): Promise<number> {
  const a = parseArgs(argv, FLAGS, 'cluster');
  if (a.switches.has('help')) { process.stdout.write(HELP); return 0; }
  const [target, sceneArg, ...rest] = a.positional;
  if (target !== 'slurm' && target !== 'kubernetes') throw new UsageError(`cluster: give slurm or kubernetes, then the scene file (${USAGE})`);
  if (sceneArg === undefined || rest.length > 0) throw new UsageError(`cluster: give one scene file (${USAGE})`);
  const out = flag(a, 'out');
  if (!out) throw new UsageError('cluster: missing -o JOB_DIR (the job folder to write)');
  const shards = parseCount(flag(a, 'shards'), '--shards', 1);
  if (shards === undefined) throw new UsageError('cluster: missing --shards N (the number of array tasks)');
  const cpus = parseCount(flag(a, 'cpus'), '--cpus', 1) ?? 1;
  const partition = flag(a, 'partition');
  if (partition !== undefined && !/^[A-Za-z0-9_.-]+$/.test(partition)) throw new UsageError(`cluster: --partition expects a partition name (letters, digits, _ . -), got '${partition}'`);
  const time = flag(a, 'time');
  if (time !== undefined && !/^(\d+-)?\d{1,3}:[0-5]\d:[0-5]\d$/.test(time)) throw new UsageError(`cluster: --time expects HH:MM:SS or D-HH:MM:SS (for example 02:00:00), got '${time}'`);
  if (target === 'kubernetes' && (partition || time || a.switches.has('submit'))) throw new UsageError('cluster kubernetes: --partition, --time and --submit are for slurm');
  if (target === 'slurm' && (flag(a, 'image') || flag(a, 'claim'))) throw new UsageError('cluster slurm: --image and --claim are for kubernetes');
  const submit = a.switches.has('submit');
  if (submit && spawnSync('sh', ['-c', 'command -v sbatch'], { encoding: 'utf8' }).status !== 0) {
    throw new UsageError('cluster: --submit needs sbatch on PATH (none found); write the job without --submit and submit it where sbatch runs');
  }
  const force = a.switches.has('force');
  const dir = resolve(out);
  if (!existsSync(dirname(dir)) || !statSync(dirname(dir)).isDirectory()) throw new UsageError(`cluster: ${out}: parent folder ${dirname(dir)} does not exist`);
  if (existsSync(dir) && !force) throw new UsageError(`cluster: ${out}: already exists (give --force to replace it)`);

  const scene = resolve(sceneArg);
  const set = a.values.get('set') ?? [];
  const seed = flag(a, 'seed');
  const vary = a.values.get('vary') ?? [];
  const field = a.switches.has('field');
  if (field) {
    const other = ['set', 'seed', 'method', 'scan-lines', 'collect', 'max-output'].find((k) => a.values.has(k));
    if (other) throw new UsageError(`cluster: --${other} is not an option of field solves (--field takes --vary and --stage)`);
    if (vary.length === 0) throw new UsageError('cluster: --field needs --vary KEY=a,b,c (the geometry variants the tasks solve)');
  } else if (flag(a, 'stage') !== undefined) throw new UsageError('cluster: --stage goes with --field');
  const stage = parseCount(flag(a, 'stage'), '--stage', 0);
  if (field) checkVariants(sceneArg, vary, shards);
  const args = [scene, ...set.flatMap((s) => ['--set', s]), ...(seed !== undefined ? ['--seed', seed] : [])];
  for (const k of ['method', 'scan-lines', 'collect', 'max-output'] as const) {
    const v = flag(a, k);
    if (v !== undefined) {
      if (vary.length === 0 && k !== 'max-output') throw new UsageError(`cluster: --${k} is a sweep option; give --vary too`);
      args.push(`--${k}`, v);
    }
  }
  vary.forEach((v) => args.push('--vary', v));
  if (stage !== undefined) args.push('--stage', String(stage));
  if (!field) checkJob(scene, sceneArg, { set, seed: parseCount(seed, '--seed', 0), vary, shards, method: flag(a, 'method') as SweepMethod | undefined, scanLines: flag(a, 'scan-lines'), collect: flag(a, 'collect') });

  const job: ClusterJob = {
    name: `iontrail-${basename(scene).replace(/\.ya?ml$/i, '').toLowerCase().replace(/[^a-z0-9-]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 40) || 'job'}`,
    command: field ? 'field' : vary.length > 0 ? 'sweep' : 'run', args, shards, dir,
    iontrail: target === 'slurm' ? [process.execPath, CLI] : ['iontrail'], workdir: process.cwd(), cpus,
  };
  const files = target === 'slurm'
    ? slurmFiles(job, { partition, time })
    : kubernetesFiles(job, { image: flag(a, 'image') ?? `iontrail:${TOOL_VERSION}`, claim: flag(a, 'claim') ?? 'iontrail-work' });
  const temp = folderBeside(dir);
  try {
    for (const [name, text] of Object.entries(files)) writeFileSync(join(temp, name), text, { mode: name.endsWith('.sh') || name.endsWith('.sbatch') ? 0o755 : 0o644 });
    if (!field) mkdirSync(join(temp, 'parts'));
    mkdirSync(join(temp, 'logs'));
    swapFolderIntoPlace(temp, dir, true);
  } catch (e) {
    rmSync(temp, { recursive: true, force: true });
    throw e;
  }
  const readme = readFileSync(join(dir, 'README.md'), 'utf8').trim();
  process.stdout.write(`${out}: ${target} job of ${shards} shards of \`iontrail ${job.command}\`\n  ${readme}\n`);
  if (submit) {
    const r = spawnSync('sh', [join(dir, 'submit.sh')], { encoding: 'utf8' });
    if (r.status !== 0) throw new UsageError(`cluster: sbatch refused the job (${(r.stderr || r.stdout).trim().split('\n')[0]}); the job folder ${out} is written, submit it with sh ${join(out, 'submit.sh')}`);
    process.stdout.write(r.stdout);
  }
  return 0;
}

/** The variants of a field job: every variant's scene loads, and N is at most their number. */
function checkVariants(shown: string, vary: string[], shards: number): void {
  const { text } = loadSceneFile(shown);
  const plan = planVariants(vary.map((v) => parseVariantAxis(v, text, shown)));
  variantsOf(plan, { index: 0, count: shards });
  for (const v of plan.variants) {
    const { scene: s } = loadSceneFile(shown, { set: v.set });
    if (!s.stages.some((st) => fieldProblemOf(st) !== undefined)) throw new UsageError(`cluster: ${shown} has no stage whose field is solved from electrodes (a stage of type: electrodes)`);
  }
}

/** Refuse here what the shards would refuse on the cluster: the scene, the sweep, N too large. */
function checkJob(scene: string, shown: string, o: { set: string[]; seed?: number; vary: string[]; shards: number; method?: SweepMethod; scanLines?: string; collect?: string }): void {
  if (o.vary.length === 0) {
    const { scene: s } = loadSceneFile(shown, { set: o.set, seed: o.seed });
    if (s.spaceCharge) throw new UsageError('cluster: space charge couples every ion of the run, so it cannot be cut into shards');
    const plan = planBatches(s);
    sliceRange({ index: 0, count: o.shards }, plan.count, `the run has ${plan.count} batches of ${plan.size} ions and a shard holds whole batches`);
    return;
  }
  let text: string;
  try {
    text = readFileSync(scene, 'utf8');
  } catch (e) {
    throw new SceneError(`${shown}: cannot read the scene file (${(e as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  const collect = (o.collect ?? '').split(',').map((x) => x.trim()).filter((x) => x !== '');
  const plan = planSweep({ sceneText: text, sceneFile: shown, set: o.set, seed: o.seed, vary: o.vary, method: o.method, scanLines: o.scanLines, collect, workers: 1 });
  if (collect.length > 0) sliceRange({ index: 0, count: o.shards }, plan.tasks.length, `the sweep has ${plan.tasks.length} points and --collect runs each point whole`);
}
