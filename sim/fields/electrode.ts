// An electrode as a point set: the union of its shapes minus the union of its holes, and the cut
// fraction θ where a grid line from a free node first enters it.

import type { Electrode, GridSymmetry } from './problem.js';
import { solidOf, type Seg, type Solid } from './solids.js';

/** Bisection of a shape without analytic crossings: samples per segment and halvings (2⁻⁴⁰ < 1e-12). */
const SAMPLES = 8, HALVINGS = 40;

export class ElectrodeSet {
  readonly shapes: Solid[];
  readonly holes: Solid[];
  /** Bounds of the union of the shapes. */
  readonly box: number[];
  private readonly cand: number[] = [];
  private readonly seg: Seg = { pa: 0, pb: 0, pc: 0, da: 0, db: 0, dc: 0 };

  constructor(e: Electrode, symmetry: GridSymmetry) {
    this.shapes = e.shapes.map((s) => solidOf(s, symmetry));
    this.holes = e.holes.map((s) => solidOf(s, symmetry));
    const b = [Infinity, Infinity, Infinity, -Infinity, -Infinity, -Infinity];
    for (const s of this.shapes) for (let i = 0; i < 3; i++) { b[i] = Math.min(b[i], s.box[i]); b[i + 3] = Math.max(b[i + 3], s.box[i + 3]); }
    this.box = b;
  }

  /** Inside the closed union of shapes and not strictly inside a hole's closure... (holes are closed too). */
  inside(a: number, b: number, c: number): boolean {
    const B = this.box;
    if (a < B[0] || a > B[3] || b < B[1] || b > B[4] || c < B[2] || c > B[5]) return false;
    let hit = false;
    for (const s of this.shapes) if (inBox(s, a, b, c) && s.inside(a, b, c)) { hit = true; break; }
    if (!hit) return false;
    for (const h of this.holes) if (inBox(h, a, b, c) && h.inside(a, b, c)) return false;
    return true;
  }

  /**
   * θ ∈ (0, 1]: the first point of P→Q inside this electrode, with P outside and Q inside. The
   * candidates of every shape and hole are sorted; between two candidates being inside cannot change,
   * so the first candidate whose following interval is inside is the entry point.
   */
  entry(pa: number, pb: number, pc: number, qa: number, qb: number, qc: number): number {
    const s = this.seg, cand = this.cand;
    s.pa = pa; s.pb = pb; s.pc = pc; s.da = qa - pa; s.db = qb - pb; s.dc = qc - pc;
    cand.length = 0;
    for (const sh of this.shapes) this.collect(sh, cand);
    for (const sh of this.holes) this.collect(sh, cand);
    let n = 0;
    // A root at t = 0 (the free node on the surface of a hole, which is closed) enters at once.
    for (const t of cand) if (t > -1e-12 && t < 1) cand[n++] = Math.max(0, t);
    cand.length = n;
    cand.sort((x, y) => x - y);
    for (let i = 0; i < n; i++) {
      const next = i + 1 < n ? cand[i + 1] : 1;
      if (next - cand[i] <= 1e-15) continue;
      const m = 0.5 * (cand[i] + next);
      if (this.inside(pa + m * s.da, pb + m * s.db, pc + m * s.dc)) return cand[i];
    }
    return 1;
  }

  private collect(sh: Solid, out: number[]): void {
    const s = this.seg;
    const lo = (i: 0 | 1 | 2, p: number, d: number) => Math.min(p, p + d) > sh.box[i + 3] || Math.max(p, p + d) < sh.box[i];
    if (lo(0, s.pa, s.da) || lo(1, s.pb, s.db) || lo(2, s.pc, s.dc)) return;
    if (sh.crossings !== undefined) { sh.crossings(s, out); return; }
    // Bisection where inside changes between samples (a change within one sample step of 1/8 cell is missed).
    let t0 = 0, in0 = sh.inside(s.pa, s.pb, s.pc);
    for (let k = 1; k <= SAMPLES; k++) {
      const t1 = k / SAMPLES, in1 = sh.inside(s.pa + t1 * s.da, s.pb + t1 * s.db, s.pc + t1 * s.dc);
      if (in1 !== in0) {
        let a = t0, b = t1;
        for (let h = 0; h < HALVINGS; h++) {
          const m = 0.5 * (a + b);
          if (sh.inside(s.pa + m * s.da, s.pb + m * s.db, s.pc + m * s.dc) === in0) a = m; else b = m;
        }
        out.push(in0 ? a : b);
      }
      t0 = t1; in0 = in1;
    }
  }
}

function inBox(s: Solid, a: number, b: number, c: number): boolean {
  const B = s.box;
  return a >= B[0] && a <= B[3] && b >= B[1] && b <= B[4] && c >= B[2] && c <= B[5];
}
