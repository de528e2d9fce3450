// Electrode field solver speed (issue 12). (1) The multigrid-preconditioned BiCGSTAB of sim/fields
// against a plain C implementation of the same algorithm (test/bench/c/fields_mg.c, cc -O2, single
// thread), both timed in this run on the same problem: a 1025 × 1025 planar box whose top side is at
// 1 V (no cut rows; centre value V/4 compared). Wall and CPU time of each, best of five alternating
// runs; on a machine shared with other work the CPU-time ratio is the one that compares. (2) Per
// grid kind, the mean contraction per BiCGSTAB iteration (two V-cycles each) and the iterations to
// 1e-10. (3) A planar 2000 × 2000 grid and a 200³ 3D grid solved to 1e-10 on both cores, each in a
// process of its own (test/bench/fields-large.ts) so that its peak RSS is its own.

import { execFileSync } from 'node:child_process';
import { availableParallelism, loadavg } from 'node:os';
import { fileURLToPath } from 'node:url';
import { buildOperator } from '../../sim/fields/operator.js';
import { multigridOf, solveUnit } from '../../sim/fields/unit.js';
import { solveField, type FieldProblem } from '../../sim/fields/index.js';
import { buildC, runC } from './cbuild.js';

const V = (dc: number) => ({ dc, rf: 0, aux: 0 });

function square(n: number): FieldProblem {
  return {
    grid: { symmetry: 'planar', spacing: 2 / (n - 1), halfWidth: 1, length: 1, mirror: [] },
    electrodes: [{ name: 'top', potential: V(1), shapes: [{ kind: 'rectangle', min: [-1, 1], max: [1, 1.5] }], holes: [] }],
  };
}

export function rods2d(nodes: number, mirror: boolean): FieldProblem {
  const r0 = 1e-3, R = 1.145 * r0, c = r0 + R, hw = 4 * r0;
  const rod = (x: number, y: number) => ({ kind: 'circle' as const, center: [x, y] as const, radius: R });
  return {
    grid: { symmetry: 'planar', spacing: (mirror ? hw : 2 * hw) / (nodes - 1), halfWidth: hw, length: 0.1, mirror: mirror ? ['x', 'y'] : [] },
    electrodes: [
      { name: 'x-pair', potential: V(1), shapes: [rod(c, 0), rod(-c, 0)], holes: [] },
      { name: 'y-pair', potential: V(-1), shapes: [rod(0, c), rod(0, -c)], holes: [] },
    ],
  };
}

function trap(h: number): FieldProblem {
  const z0 = 5e-3, r0 = Math.SQRT2 * z0, L = 4 * z0;
  return {
    grid: { symmetry: 'axial', spacing: h, radius: 2 * r0, length: L, mirror: ['z'] },
    electrodes: [
      { name: 'ring', potential: V(1), shapes: [{ kind: 'hyperboloid', sheet: 'ring', vertex: r0, center: L / 2, truncate: 1.8 * r0, side: 1, hole: 0 }], holes: [] },
      { name: 'caps', potential: V(-1), shapes: [
        { kind: 'hyperboloid', sheet: 'cap', vertex: z0, center: L / 2, truncate: 1.5 * r0, side: 1, hole: 0.1 * z0 },
        { kind: 'hyperboloid', sheet: 'cap', vertex: z0, center: L / 2, truncate: 1.5 * r0, side: -1, hole: 0.1 * z0 },
      ], holes: [] },
    ],
  };
}

export function rods3d(n: number): FieldProblem {
  const r0 = 1e-3, R = 1.145 * r0, c = r0 + R, hw = 4 * r0, L = 2 * hw;
  const rod = (x: number, y: number) => ({ kind: 'cylinder' as const, base: [x, y, 0] as const, axis: [0, 0, 1] as const, radius: R, from: 0.25 * L, to: L });
  return {
    grid: { symmetry: 'none', spacing: (2 * hw) / (n - 1), halfWidth: hw, length: L, mirror: [] },
    electrodes: [
      { name: 'x-pair', potential: V(1), shapes: [rod(c, 0), rod(-c, 0)], holes: [] },
      { name: 'y-pair', potential: V(-1), shapes: [rod(0, c), rod(0, -c)], holes: [] },
    ],
  };
}

function fmt(x: number, d = 3): string { return x.toPrecision(d); }

export async function bench(): Promise<void> {
  console.log(`machine: ${availableParallelism()} cores, load average ${loadavg()[0].toFixed(1)} at start (shared with other work)`);
  // (1) Same algorithm, same problem, JS against C.
  const n = 1025, exe = buildC('fields_mg');
  // C and JS alternate (C, JS, C, JS…) and each keeps its best, so that both see the same load.
  const op = buildOperator(square(n)), mg = multigridOf(op);
  let best = Infinity, bestCpu = Infinity, it = 0, res = 0, centre = 0, cSec = Infinity, cCpu = Infinity, cIt = 0, cRes = 0, cCentre = 0;
  for (let w = 0; w < 2; w++) solveUnit(op, mg, { electrode: 0, tolerance: 1e-10, maxIterations: 200 }); // JIT warm-up
  for (let rep = 0; rep < 5; rep++) {
    const [cs, ci, cr, cc, cu] = runC(exe, [String(n), '1']).split(/\s+/).map(Number);
    if (cs < cSec) { cSec = cs; cIt = ci; cRes = cr; cCentre = cc; }
    cCpu = Math.min(cCpu, cu);
    const u0 = process.cpuUsage();
    const r = solveUnit(op, mg, { electrode: 0, tolerance: 1e-10, maxIterations: 200 });
    const u = process.cpuUsage(u0);
    bestCpu = Math.min(bestCpu, (u.user + u.system) / 1e6);
    best = Math.min(best, r.seconds); it = r.iterations; res = r.residual;
    centre = r.x[op.ops[0].level.guard + (n >> 1) * n + (n >> 1)];
  }
  console.log(`square ${n}², one thread: JS ${fmt(best)} s wall, ${fmt(bestCpu)} s CPU (${it} it, residual ${res.toExponential(1)}, centre ${centre.toFixed(9)}); C -O2 ${fmt(cSec)} s wall, ${fmt(cCpu)} s CPU (${cIt} it, ${cRes.toExponential(1)}, centre ${cCentre.toFixed(9)})`);
  console.log(`  ratio C/JS: CPU time ${(cCpu / bestCpu).toFixed(2)}, wall time ${(cSec / best).toFixed(2)} (goal ≥ 0.70; load average now ${loadavg()[0].toFixed(1)})`);

  // (2) Contraction and iterations per grid kind.
  const kinds: [string, FieldProblem][] = [
    ['planar round-rod quadrupole, quarter grid r0/80 (321²)', rods2d(321, true)],
    ['axial hyperbolic trap, z0/40 (81 × 81)', trap(5e-3 / 40)],
    ['3D rods ending in the box, 65³', rods3d(65)],
  ];
  for (const [name, p] of kinds) {
    const s = await solveField(p, { workers: 1 });
    // A BiCGSTAB iteration applies the V-cycle twice: per cycle, the square root of its contraction.
    console.log(`${name}: iterations to 1e-10 ${s.stats.iterations.join(', ')}; contraction per iteration ${s.stats.contraction.map((c) => fmt(c, 2)).join(', ')}, per V-cycle ${s.stats.contraction.map((c) => fmt(Math.sqrt(c), 2)).join(', ')}; ${fmt(s.stats.wallSeconds)} s`);
  }

  // (3) Large grids on both cores, each in a fresh process (its peak RSS is the solve's alone).
  const large = fileURLToPath(new URL('./fields-large.js', import.meta.url));
  for (const which of ['planar', '3d']) {
    process.stdout.write(execFileSync(process.execPath, [large, which], { encoding: 'utf8' }));
  }
}
