// Field model of an electrodes stage: the superposition of its solved unit solutions summed by
// drive (solution.ts), Φ = Φ_dc + V(t) cos θ · Φ_rf + A cos(ω_a t + φ_a) · Φ_aux, for the energy
// check, reports and the coupled stepper. The solution is looked up on first use, so building the
// model does not need it (the run's preparation solves it before ions are tracked).

import type { FieldModel, FieldTerm } from '../../core/field-model.js';
import type { ElectrodesStage } from './stage.js';
import { solvedFieldOf, type SolvedField } from './solution.js';

export function electrodesField(st: ElectrodesStage): FieldModel {
  let solved: SolvedField | undefined;
  const F = () => (solved ??= solvedFieldOf(st));
  const buf = new Float64Array(12);
  const pot = st.problem.electrodes.map((e) => e.potential);
  const rf = st.rf, aux = st.aux;
  const omega = rf ? 2 * Math.PI * rf.frequency : 0;
  const vAt = (t: number) => (!rf ? 0 : !rf.ramp ? rf.amplitude : t >= rf.ramp.over ? rf.ramp.to : rf.amplitude + ((rf.ramp.to - rf.amplitude) * t) / rf.ramp.over);
  const rfDrive = (t: number, tau = 0) => (rf ? vAt(t) * Math.cos(omega * (t + tau) + rf.phase) : 0);
  const auxDrive = (t: number) => (aux ? aux.amplitude * Math.cos(2 * Math.PI * aux.frequency * t + aux.phase) : 0);
  const hasRf = rf !== undefined && pot.some((p) => p.rf !== 0), hasAux = aux !== undefined && pot.some((p) => p.aux !== 0);
  /** Component o (0 dc, else the field's rf or aux offset) at a point: value and −gradient. */
  const comp = (which: 'dc' | 'rf' | 'aux', x: number, y: number, z: number, out?: Float64Array): number => {
    const f = F();
    const o = which === 'dc' ? 0 : which === 'rf' ? f.oRf : f.oAux;
    if (o < 0 || !f.evaluate(x, y, z, buf)) { if (out) out.fill(0, 0, 3); return o < 0 ? 0 : NaN; }
    if (out) { out[0] = -buf[o + 1]; out[1] = -buf[o + 2]; out[2] = -buf[o + 3]; }
    return buf[o];
  };
  const term = (name: 'dc' | 'rf' | 'aux', drive: (t: number, tau?: number) => number): FieldTerm => ({
    name, drive, unitPotential: (x, y, z) => comp(name, x, y, z), unitField: (x, y, z, out) => { comp(name, x, y, z, out); },
  });
  const terms: FieldTerm[] = [term('dc', () => 1)];
  if (hasRf) terms.push(term('rf', rfDrive));
  if (hasAux) terms.push(term('aux', auxDrive));
  const planar = st.problem.grid.symmetry === 'planar';
  const entrance = () => comp('dc', 0, 0, 0);
  const g = new Float64Array(3);
  return {
    terms, zRef: st.zStart, linear: false, steady: !hasRf && !hasAux,
    get drop() { return planar ? 0 : comp('dc', 0, 0, st.length) - entrance(); },
    dcPotential: (x, y, z) => comp('dc', x, y, z) - entrance(),
    potential: (x, y, z, t, tau = 0) => comp('dc', x, y, z) + (hasRf ? rfDrive(t, tau) * comp('rf', x, y, z) : 0) + (hasAux ? auxDrive(t) * comp('aux', x, y, z) : 0),
    addAcceleration(t, n, x, y, z, qm, ax, ay, az) {
      const cr = hasRf ? rfDrive(t) : 0, ca = hasAux ? auxDrive(t) : 0;
      for (let i = 0; i < n; i++) {
        let ex = 0, ey = 0, ez = 0;
        comp('dc', x[i], y[i], z[i], g); ex += g[0]; ey += g[1]; ez += g[2];
        if (hasRf) { comp('rf', x[i], y[i], z[i], g); ex += cr * g[0]; ey += cr * g[1]; ez += cr * g[2]; }
        if (hasAux) { comp('aux', x[i], y[i], z[i], g); ex += ca * g[0]; ey += ca * g[1]; ez += ca * g[2]; }
        ax[i] += qm[i] * ex; ay[i] += qm[i] * ey; az[i] += qm[i] * ez;
      }
    },
    outside(x, y, z) {
      const f = F();
      return !f.evaluate(x, y, z, buf) || f.electrodeAt(x, y, z) >= 0;
    },
  };
}
