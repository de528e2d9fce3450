// Coupled stepping of an ion ensemble: every ion advances together because the Coulomb field of
// the cloud couples them. Störmer–Verlet in kick–drift–kick form (E. Hairer, C. Lubich,
// G. Wanner, Geometric Numerical Integration, 2nd ed., Springer 2006, Sect. I.1.4):
//   v ← v + (h/2) a(x, t);  x ← x + h v;  v ← v + (h/2) a(x, t + h)
// Second order, time-reversible and symplectic for position-only forces (both the Coulomb field
// and the trap field here), so energy errors stay bounded instead of drifting.
//
// Acceleration of ion i: a_i = (q_i/m_i) (E_cloud(r_i) + E_ext(r_i, t)). Macro-particles of weight
// w carry source charge w·q_i; their own q/m is unchanged (a macro-ion has charge w·q and mass w·m).

import { directField, type ChargeCloud, type FieldOut } from './direct.js';
import { CoulombTree } from './tree.js';
import type { FieldModel } from '../core/field-model.js';

/** Ensemble state, SI, struct of arrays. `alive` = 0 marks an ion removed (hit an electrode). */
export interface Ensemble {
  n: number;
  x: Float64Array; y: Float64Array; z: Float64Array;
  vx: Float64Array; vy: Float64Array; vz: Float64Array;
  /** Mass, kg, and charge, C (signed), of one real ion. */
  mass: Float64Array; charge: Float64Array;
  alive: Uint8Array;
  /**
   * When given: the time, s, at which the stepper removed each ion (left as it was for ions
   * that stay). Removed ions keep the position and velocity they had at that step.
   */
  lostAt?: Float64Array;
}

export function allocateEnsemble(n: number): Ensemble {
  const f = () => new Float64Array(n);
  return { n, x: f(), y: f(), z: f(), vx: f(), vy: f(), vz: f(), mass: f(), charge: f(), alive: new Uint8Array(n).fill(1) };
}

/** Space-charge settings as resolved from a scene (`space_charge:`), SI. */
export interface SpaceChargeSettings {
  method: 'direct' | 'tree';
  /** Real ions per simulated ion (≥ 1 in practice; any positive number allowed). */
  weight: number;
  /** Plummer softening length ε, m. Default: 1e-3 × the mean ion spacing of the starting cloud. */
  softening?: number;
  /** Tree opening angle θ (method tree; default 0.5). */
  theta?: number;
  /** A field solver to use instead of the built-in serial ones (e.g. the worker pool). */
  solver?: FieldSolver;
}

/** Computes the cloud field, V/m, at every ion. */
export interface FieldSolver {
  field(c: ChargeCloud, softening: number, out: FieldOut): void;
}

export const directSolver: FieldSolver = { field: directField };

export function treeSolver(theta = 0.5): FieldSolver {
  const tree = new CoulombTree({ theta });
  return { field: (c, eps, out) => tree.field(c, eps, out) };
}

/** External fields specialised in the kernel (no per-ion callback). */
export type ExternalField =
  | { kind: 'none'; lossRadius?: number }
  | {
      /**
       * A stage's field model (sim/stages/<kind>/field.ts), positions measured from its reference
       * point; an ion the model puts on or past an electrode is removed.
       */
      kind: 'field'; model: FieldModel;
    }
  | {
      /** Adds the external acceleration, m/s², of every ion at time t into ax, ay, az. */
      kind: 'callback';
      addAccel: (t: number, e: Ensemble, ax: Float64Array, ay: Float64Array, az: Float64Array) => void;
      /** Returns true when ion i is lost at its present position. */
      lost?: (i: number, e: Ensemble) => boolean;
    };

/** Mean spacing of the cloud, m: (4π R³/(3N))^{1/3}, R = √(5/3) × RMS radius (uniform sphere). */
export function meanSpacing(e: Ensemble): number {
  let n = 0, cx = 0, cy = 0, cz = 0;
  for (let i = 0; i < e.n; i++) if (e.alive[i]) { n++; cx += e.x[i]; cy += e.y[i]; cz += e.z[i]; }
  if (n < 2) return 0;
  cx /= n; cy /= n; cz /= n;
  let s = 0;
  for (let i = 0; i < e.n; i++) if (e.alive[i]) {
    const dx = e.x[i] - cx, dy = e.y[i] - cy, dz = e.z[i] - cz;
    s += dx * dx + dy * dy + dz * dz;
  }
  const R = Math.sqrt((5 / 3) * (s / n));
  return Math.cbrt((4 * Math.PI * R * R * R) / (3 * n));
}

/** Default softening: 1e-3 × mean spacing a — the field at distance a differs from Coulomb's law
 *  by (3/2) ε²/a² = 1.5e-6 relative, yet a rare very close pair stays finite. */
export function defaultSoftening(e: Ensemble): number {
  return 1e-3 * meanSpacing(e);
}

/** Advances an ensemble with fixed step h; allocate once, call step() repeatedly. */
export class EnsembleStepper {
  t: number;
  readonly softening: number;
  private readonly cloud: ChargeCloud;
  private readonly out: FieldOut;
  private readonly ax: Float64Array; private readonly ay: Float64Array; private readonly az: Float64Array;
  private readonly qm: Float64Array;
  private readonly solver: FieldSolver | null;
  private readonly weight: number;

  constructor(readonly e: Ensemble, readonly h: number, readonly ext: ExternalField,
              sc: SpaceChargeSettings | null, t0 = 0) {
    if (!(h > 0)) throw new RangeError(`step must be > 0 s, got ${h}`);
    const n = e.n;
    this.t = t0;
    this.weight = sc ? sc.weight : 0;
    if (sc && !(sc.weight > 0)) throw new RangeError(`space_charge.weight must be > 0, got ${sc.weight}`);
    this.solver = sc ? (sc.solver ?? (sc.method === 'tree' ? treeSolver(sc.theta ?? 0.5) : directSolver)) : null;
    this.softening = sc ? (sc.softening ?? defaultSoftening(e)) : 0;
    if (!(this.softening >= 0)) throw new RangeError(`space_charge.softening must be ≥ 0 m, got ${this.softening}`);
    this.cloud = { n, x: e.x, y: e.y, z: e.z, qs: new Float64Array(n) };
    this.out = { ex: new Float64Array(n), ey: new Float64Array(n), ez: new Float64Array(n) };
    this.ax = new Float64Array(n); this.ay = new Float64Array(n); this.az = new Float64Array(n);
    this.qm = new Float64Array(n);
    for (let i = 0; i < n; i++) this.qm[i] = e.charge[i] / e.mass[i];
    this.checkLosses();
    this.accel(this.t);
  }

  /** Source charges: w·q for ions in the cloud, 0 for removed ones. */
  private refreshSources(): void {
    const { e, cloud, weight } = this;
    for (let i = 0; i < e.n; i++) cloud.qs[i] = e.alive[i] ? weight * e.charge[i] : 0;
  }

  /** a = (q/m)(E_cloud + E_ext) at time t into ax, ay, az. */
  private accel(t: number): void {
    const { e, ax, ay, az, qm, out } = this;
    const n = e.n;
    if (this.solver) {
      this.refreshSources();
      this.solver.field(this.cloud, this.softening, out);
      for (let i = 0; i < n; i++) { ax[i] = qm[i] * out.ex[i]; ay[i] = qm[i] * out.ey[i]; az[i] = qm[i] * out.ez[i]; }
    } else {
      ax.fill(0); ay.fill(0); az.fill(0);
    }
    const ext = this.ext;
    if (ext.kind === 'field') {
      ext.model.addAcceleration(t, n, e.x, e.y, e.z, qm, ax, ay, az);
    } else if (ext.kind === 'callback') {
      ext.addAccel(t, e, ax, ay, az);
    }
  }

  /** Marks ions outside the electrodes as removed. Returns the number removed now. */
  private checkLosses(): number {
    const { e, ext } = this;
    let lost = 0;
    for (let i = 0; i < e.n; i++) {
      if (!e.alive[i]) continue;
      let out = false;
      if (ext.kind === 'field') {
        out = ext.model.outside(e.x[i], e.y[i], e.z[i]);
      } else if (ext.kind === 'none') {
        if (ext.lossRadius !== undefined) out = e.x[i] ** 2 + e.y[i] ** 2 + e.z[i] ** 2 >= ext.lossRadius ** 2;
      } else if (ext.lost) {
        out = ext.lost(i, e);
      }
      if (out) {
        e.alive[i] = 0;
        if (e.lostAt) e.lostAt[i] = this.t;
        lost++;
      }
    }
    return lost;
  }

  /** One step of length h. Removed ions stay where they were lost. */
  step(): void {
    const { e, ax, ay, az, h } = this;
    const n = e.n, hh = 0.5 * h;
    const { x, y, z, vx, vy, vz, alive } = e;
    for (let i = 0; i < n; i++) {
      if (!alive[i]) continue;
      vx[i] += hh * ax[i]; vy[i] += hh * ay[i]; vz[i] += hh * az[i];
      x[i] += h * vx[i]; y[i] += h * vy[i]; z[i] += h * vz[i];
    }
    this.t += h;
    this.checkLosses();
    this.accel(this.t);
    for (let i = 0; i < n; i++) {
      if (!alive[i]) continue;
      vx[i] += hh * ax[i]; vy[i] += hh * ay[i]; vz[i] += hh * az[i];
    }
  }
}

/** Centroid, RMS size and survivors at recorded times (SI: s, m). */
export interface EnsembleHistory {
  t: Float64Array;
  cx: Float64Array; cy: Float64Array; cz: Float64Array;
  /** RMS size about the centroid along x, y, z, and 3D RMS radius. */
  sx: Float64Array; sy: Float64Array; sz: Float64Array; sr: Float64Array;
  alive: Int32Array;
  /** Softening used, m, and number of steps taken. */
  softening: number;
  steps: number;
}

export interface RunOptions {
  /** End time, s (from t = 0). */
  tEnd: number;
  /** Step, s; the number of steps is ceil(tEnd/h), the last landing on tEnd. */
  h: number;
  external: ExternalField;
  spaceCharge: SpaceChargeSettings | null;
  /** Record every this many steps (default 1); t = 0 and the end are always recorded. */
  recordEvery?: number;
  /** Called after every step (e.g. a spectrum accumulator). */
  onStep?: (t: number, e: Ensemble) => void;
}

/** Runs the ensemble to tEnd in place and returns the centroid / RMS-size history. */
export function runEnsemble(e: Ensemble, o: RunOptions): EnsembleHistory {
  if (!(o.tEnd > 0)) throw new RangeError(`end time must be > 0 s, got ${o.tEnd}`);
  const steps = Math.ceil(o.tEnd / o.h - 1e-9);
  const h = o.tEnd / steps;
  const every = Math.max(1, Math.floor(o.recordEvery ?? 1));
  const nRec = Math.floor(steps / every) + 1 + (steps % every === 0 ? 0 : 1);
  const f = () => new Float64Array(nRec);
  const hist: EnsembleHistory = {
    t: f(), cx: f(), cy: f(), cz: f(), sx: f(), sy: f(), sz: f(), sr: f(), alive: new Int32Array(nRec),
    softening: 0, steps,
  };
  const st = new EnsembleStepper(e, h, o.external, o.spaceCharge);
  hist.softening = st.softening;
  let r = 0;
  record(e, hist, r++, 0);
  for (let s = 1; s <= steps; s++) {
    st.step();
    if (s === steps) st.t = o.tEnd;
    o.onStep?.(st.t, e);
    if (s % every === 0 || s === steps) record(e, hist, r++, st.t);
  }
  return hist;
}

function record(e: Ensemble, hs: EnsembleHistory, r: number, t: number): void {
  const m = cloudMoments(e);
  hs.t[r] = t; hs.cx[r] = m.cx; hs.cy[r] = m.cy; hs.cz[r] = m.cz;
  hs.sx[r] = m.sx; hs.sy[r] = m.sy; hs.sz[r] = m.sz; hs.sr[r] = m.sr; hs.alive[r] = m.n;
}

/** Centroid, RMS sizes about it (per axis and 3D, m) and number of the ions in the cloud. */
export function cloudMoments(e: Ensemble) {
  let n = 0, cx = 0, cy = 0, cz = 0;
  for (let i = 0; i < e.n; i++) if (e.alive[i]) { n++; cx += e.x[i]; cy += e.y[i]; cz += e.z[i]; }
  if (n > 0) { cx /= n; cy /= n; cz /= n; }
  let sx = 0, sy = 0, sz = 0;
  for (let i = 0; i < e.n; i++) if (e.alive[i]) {
    const dx = e.x[i] - cx, dy = e.y[i] - cy, dz = e.z[i] - cz;
    sx += dx * dx; sy += dy * dy; sz += dz * dz;
  }
  const d = Math.max(n, 1);
  return { n, cx, cy, cz, sx: Math.sqrt(sx / d), sy: Math.sqrt(sy / d), sz: Math.sqrt(sz / d), sr: Math.sqrt((sx + sy + sz) / d) };
}

/** Kinetic energy of the ions in the cloud, J, counting each macro-ion as `weight` real ions. */
export function kineticEnergy(e: Ensemble, weight = 1): number {
  let k = 0;
  for (let i = 0; i < e.n; i++) if (e.alive[i]) k += e.mass[i] * (e.vx[i] ** 2 + e.vy[i] ** 2 + e.vz[i] ** 2);
  return 0.5 * weight * k;
}

/** Fields of an IonBatch (sim/core/batch.ts) the ensemble needs; structural. */
export interface BatchLike {
  n: number;
  x: Float64Array; y: Float64Array; z: Float64Array;
  vx: Float64Array; vy: Float64Array; vz: Float64Array;
  mass: Float64Array; charge: Float64Array; fate: Int8Array;
}

/**
 * An Ensemble over a batch's own arrays (positions and velocities are advanced in place);
 * `alive` is taken from fate === 0 (Fate.alive). After the run, markLosses() writes the fate back.
 */
export function ensembleFromBatch(b: BatchLike): Ensemble {
  const alive = new Uint8Array(b.n);
  for (let i = 0; i < b.n; i++) alive[i] = b.fate[i] === 0 ? 1 : 0;
  return { n: b.n, x: b.x, y: b.y, z: b.z, vx: b.vx, vy: b.vy, vz: b.vz, mass: b.mass, charge: b.charge, alive };
}

/** Sets fate = hitCode (Fate.hit = 2) for ions the ensemble lost; returns how many. */
export function markLosses(e: Ensemble, b: BatchLike, hitCode = 2): number {
  let k = 0;
  for (let i = 0; i < e.n; i++) if (!e.alive[i] && b.fate[i] === 0) { b.fate[i] = hitCode; k++; }
  return k;
}
