// One large grid of fields.bench.ts, solved in a process of its own so that the peak RSS it
// reports belongs to that solve: `node dist/test/bench/fields-large.js planar|3d`.

import { loadavg } from 'node:os';
import { solveField } from '../../sim/fields/index.js';
import { rods2d, rods3d } from './fields.bench.js';

const which = process.argv[2];
const [name, problem, goal] = which === 'planar' ? ['planar 2000 × 2000 round rods', rods2d(2000, false), 3] as const : ['3D 200³ rods', rods3d(200), 15] as const;
const u0 = process.cpuUsage();
const s = await solveField(problem, { workers: 2 });
const u = process.cpuUsage(u0);
const rss = process.resourceUsage().maxRSS * 1024;
console.log(`${name}: ${s.stats.wallSeconds.toPrecision(3)} s wall on 2 threads (goal ≤ ${goal} s), ${((u.user + u.system) / 1e6).toPrecision(3)} s CPU, iterations ${s.stats.iterations.join(', ')}, residual ${s.stats.residual.map((r) => r.toExponential(1)).join(', ')}; solver memory ${(s.stats.memoryBytes / 2 ** 20).toFixed(0)} MiB, peak RSS ${(rss / 2 ** 20).toFixed(0)} MiB${which === '3d' ? ' (goal ≤ 1024 MiB)' : ''}; load average ${loadavg()[0].toFixed(1)}`);
