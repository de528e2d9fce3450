// Field model of the ideal multipole of 2n rods (Gerlich, Adv. Chem. Phys. 82, 1992, eq. 8 with
// the DC term added as in the quadrupole convention of DESIGN.md):
//   Φ = (U + V cos θ) Re(w^n),  w = (x + i y)/r0  (so Re(w^n) = (r/r0)^n cos nθ),  θ = Ω(t + τ) + φ
//   E = −∇Φ = (U + V cos θ)·(n/r0)·(−Re w^(n−1), +Im w^(n−1), 0)
// (∂/∂x Re w^n = n Re w^(n−1)/r0, ∂/∂y Re w^n = −n Im w^(n−1)/r0, w^n being analytic). For n = 2
// this is the quadrupole of sim/stages/quadrupole/field.ts term for term. The kernel (kernel.ts)
// integrates exactly this field; electrodes: the rods' inscribed circle r = r0.

import type { FieldModel, FieldTerm } from '../../core/field-model.js';
import type { MultipoleStage } from './stage.js';

/** Re and Im of w^k, w = (X, Y), k ≥ 0, written to out[0], out[1]. */
export function complexPower(X: number, Y: number, k: number, out: Float64Array): void {
  let pr = 1, pi = 0;
  for (let e = 0; e < k; e++) { const t = pr * X - pi * Y; pi = pr * Y + pi * X; pr = t; }
  out[0] = pr; out[1] = pi;
}

export function multipoleField(st: MultipoleStage): FieldModel {
  const n = st.poles / 2, r0 = st.r0, r0sq = r0 * r0;
  const U = st.dc, V = st.rf.amplitude, omega = 2 * Math.PI * st.rf.frequency, ph = st.rf.phase;
  const w = new Float64Array(2);
  const unitPotential = (x: number, y: number) => { complexPower(x / r0, y / r0, n, w); return w[0]; };
  const unitField = (x: number, y: number, _z: number, out: Float64Array) => {
    complexPower(x / r0, y / r0, n - 1, w);
    out[0] = (-n * w[0]) / r0; out[1] = (n * w[1]) / r0; out[2] = 0;
  };
  const terms: FieldTerm[] = [
    { name: 'dc', drive: () => U, unitPotential, unitField },
    { name: 'rf', drive: (t, tau = 0) => V * Math.cos(omega * (t + tau) + ph), unitPotential, unitField },
  ];
  return {
    terms, zRef: st.zStart, linear: false, steady: V === 0, drop: 0,
    dcPotential: (x, y) => U * unitPotential(x, y),
    potential: (x, y, _z, t, tau = 0) => (U + V * Math.cos(omega * (t + tau) + ph)) * unitPotential(x, y),
    addAcceleration(t, count, x, y, _z, qm, ax, ay) {
      const g = ((U + V * Math.cos(omega * t + ph)) * n) / r0;
      for (let i = 0; i < count; i++) {
        complexPower(x[i] / r0, y[i] / r0, n - 1, w);
        ax[i] -= qm[i] * g * w[0]; ay[i] += qm[i] * g * w[1];
      }
    },
    outside: (x, y) => x * x + y * y >= r0sq,
  };
}
