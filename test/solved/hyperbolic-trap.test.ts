// A solved trap of hyperbolic electrodes (ring r² − 2z'² = r0², caps 2z'² − r² = 2z0², r0² = 2z0²,
// cut off at r = 2 r0, 0.5 mm holes in the caps) on an axial grid, against Mathieu theory of the
// ideal trap (March & Todd, Quadrupole Ion Trap Mass Spectrometry, 2nd ed., 2005, ch. 2):
//  - secular frequency: an ion on the axis moves in z only, and its position sampled once per RF
//    period is a pure sinusoid of phase advance πβ_z per sample (Floquet: the monodromy over one
//    period has trace 2 cos πβ; any text on Hill's equation, e.g. McLachlan, Theory and Application
//    of Mathieu Functions, 1947, ch. 4), so z_{k+1} + z_{k−1} = 2 cos(πβ) z_k. β from the samples
//    by least squares against β of the ideal trap from the Floquet monodromy (sim/mathieu/floquet.ts),
//    within 0.5 % (issue 13). The cut-off electrodes weaken the quadrupole by about 0.1 % here.
//  - mass-selective instability scan: with the RF amplitude ramped, the ion leaves through a cap
//    hole as q_z passes the stability edge β_z = 1, q_z = 0.908 (March & Todd 2005, ch. 2): within
//    1 %. The ideal trap kernel, ramped the same way, is run beside it as the reference for how far
//    past the edge an ion of this start amplitude gets before it reaches the cap. Seen: solved
//    0.9164, ideal kernel 0.9087: the cut-off electrodes' higher-order fields delay the ejection by
//    0.8 % (the reason real traps stretch the cap spacing, common practice, no source); 0.9 % of
//    the 1 % allowed is used, so a coarser grid or a shorter cut-off would fail here.

import { beforeAll, describe, expect, it } from 'vitest';
import { Exit } from '../../sim/core/cursor.js';
import type { Scene } from '../../sim/scene/types.js';
import { floquet } from '../../sim/mathieu/floquet.js';
import { trapQz } from '../../sim/mathieu/parameters.js';
import type { TrapStage } from '../../sim/stages/types.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';
import { context, cursor, trackIon, privateFieldCache, solvedScene, solvedTrapScene } from './helpers.js';

const R0 = 7.07e-3, Z0 = 5e-3, F = 1.05e6, MZ = 200, ZC = 14e-3;
const T = 1 / F;
const vAtQ = (q: number) => q / trapQz(R0, Z0, F, 1, MZ);

const trap = (rf: string) => solvedTrapScene({
  name: 'Skerry hyperbolic trap check', length: '28 mm', radius: '18 mm', center: '14 mm', truncate: '14.14 mm', rf, mz: MZ,
  caps: ['entrance', 'exit'].map((side) => `{ hyperboloid: { sheet: cap, vertex: 5 mm, center: 14 mm, truncate: 14.14 mm, side: ${side}, hole: 0.5 mm } }`).join(', '),
});

const m = MZ * ATOMIC_MASS_UNIT, q = ELEMENTARY_CHARGE;
const QZ = 0.4, Q1 = 0.86, Q2 = 0.96, SCAN = 3000 * T;
// Caps as two electrodes for a dipolar supplementary AC between them (no mirror plane: a single
// cap's unit solution is not symmetric about the centre).
const dipole = (aux: string) => `name: Skerry hyperbolic trap, dipolar AC
stages:
  - type: electrodes
    length: 28 mm
    grid: { symmetry: axial, spacing: 0.1 mm, radius: 18 mm }
    rf: { amplitude: ${vAtQ(QZ)} V, frequency: 1.05 MHz }
    aux: ${aux}
    electrodes:
      - name: ring
        potential: { rf: 1 }
        shapes: [ { hyperboloid: { sheet: ring, vertex: 7.07 mm, center: 14 mm, truncate: 14.14 mm } } ]
      - name: entrance cap
        potential: { aux: 0.5 }
        shapes: [ { hyperboloid: { sheet: cap, vertex: 5 mm, center: 14 mm, truncate: 14.14 mm, side: entrance, hole: 0.5 mm } } ]
      - name: exit cap
        potential: { aux: -0.5 }
        shapes: [ { hyperboloid: { sheet: cap, vertex: 5 mm, center: 14 mm, truncate: 14.14 mm, side: exit, hole: 0.5 mm } } ]
ions:
  - { mz: ${MZ}, count: 1 }
`;
let secular: Scene, scan: Scene;

beforeAll(async () => {
  privateFieldCache();
  secular = await solvedScene(trap(`{ amplitude: ${vAtQ(QZ)} V, frequency: 1.05 MHz }`));
  scan = await solvedScene(trap(`{ amplitude: ${vAtQ(Q1)} V, frequency: 1.05 MHz, ramp: { to: ${vAtQ(Q2)} V, over: ${SCAN * 1e6} us } }`));
}, 120_000);

/** β from once-per-period samples: cos πβ = Σ z_k (z_{k+1} + z_{k−1}) / (2 Σ z_k²). */
function betaOf(z: number[]): number {
  let num = 0, den = 0;
  for (let k = 1; k + 1 < z.length; k++) { num += z[k] * (z[k + 1] + z[k - 1]); den += 2 * z[k] * z[k]; }
  return Math.acos(num / den) / Math.PI;
}

describe('solved hyperbolic trap against Mathieu theory of the ideal trap', () => {
  it('secular frequency of an ion on the axis: β_z within 0.5 % of the Floquet β', () => {
    const st = secular.stages[0];
    const c = cursor(m, q, 0, 0, ZC + 0.3e-3, 0, 0, 0);
    const z: number[] = [c.z - ZC];
    for (let k = 1; k <= 120; k++) {
      expect(trackIon(st, c, context(k * T), 40, 1e-9)).toBe(Exit.time);
      z.push(c.z - ZC);
    }
    const beta = betaOf(z), ideal = floquet(0, QZ).beta!;
    console.log(`hyperbolic trap at q_z = ${QZ}: β_z solved ${beta.toFixed(5)}, ideal (Floquet) ${ideal.toFixed(5)}, ratio − 1 = ${(beta / ideal - 1).toExponential(2)}`);
    expect(Math.abs(beta / ideal - 1)).toBeLessThan(0.005);
  });

  it('dipolar AC at the secular frequency drives the ion out to the caps; at 0.8 of it the ion stays near the centre', async () => {
    // A driven oscillator: at resonance the amplitude grows linearly in time, off resonance it beats
    // at a bounded amplitude (March & Todd 2005, ch. 3, resonance excitation). The secular frequency
    // is that of this solved field, β_z Ω/2 with β_z from once-per-period samples as above. Seen: the
    // resonant amplitude reaches 4.69 mm (of z0 = 5 mm) within 100 µs and then stops growing: the
    // cut-off electrodes' higher-order fields shift the frequency with amplitude out of resonance
    // (what the trade's stretched cap spacing compensates; common practice, no source), so the check
    // is the growth, not an ejection.
    const st0 = (await solvedScene(dipole('{ amplitude: 0 V, frequency: 100 kHz }'))).stages[0];
    const c0 = cursor(m, q, 0, 0, ZC + 0.3e-3, 0, 0, 0);
    const z: number[] = [c0.z - ZC];
    for (let k = 1; k <= 120; k++) { trackIon(st0, c0, context(k * T), 40, 1e-9); z.push(c0.z - ZC); }
    const fz = (betaOf(z) * F) / 2;
    const largest = async (f: number) => {
      const st = (await solvedScene(dipole(`{ amplitude: 2 V, frequency: ${f} Hz }`))).stages[0];
      const c = cursor(m, q, 0, 0, ZC + 0.01e-3, 0, 0, 0);
      let big = 0;
      for (let k = 1; k <= 100; k++) {
        expect(trackIon(st, c, context(k * 1e-6), 40, 1e-9)).toBe(Exit.time);
        big = Math.max(big, Math.abs(c.z - ZC));
      }
      return big;
    };
    const on = await largest(fz), off = await largest(0.8 * fz);
    console.log(`dipolar AC 2 V cap to cap: f_z = ${(fz / 1e3).toFixed(2)} kHz; largest |z'| in 100 µs ${(on * 1e3).toFixed(2)} mm at f_z, ${(off * 1e3).toFixed(2)} mm at 0.8 f_z`);
    expect(on).toBeGreaterThan(4e-3);
    expect(off).toBeLessThan(1e-3);
  }, 120_000);

  it('mass-selective instability scan: the ion leaves through a cap hole at q_z within 1 % of 0.908', () => {
    const qAt = (t: number) => Q1 + ((Q2 - Q1) * t) / SCAN;
    const c = cursor(m, q, 0, 0, ZC + 0.3e-3, 0, 0, 0);
    const code = trackIon(scan.stages[0], c, context(SCAN), 40, 1e-9);
    expect([Exit.forward, Exit.backward]).toContain(code);
    const qSolved = qAt(c.t);
    // The ideal trap kernel with the same ramp (stage-local z measured from its centre at length/2).
    const ideal: TrapStage = { type: 'trap', r0: R0, z0: Z0, length: 2 * ZC, rf: { amplitude: vAtQ(Q1), frequency: F, phase: 0, ramp: { to: vAtQ(Q2), over: SCAN } }, dc: 0, aperture: 0.5e-3, zStart: 0, zEnd: 2 * ZC };
    const d = cursor(m, q, 0, 0, ZC + 0.3e-3, 0, 0, 0);
    trackIon(ideal, d, context(SCAN), 40, 1e-9);
    const qIdeal = qAt(d.t);
    console.log(`mass scan: ejection q_z solved ${qSolved.toFixed(4)}, ideal kernel ${qIdeal.toFixed(4)}, edge 0.908`);
    expect(Math.abs(qSolved / 0.908 - 1)).toBeLessThan(0.01);
    expect(Math.abs(qIdeal / 0.908 - 1)).toBeLessThan(0.01);
  });
});
