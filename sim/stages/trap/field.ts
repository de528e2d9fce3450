// Field model of the ideal 3D RF trap (DESIGN.md convention: ring at U + V(t) cos θ, end caps
// grounded, d² = r0² + 2z0², z measured from the trap centre):
//   Φ = (U + V(t) cos θ)(r² − 2z²)/d²,  E = −(U + V(t) cos θ)·(2x, 2y, −4z)/d²
// (March & Todd, Quadrupole Ion Trap Mass Spectrometry, 2005, ch. 2), plus the supplementary
// dipolar AC between the end caps in the uniform-field approximation E_z = A cos(ω t + φ)/(2 z0)
// (kernel.ts explains it). V(t) ramps linearly on the run clock when `rf.ramp` is set.
// Electrodes: ring r² − 2z² = r0², end caps 2z² − r² = 2z0².

import type { FieldModel, FieldTerm } from '../../core/field-model.js';
import type { TrapStage } from './stage.js';

export function trapField(st: TrapStage): FieldModel {
  const d2 = st.r0 * st.r0 + 2 * st.z0 * st.z0;
  const r0sq = st.r0 * st.r0, z0sq2 = 2 * st.z0 * st.z0;
  const U = st.dc, V0 = st.rf.amplitude, omega = 2 * Math.PI * st.rf.frequency, ph = st.rf.phase;
  const ramp = st.rf.ramp;
  const rate = ramp ? (ramp.to - V0) / ramp.over : 0;
  const vAt = (t: number) => (ramp ? (t >= ramp.over ? ramp.to : V0 + rate * t) : V0);
  const unitPotential = (x: number, y: number, z: number) => (x * x + y * y - 2 * z * z) / d2;
  const unitField = (x: number, y: number, z: number, out: Float64Array) => { out[0] = (-2 * x) / d2; out[1] = (-2 * y) / d2; out[2] = (4 * z) / d2; };
  const terms: FieldTerm[] = [
    { name: 'dc', drive: () => U, unitPotential, unitField },
    { name: 'rf', drive: (t, tau = 0) => vAt(t) * Math.cos(omega * (t + tau) + ph), unitPotential, unitField },
  ];
  const aux = st.aux;
  if (aux) {
    const wA = 2 * Math.PI * aux.frequency, A = aux.amplitude, z0 = st.z0;
    terms.push({
      name: 'aux', drive: (t) => A * Math.cos(wA * t + aux.phase),
      unitPotential: (_x, _y, z) => -z / (2 * z0),
      unitField: (_x, _y, _z, out) => { out[0] = 0; out[1] = 0; out[2] = 1 / (2 * z0); },
    });
  }
  return {
    terms, zRef: 0.5 * (st.zStart + st.zEnd), linear: false,
    steady: V0 === 0 && !ramp && !(aux && aux.amplitude !== 0), drop: 0,
    dcPotential: (x, y, z) => (U * (x * x + y * y - 2 * z * z)) / d2,
    potential(x, y, z, t, tau = 0) {
      let p = ((U + vAt(t) * Math.cos(omega * (t + tau) + ph)) * (x * x + y * y - 2 * z * z)) / d2;
      if (aux) p -= (aux.amplitude * Math.cos(2 * Math.PI * aux.frequency * t + aux.phase) * z) / (2 * st.z0);
      return p;
    },
    // The coupled stepper's form (sim/engine/coupled-flight.ts), with the ramp and the
    // supplementary AC; every ion of a coupled run shares the run clock (no start offset τ).
    addAcceleration(t, n, x, y, z, qm, ax, ay, az) {
      // E = −∇Φ = −(U + V(t) cos(Ωt+φ))/(r0² + 2z0²) · (2x, 2y, −4z)
      const g = -(U + (ramp ? vAt(t) : V0) * Math.cos(omega * t + ph)) / d2;
      for (let i = 0; i < n; i++) {
        const k = qm[i] * g;
        ax[i] += 2 * k * x[i]; ay[i] += 2 * k * y[i]; az[i] -= 4 * k * z[i];
      }
      if (aux && aux.amplitude !== 0) {
        const ez = (aux.amplitude * Math.cos(2 * Math.PI * aux.frequency * t + aux.phase)) / (2 * st.z0);
        for (let i = 0; i < n; i++) az[i] += qm[i] * ez;
      }
    },
    outside(x, y, z) {
      const r2 = x * x + y * y, zz = 2 * z * z;
      return r2 - zz >= r0sq || zz - r2 >= z0sq2;
    },
  };
}
