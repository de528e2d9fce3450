// Speed of one Mathieu monodromy matrix (the unit of work of `iontrail check` and of the stability
// region edges): our RK4 kernel specialised to the Mathieu equation, the generic Rk4 and Dopri5
// classes and odex 2.0.4, each against a plain C RK4 kernel of the same arithmetic
// (test/bench/c/mathieu_monodromy.c, cc -O2), all measured in this one run; plus one
// stability-region polygon as the renderer asks for it.

import { monodromy, defaultSteps, type MonodromyMethod } from '../../sim/mathieu/floquet.js';
import { firstRegionQuadrupole } from '../../sim/mathieu/boundaries.js';
import { buildC, runC } from './cbuild.js';

function perCall(fn: (i: number) => void, minMs = 300): number {
  let n = 0;
  const t0 = performance.now();
  while (performance.now() - t0 < minMs) fn(n++);
  return (performance.now() - t0) / 1000 / n;
}

export async function bench(): Promise<void> {
  const a = 0.2, q = 0.6;
  const steps = defaultSteps(a, q);
  const exe = buildC('mathieu_monodromy');
  const [cTrace, cSec] = runC(exe, [String(a), String(q), String(steps), '2000']).split(/\s+/).map(Number);
  console.log(`monodromy at a = ${a}, q = ${q}, ${steps} RK4 steps per period`);
  console.log(`  C cc -O2 RK4            ${(cSec * 1e6).toFixed(1)} µs   tr = ${cTrace.toFixed(14)}`);
  for (const method of ['mathieu-rk4', 'rk4', 'dopri5', 'odex'] as MonodromyMethod[]) {
    const sec = perCall((i) => monodromy(a + 1e-12 * i, q, { method }), method === 'odex' ? 600 : 300);
    const tr = monodromy(a, q, { method }).trace;
    console.log(`  ${method.padEnd(22)} ${(sec * 1e6).toFixed(1)} µs   ${(sec / cSec).toFixed(2)}× C   tr − tr_C = ${(tr - cTrace).toExponential(2)}`);
  }
  const t0 = performance.now();
  firstRegionQuadrupole(200);
  console.log(`  filter first region, 200 points: ${(performance.now() - t0).toFixed(0)} ms`);
}
