// Field model of the ideal quadrupole (DESIGN.md convention, rods at ±(U + V cos θ)):
//   Φ = (U + V cos θ)(x² − y²)/r0²,  θ = Ω(t + τ) + φ,
//   E = −∇Φ = −(U + V cos θ)·(2x, −2y, 0)/r0²
// (Dawson, Quadrupole Mass Spectrometry and its Applications, 1976, ch. 2). The kernel
// (kernel.ts) integrates exactly this field; the RF amplitude is constant there (an `rf.ramp`
// of a filter stage is not applied), so the model's RF drive is too.

import type { FieldModel, FieldTerm } from '../../core/field-model.js';
import type { QuadrupoleStage } from './stage.js';

export function quadrupoleField(st: QuadrupoleStage): FieldModel {
  const r0sq = st.r0 * st.r0;
  const U = st.dc, V = st.rf.amplitude, omega = 2 * Math.PI * st.rf.frequency, ph = st.rf.phase;
  const unitPotential = (x: number, y: number) => (x * x - y * y) / r0sq;
  const unitField = (x: number, y: number, _z: number, out: Float64Array) => { out[0] = (-2 * x) / r0sq; out[1] = (2 * y) / r0sq; out[2] = 0; };
  const terms: FieldTerm[] = [
    { name: 'dc', drive: () => U, unitPotential, unitField },
    { name: 'rf', drive: (t, tau = 0) => V * Math.cos(omega * (t + tau) + ph), unitPotential, unitField },
  ];
  return {
    terms, zRef: st.zStart, linear: true, steady: V === 0 && !st.rf.ramp, drop: 0,
    dcPotential: (x, y) => (U * (x * x - y * y)) / r0sq,
    potential: (x, y, _z, t, tau = 0) => ((U + V * Math.cos(omega * (t + tau) + ph)) * (x * x - y * y)) / r0sq,
    addAcceleration(t, n, x, y, _z, qm, ax, ay) {
      const g = -(U + V * Math.cos(omega * t + ph)) / r0sq;
      for (let i = 0; i < n; i++) {
        const k = qm[i] * g;
        ax[i] += 2 * k * x[i]; ay[i] -= 2 * k * y[i];
      }
    },
    outside: (x, y) => x * x + y * y >= r0sq,
  };
}
