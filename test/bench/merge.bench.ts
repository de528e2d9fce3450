// Merge speed and memory: `iontrail merge` of the 8 shards of a Skerry QF-4 run (ions only,
// record_every 0), 2.5 × 10⁴ and 2 × 10⁵ ions, each merge in a process of its own so that its peak
// resident memory (getrusage maxrss) is the merge's. The rate is the merge's own wall time
// (summary.json provenance.shards.merge_wall_s: reading, checking, tallying and writing; not Node's
// start-up), and it is set against a plain C concatenation of the same part files (cc -O2, 1 MiB
// reads: the I/O floor, no parsing) timed in the same run. A streaming merge shows as a peak
// memory that does not grow with the ions, and as a merge that still runs with V8's heap capped
// below the size of what it writes; a linear one as a rate that does not fall.

import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { buildC, repoRoot, runC } from './cbuild.js';

const SHARDS = 8;

function scene(ions: number): string {
  return `name: Skerry QF-4 merge benchmark
seed: 3
stages:
  - type: quadrupole
    length: 10 mm
    r0: 4 mm
    rf: { amplitude: 600 V, frequency: 1.2 MHz }
    dc: 90 V
ions:
  - mz: 502
    count: ${ions}
    position: { spread: 0.3 mm }
    energy: 5 eV
    angle_spread: 1 deg
run: { steps_per_cycle: 10, max_time: 5 us, record_every: 0 }
`;
}

const RSS_HOOK = 'data:text/javascript,process.on("exit",()=>process.stderr.write("maxrss_kb "+process.resourceUsage().maxRSS+"\\n"))';

function iontrail(args: string[], hook = false, node: string[] = []): { stderr: string } {
  const cli = join(repoRoot(), 'cli/iontrail.js');
  const r = spawnSync(process.execPath, [...node, ...(hook ? ['--import', RSS_HOOK] : []), cli, ...args], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`iontrail ${args.join(' ')}: ${r.stderr}`);
  return { stderr: r.stderr };
}

const maxRss = (stderr: string) => Number(/maxrss_kb (\d+)/.exec(stderr)![1]) / 1024;

export async function bench(): Promise<void> {
  console.log('caution: simulated ideal fields; verify operating points on the bench. RF/DC supplies are lethal: local electrical-safety codes and qualified staff first.');
  const exe = buildC('concat_files');
  const root = mkdtempSync(join(tmpdir(), 'iontrail-bench-merge-'));
  try {
    const bare = maxRss(iontrail(['--help'], true).stderr);
    console.log(`node + iontrail loaded, no work: ${bare.toFixed(0)} MB peak resident`);
    for (const ions of [25_000, 200_000]) {
      const dir = join(root, String(ions));
      spawnSync('mkdir', ['-p', dir]);
      const file = join(dir, 'scene.yaml');
      writeFileSync(file, scene(ions));
      const parts = Array.from({ length: SHARDS }, (_, i) => join(dir, `part-${i}`));
      parts.forEach((p, i) => iontrail(['run', file, '--shard', `${i}/${SHARDS}`, '--workers', '1', '-o', p]));
      const inputs = parts.flatMap((p) => ['ions.arrow', 'history_batches.arrow'].map((f) => join(p, f)));
      const bytesIn = inputs.reduce((a, f) => a + statSync(f).size, 0);
      for (let rep = 0; rep < 2; rep++) {
        const out = join(dir, `merged-${rep}`);
        const r = iontrail(['merge', ...parts, '-o', out], true);
        const s = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
        const wall = s.provenance.shards.merge_wall_s as number;
        const [cBytes, cSec] = runC(exe, [join(dir, 'concat.bin'), ...inputs]).split(' ').map(Number);
        const outBytes = statSync(join(out, 'ions.arrow')).size;
        console.log(`${ions} ions from ${SHARDS} parts (${(bytesIn / 1e6).toFixed(1)} MB of ions.arrow and history_batches.arrow in, ${(outBytes / 1e6).toFixed(1)} MB ions.arrow out), run ${rep + 1}: `
          + `merge ${wall.toFixed(2)} s = ${(ions / wall / 1e3).toFixed(0)} × 10³ ions/s, ${(bytesIn / wall / 1e6).toFixed(0)} MB/s; peak resident ${maxRss(r.stderr).toFixed(0)} MB; `
          + `C concatenation of the same ${(cBytes / 1e6).toFixed(1)} MB ${(cSec * 1e3).toFixed(0)} ms (merge/C = ${(wall / cSec).toFixed(0)}×)`);
        rmSync(out, { recursive: true, force: true });
      }
      // Streaming shown another way: the merge also runs with V8's old generation capped far below
      // the size of the ions it writes (a merge that kept the rows would run out of heap).
      const capped = join(dir, 'merged-capped');
      iontrail(['merge', ...parts, '-o', capped], false, ['--max-old-space-size=24']);
      console.log(`${ions} ions merged with a 24 MB old-generation heap cap: ok, ${(statSync(join(capped, 'ions.arrow')).size / 1e6).toFixed(1)} MB ions.arrow`);
      rmSync(capped, { recursive: true, force: true });
    }
  } finally {
    rmSync(root, { recursive: true, force: true });
  }
}
