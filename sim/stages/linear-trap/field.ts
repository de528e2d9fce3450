// Field model of the linear quadrupole trap (stage.ts). Rods as the quadrupole filter of DESIGN.md,
// the end electrodes as an ideal quadratic well about the centre (z from the stage centre):
//   Φ = (U + V(t) cos θ)(x² − y²)/r0² + κ U_end (2z² − x² − y²)/(2 z0²) − A cos(ω t + φ) x/(2 r0)
// The well term is the lowest-order axial solution of Laplace's equation that is symmetric about
// the centre (∇² of 2z² − x² − y² is 0); κ lumps the geometry of rods and end electrodes into one
// factor (model of our own; the form is the usual one for a DC-closed linear trap, from memory).
// The supplementary AC across the x rods is taken in the uniform-field approximation A/(2 r0) at
// the centre, as the 3D trap's AC (sim/stages/trap/field.ts). Electrodes: the rods' inscribed
// circle r = r0, the end electrodes at |z| = z0.

import type { FieldModel, FieldTerm } from '../../core/field-model.js';
import type { LinearTrapStage } from './stage.js';

export function linearTrapField(st: LinearTrapStage): FieldModel {
  const r0sq = st.r0 * st.r0, z0sq = st.z0 * st.z0;
  const U = st.dc, V0 = st.rf.amplitude, omega = 2 * Math.PI * st.rf.frequency, ph = st.rf.phase;
  const ramp = st.rf.ramp;
  const rate = ramp ? (ramp.to - V0) / ramp.over : 0;
  const vAt = (t: number) => (ramp ? (t >= ramp.over ? ramp.to : V0 + rate * t) : V0);
  const W = st.kappa * st.endDc / (2 * z0sq);
  const rodUnit = (x: number, y: number) => (x * x - y * y) / r0sq;
  const rodField = (x: number, y: number, _z: number, out: Float64Array) => { out[0] = (-2 * x) / r0sq; out[1] = (2 * y) / r0sq; out[2] = 0; };
  const well = (x: number, y: number, z: number) => W * (2 * z * z - x * x - y * y);
  const terms: FieldTerm[] = [
    { name: 'dc', drive: () => U, unitPotential: rodUnit, unitField: rodField },
    { name: 'rf', drive: (t, tau = 0) => vAt(t) * Math.cos(omega * (t + tau) + ph), unitPotential: rodUnit, unitField: rodField },
    {
      name: 'end', drive: () => st.endDc,
      unitPotential: (x, y, z) => (st.kappa * (2 * z * z - x * x - y * y)) / (2 * z0sq),
      unitField: (x, y, z, out) => { const k = st.kappa / z0sq; out[0] = k * x; out[1] = k * y; out[2] = -2 * k * z; },
    },
  ];
  const aux = st.aux;
  if (aux) {
    const wA = 2 * Math.PI * aux.frequency, r0 = st.r0;
    terms.push({
      name: 'aux', drive: (t) => aux.amplitude * Math.cos(wA * t + aux.phase),
      unitPotential: (x) => -x / (2 * r0),
      unitField: (_x, _y, _z, out) => { out[0] = 1 / (2 * r0); out[1] = 0; out[2] = 0; },
    });
  }
  return {
    terms, zRef: 0.5 * (st.zStart + st.zEnd), linear: false,
    steady: V0 === 0 && !ramp && !(aux && aux.amplitude !== 0), drop: 0,
    dcPotential: (x, y, z) => U * rodUnit(x, y) + well(x, y, z),
    potential(x, y, z, t, tau = 0) {
      let p = (U + vAt(t) * Math.cos(omega * (t + tau) + ph)) * rodUnit(x, y) + well(x, y, z);
      if (aux) p -= (aux.amplitude * Math.cos(2 * Math.PI * aux.frequency * t + aux.phase) * x) / (2 * st.r0);
      return p;
    },
    addAcceleration(t, n, x, y, z, qm, ax, ay, az) {
      const g = (U + vAt(t) * Math.cos(omega * t + ph)) / r0sq;
      const ex = aux ? (aux.amplitude * Math.cos(2 * Math.PI * aux.frequency * t + aux.phase)) / (2 * st.r0) : 0;
      for (let i = 0; i < n; i++) {
        ax[i] += qm[i] * (-2 * g * x[i] + 2 * W * x[i] + ex);
        ay[i] += qm[i] * (2 * g * y[i] + 2 * W * y[i]);
        az[i] += qm[i] * (-4 * W * z[i]);
      }
    },
    outside: (x, y, z) => x * x + y * y >= r0sq || z * z >= z0sq,
  };
}
