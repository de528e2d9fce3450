// All ions of a space-charge run through the composed stages together, each in its own stage's
// field, with the Coulomb field of all the others. One step of length h (Strang splitting of
// the stages' fields and the cloud's; E. Hairer, C. Lubich, G. Wanner, Geometric Numerical
// Integration, 2nd ed., Springer 2006, Sect. II.5, and the kick–drift–kick Störmer–Verlet of
// Sect. I.1.4 for the smooth fields):
//   v ← v + (h/2)·a(x, t),   a = (q/m)(E_cloud + E_kick of the ion's stage)
//   flight over h: straight, or under the uniform axial field of the stage in closed form, with
//     the exact crossing times of the stage planes (sim/stages/shared/uniform-kernel.ts's roots);
//     an ion crossing a plane meets the plates there and the exit rules of exits.ts
//   the electrode test of the ion's stage (sim/core/coupling.ts) at t + h
//   v ← v + (h/2)·a(x, t + h)
//   gas: each ion's own collision step over h (its stage's gas, its own random stream)
// The kinds answer every question through their coupling (sim/stages/kind.ts), so a new kind joins
// by giving one. Positions are kept relative to the frame origin zFrame (the first stage's field
// reference), which is the stage-local frame of a scene of one stage.

import type { Scene } from '../scene/types.js';
import { Fate, type IonBatch } from '../core/batch.js';
import { Place, type StageCoupling } from '../core/coupling.js';
import type { StageKind } from '../stages/kind.js';
import { kindOf, rfOf } from '../stages/registry.js';
import { crossingTime } from '../stages/shared/uniform-kernel.js';
import type { ChargeCloud, FieldOut } from '../spacecharge/direct.js';
import type { Ensemble, FieldSolver } from '../spacecharge/ensemble-step.js';
import type { GasFactory } from './gas-hooks.js';
import type { TrajectoryRecorder } from './recorder.js';
import type { EnsembleHistory } from './history.js';
import { detectorOf } from '../scene/detector.js';
import { afterLeaving, fateOf } from './exits.js';
import { cloudScales, coarseStepWarning } from './coupled-step.js';
import { rfPhase } from './track.js';

/** Steps between checks of the plasma period against the step (an O(N) pass over the cloud). */
const SCALE_CHECK_STEPS = 64;
/** Wall time between returns to the event loop (stop signals, progress), ms. */
const YIELD_MS = 200;

export interface FlightOptions {
  h: number;
  steps: number;
  solver: FieldSolver;
  softening: number;
  weight: number;
  gasFor: GasFactory;
  rec: TrajectoryRecorder | null;
  hist: EnsembleHistory | null;
  /** After every step, positions relative to zFrame (the trap figures' spectra sample here). */
  onStep?: (t: number, e: Ensemble) => void;
  /** Asked between steps; true stops the run where it is (the ions in flight stay alive). */
  stopped?: () => boolean;
  progress?: (step: number, steps: number) => void;
}

export interface FlightEnd {
  /** Time the run reached, s (max_time unless stopped). */
  t: number;
  stoppedEarly: boolean;
  /** End time of each ion, s: its fate's time, or the time reached. */
  endTime: Float64Array;
  /** RF phase as each ion entered its first RF stage (the run clock: coupled ions share it), NaN when it never did. */
  entryPhase: Float64Array;
  ionSteps: number;
  warnings: string[];
}

export class CoupledFlight {
  readonly n: number;
  readonly zFrame: number;
  readonly ensemble: Ensemble;
  private readonly couplings: StageCoupling[];
  private readonly kinds: StageKind[];
  /** Per stage: offset of its stage-local origin from the frame, and its planes, in frame z. */
  private readonly off: Float64Array; private readonly zs: Float64Array; private readonly ze: Float64Array;
  private readonly qm: Float64Array;
  private readonly ax: Float64Array; private readonly ay: Float64Array; private readonly az: Float64Array;
  /** 1 while the ion is in a field-free part of its stage (Place.free). */
  private readonly free: Uint8Array;
  private readonly cloud: ChargeCloud; private readonly out: FieldOut; private readonly slot: Int32Array;
  private readonly gx: Float64Array; private readonly gy: Float64Array; private readonly gz: Float64Array;
  private readonly gqm: Float64Array;
  private readonly gax: Float64Array; private readonly gay: Float64Array; private readonly gaz: Float64Array;
  private readonly detector: number;
  readonly endTime: Float64Array;
  readonly entryPhase: Float64Array;
  private t = 0;

  /** `b`: the started ions (lab z, fate alive or hit, stage set); advanced in place. */
  constructor(private readonly scene: Scene, private readonly b: IonBatch) {
    const n = b.n, S = scene.stages.length;
    this.n = n;
    this.kinds = scene.stages.map(kindOf);
    this.couplings = scene.stages.map((st, i) => {
      const c = this.kinds[i].coupling?.(st);
      if (c === undefined) throw new Error(`stage ${i} has no coupling (checked before the run)`);
      return c;
    });
    const c0 = this.couplings[0];
    this.zFrame = c0.kick !== null ? c0.kick.zRef : scene.stages[0].zStart;
    this.off = new Float64Array(S); this.zs = new Float64Array(S); this.ze = new Float64Array(S);
    scene.stages.forEach((st, s) => {
      const c = this.couplings[s];
      this.off[s] = (c.kick !== null ? c.kick.zRef : st.zStart) - this.zFrame;
      this.zs[s] = st.zStart - this.zFrame; this.ze[s] = st.zEnd - this.zFrame;
    });
    const f = () => new Float64Array(n);
    this.qm = f(); this.ax = f(); this.ay = f(); this.az = f();
    this.gx = f(); this.gy = f(); this.gz = f(); this.gqm = f(); this.gax = f(); this.gay = f(); this.gaz = f();
    this.free = new Uint8Array(n);
    this.cloud = { n: 0, x: f(), y: f(), z: f(), qs: f() };
    this.out = { ex: f(), ey: f(), ez: f() };
    this.slot = new Int32Array(n);
    this.endTime = f();
    this.entryPhase = f().fill(NaN);
    this.detector = detectorOf(scene).radius;
    const alive = new Uint8Array(n);
    for (let i = 0; i < n; i++) {
      this.qm[i] = b.charge[i] / b.mass[i];
      b.z[i] -= this.zFrame;
      alive[i] = b.fate[i] === Fate.alive ? 1 : 0;
    }
    this.ensemble = { n, x: b.x, y: b.y, z: b.z, vx: b.vx, vy: b.vy, vz: b.vz, mass: b.mass, charge: b.charge, alive };
  }

  /** Lab z back into the batch (call once, after run). */
  private restoreLab(): void {
    for (let i = 0; i < this.n; i++) this.b.z[i] += this.zFrame;
  }

  async run(o: FlightOptions): Promise<FlightEnd> {
    const { b, n, ensemble: e } = this;
    const warnings: string[] = [];
    const hh = 0.5 * o.h;
    let ionSteps = 0;
    for (let i = 0; i < n; i++) {
      if (!e.alive[i]) continue;
      this.enterRf(i, b.stage[i], 0);
      o.rec?.push(b.index[i], 0, b.x[i], b.y[i], b.z[i] + this.zFrame, b.vx[i], b.vy[i], b.vz[i]);
    }
    this.placeAll(o.rec);
    this.sampleHistory(o.hist, 0);
    this.accel(o, 0);
    let warned = false;
    let lastYield = performance.now();
    let stoppedEarly = false;
    let k = 0;
    for (k = 1; k <= o.steps; k++) {
      const { x, y, z, vx, vy, vz, alive } = e;
      const { ax, ay, az } = this;
      for (let i = 0; i < n; i++) {
        if (!alive[i]) continue;
        vx[i] += hh * ax[i]; vy[i] += hh * ay[i]; vz[i] += hh * az[i];
        ionSteps++;
      }
      const t0 = this.t;
      for (let i = 0; i < n; i++) if (alive[i]) this.advance(i, t0, o.h, o.rec);
      this.t += o.h;
      this.placeAll(o.rec);
      this.accel(o, this.t);
      for (let i = 0; i < n; i++) {
        if (!alive[i]) continue;
        vx[i] += hh * ax[i]; vy[i] += hh * ay[i]; vz[i] += hh * az[i];
      }
      this.gas(o);
      if (k === o.steps) this.t = this.scene.run.maxTime;
      const tk = this.t;
      o.onStep?.(tk, e);
      if (o.rec !== null && this.scene.run.recordEvery > 0 && k % this.scene.run.recordEvery === 0) {
        for (let i = 0; i < n; i++) if (alive[i]) o.rec.push(b.index[i], tk, x[i], y[i], z[i] + this.zFrame, vx[i], vy[i], vz[i]);
      }
      this.sampleHistory(o.hist, tk);
      if (!warned && k % SCALE_CHECK_STEPS === 0) {
        const w = coarseStepWarning(o.h, cloudScales(e, o.weight), tk);
        if (w) { warnings.push(w); warned = true; }
      }
      if (performance.now() - lastYield > YIELD_MS) {
        o.progress?.(k, o.steps);
        await new Promise((r) => setImmediate(r));
        lastYield = performance.now();
        if (o.stopped?.()) { stoppedEarly = k < o.steps; break; }
      }
    }
    for (let i = 0; i < n; i++) if (e.alive[i]) {
      this.endTime[i] = this.t;
      o.rec?.push(b.index[i], this.t, b.x[i], b.y[i], b.z[i] + this.zFrame, b.vx[i], b.vy[i], b.vz[i]);
    }
    this.restoreLab();
    return { t: this.t, stoppedEarly, endTime: this.endTime, entryPhase: this.entryPhase, ionSteps, warnings };
  }

  /** The RF phase of the first RF stage an ion enters, on the shared run clock. */
  private enterRf(i: number, s: number, t: number): void {
    if (this.entryPhase[i] === this.entryPhase[i]) return;
    const rf = rfOf(this.scene.stages[s]);
    if (rf !== undefined) this.entryPhase[i] = rfPhase(rf.frequency, rf.phase, t);
  }

  /** Ion i's flight over h from t0: straight, or in closed form under its uniform stage's field. */
  private advance(i: number, t0: number, h: number, rec: TrajectoryRecorder | null): void {
    const b = this.b;
    let s = b.stage[i];
    let rem = h, el = 0;
    let x = b.x[i], y = b.y[i], z = b.z[i], vz = b.vz[i];
    const vx = b.vx[i], vy = b.vy[i];
    for (;;) {
      const c = this.couplings[s];
      const a = c.kick === null ? this.qm[i] * c.flightEz : 0;
      const tf = crossingTime(z, vz, a, this.ze[s]);
      const tb = crossingTime(z, vz, a, this.zs[s]);
      const dt = Math.min(tf, tb, rem);
      x += vx * dt; y += vy * dt; z += dt * (vz + 0.5 * a * dt); vz += a * dt;
      if (dt === rem && !(tf === rem || tb === rem)) break;
      // Through a plane of stage s: its plate, the exit rules, then the plate of the stage entered.
      const forward = tf <= tb;
      z = forward ? this.ze[s] : this.zs[s];
      el += dt; rem -= dt;
      const tc = t0 + el;
      rec?.push(b.index[i], tc, x, y, z + this.zFrame, vx, vy, vz);
      let next: number = c.plateBlocks(x, y, forward) ? -1 - Fate.hit : afterLeaving(this.scene.stages, this.kinds, s, forward, x, y, this.detector);
      if (next >= 0 && this.couplings[next].plateBlocks(x, y, !forward)) next = -1 - Fate.hit;
      if (next < 0) {
        b.x[i] = x; b.y[i] = y; b.z[i] = z; b.vz[i] = vz;
        this.remove(i, fateOf(next), tc);
        return;
      }
      s = next;
      b.stage[i] = s;
      this.free[i] = 0;
      this.enterRf(i, s, tc);
      if (!(rem > 0)) break;
    }
    b.x[i] = x; b.y[i] = y; b.z[i] = z; b.vz[i] = vz;
  }

  private remove(i: number, fate: number, t: number): void {
    this.b.fate[i] = fate;
    this.ensemble.alive[i] = 0;
    this.endTime[i] = t;
  }

  /** The electrode test of every ion in flight, at the present time. */
  private placeAll(rec: TrajectoryRecorder | null): void {
    const { b, ensemble: e } = this;
    for (let i = 0; i < this.n; i++) {
      if (!e.alive[i]) continue;
      const s = b.stage[i];
      const p = this.couplings[s].place(b.x[i], b.y[i], b.z[i] - this.off[s]);
      if (p === Place.hit || p === Place.detected) {
        rec?.push(b.index[i], this.t, b.x[i], b.y[i], b.z[i] + this.zFrame, b.vx[i], b.vy[i], b.vz[i]);
        this.remove(i, p === Place.hit ? Fate.hit : Fate.detected, this.t);
      } else this.free[i] = p === Place.free ? 1 : 0;
    }
  }

  /** a = (q/m)(E_cloud + E_kick) of every ion in flight at time t. */
  private accel(o: FlightOptions, t: number): void {
    const { b, ensemble: e, cloud, out, slot, qm, ax, ay, az } = this;
    let m = 0;
    for (let i = 0; i < this.n; i++) {
      if (!e.alive[i]) continue;
      cloud.x[m] = b.x[i]; cloud.y[m] = b.y[i]; cloud.z[m] = b.z[i];
      cloud.qs[m] = o.weight * b.charge[i];
      slot[m++] = i;
    }
    cloud.n = m;
    if (m > 0) o.solver.field(cloud, o.softening, out);
    for (let k = 0; k < m; k++) {
      const i = slot[k];
      ax[i] = qm[i] * out.ex[k]; ay[i] = qm[i] * out.ey[k]; az[i] = qm[i] * out.ez[k];
    }
    // Each kick stage's field on the ions inside it, gathered into stage-local coordinates.
    for (let s = 0; s < this.couplings.length; s++) {
      const model = this.couplings[s].kick;
      if (model === null) continue;
      const off = this.off[s];
      let g = 0;
      for (let k = 0; k < m; k++) {
        const i = slot[k];
        if (b.stage[i] !== s || this.free[i]) continue;
        this.gx[g] = b.x[i]; this.gy[g] = b.y[i]; this.gz[g] = b.z[i] - off; this.gqm[g] = qm[i];
        this.gax[g] = 0; this.gay[g] = 0; this.gaz[g] = 0;
        g++;
      }
      if (g === 0) continue;
      model.addAcceleration(t, g, this.gx, this.gy, this.gz, this.gqm, this.gax, this.gay, this.gaz);
      g = 0;
      for (let k = 0; k < m; k++) {
        const i = slot[k];
        if (b.stage[i] !== s || this.free[i]) continue;
        ax[i] += this.gax[g]; ay[i] += this.gay[g]; az[i] += this.gaz[g];
        g++;
      }
    }
  }

  /** Each ion's own gas step over h, in its stage's gas (stage block, else the scene's). */
  private gas(o: FlightOptions): void {
    const { b, ensemble: e } = this;
    for (let i = 0; i < this.n; i++) {
      if (!e.alive[i]) continue;
      const step = o.gasFor(b.stage[i]).step;
      if (step !== null) step(b, i, o.h);
    }
  }

  /** Ensemble history at every grid time reached (the first step at or after it, as the kernels do). */
  private nextHist = 0;
  private sampleHistory(hist: EnsembleHistory | null, t: number): void {
    if (hist === null) return;
    const { b, ensemble: e } = this;
    while (this.nextHist < hist.points && hist.timeOf(this.nextHist) <= t) {
      for (let i = 0; i < this.n; i++) {
        if (!e.alive[i]) continue;
        hist.population = b.population[i];
        hist.add(this.nextHist, b.mass[i], b.x[i], b.y[i], b.z[i] + this.zFrame, b.vx[i], b.vy[i], b.vz[i]);
      }
      this.nextHist++;
    }
  }
}
