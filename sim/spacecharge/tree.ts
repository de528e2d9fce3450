// Barnes–Hut octree for the Coulomb field of an ion cloud (J. Barnes & P. Hut, Nature 324, 446,
// 1986), with monopole, dipole and quadrupole moments about each cell's centre of |charge|
// (multipole expansion: J. D. Jackson, Classical Electrodynamics, 3rd ed., eqs. 4.9–4.10; the
// quadrupole tensor is the traceless Q_ab = Σ q (3 y_a y_b − y² δ_ab)). A cell is used whole when
//   |r − c| > s/θ + δ
// with s the cell side, c its expansion centre and δ the distance from the box centre to c — the
// δ term guards against a charge centre near the cell edge (J. Barnes, J. Comput. Phys. 87, 161,
// 1990). Leaves hold up to `leafSize` ions and are summed directly, with the same Plummer
// softening as direct.ts. Buffers grow with N and are reused; no allocation in a steady state.
//
// The ions of one leaf share one traversal (Barnes 1990's grouping, the test widened by the
// leaf's radius). Cells far from the whole leaf enter a second-order local expansion about the
// leaf's centre (field, gradient and second derivatives, the Cartesian Taylor form of the fast
// multipole method: L. Greengard & V. Rokhlin, J. Comput. Phys. 73, 325, 1987; W. Dehnen,
// J. Comput. Phys. 179, 27, 2002 — both cited from memory), evaluated once per ion; the cells in
// between are summed ion by ion through their multipoles. Terms kept: every product of source
// and local order up to 2 (monopole to second derivatives, dipole to gradient, quadrupole to the
// field); the dipole about the centre of |charge| vanishes for ions of one sign.
//
// Per target, the lists and the order of its sum depend only on the positions, so results are
// the same for any split of targets over workers.

import type { ChargeCloud, FieldOut } from './direct.js';
import { COULOMB_K } from './direct.js';

export interface TreeOptions {
  /** Opening angle θ (default 0.5). */
  theta?: number;
  /** Largest number of ions in a leaf (default 32: on the 20,000-ion TOF packet of test/bench/spacecharge.bench.ts at θ = 0.5, 1.2× faster than 16 and 1.4× faster than 8, force error 2.1e-4 RMS against 3.3e-4 at 8). */
  leafSize?: number;
  /** Use quadrupole moments (default true); false gives monopole + dipole only. */
  quadrupole?: boolean;
}

const MAX_DEPTH = 40;
/** Nodes per chunk of work when threads share the leaves: ~300 chunks at N = 20,000, so uneven leaf costs even out. */
const LEAF_CHUNK = 8;

export class CoulombTree {
  readonly theta: number;
  readonly leafSize: number;
  readonly quadrupole: boolean;
  private cap = 0;          // node capacity
  private nCap = 0;         // ion capacity
  nodes = 0;
  // Per node.
  private lo = new Int32Array(0); private hi = new Int32Array(0);
  private first = new Int32Array(0); private nch = new Int32Array(0);
  private depth = new Int32Array(0);
  private bx = new Float64Array(0); private by = new Float64Array(0); private bz = new Float64Array(0);
  private half = new Float64Array(0);
  private crit2 = new Float64Array(0);
  private absq = new Float64Array(0);
  private mq = new Float64Array(0);
  private mx = new Float64Array(0); private my = new Float64Array(0); private mz = new Float64Array(0);
  private px = new Float64Array(0); private py = new Float64Array(0); private pz = new Float64Array(0);
  private qxx = new Float64Array(0); private qyy = new Float64Array(0); private qzz = new Float64Array(0);
  private qxy = new Float64Array(0); private qxz = new Float64Array(0); private qyz = new Float64Array(0);
  // Per ion, in tree order.
  private perm = new Int32Array(0); private tmp = new Int32Array(0); private oct = new Int8Array(0);
  private sx = new Float64Array(0); private sy = new Float64Array(0); private sz = new Float64Array(0);
  private sq = new Float64Array(0);
  private stack = new Int32Array(8 * MAX_DEPTH + 16);
  private counts = new Int32Array(8); private start = new Int32Array(8); private fill = new Int32Array(8);

  constructor(opts: TreeOptions = {}) {
    this.theta = opts.theta ?? 0.5;
    this.leafSize = Math.max(1, opts.leafSize ?? 32);
    this.quadrupole = opts.quadrupole ?? true;
    if (!(this.theta >= 0 && this.theta < 2)) throw new RangeError(`tree opening angle θ must be in [0, 2), got ${this.theta}`);
  }

  private ensureIons(n: number): void {
    if (n <= this.nCap) return;
    const c = Math.max(n, this.nCap * 2);
    this.perm = new Int32Array(c); this.tmp = new Int32Array(c); this.oct = new Int8Array(c);
    this.sx = new Float64Array(c); this.sy = new Float64Array(c); this.sz = new Float64Array(c);
    this.sq = new Float64Array(c);
    this.nCap = c;
  }

  private ensureNodes(m: number): void {
    if (m <= this.cap) return;
    const c = Math.max(m, this.cap * 2, 64);
    const gi = (a: Int32Array) => { const b = new Int32Array(c); b.set(a); return b; };
    const gf = (a: Float64Array) => { const b = new Float64Array(c); b.set(a); return b; };
    this.lo = gi(this.lo); this.hi = gi(this.hi); this.first = gi(this.first); this.nch = gi(this.nch);
    this.depth = gi(this.depth);
    this.bx = gf(this.bx); this.by = gf(this.by); this.bz = gf(this.bz); this.half = gf(this.half);
    this.crit2 = gf(this.crit2); this.absq = gf(this.absq); this.mq = gf(this.mq);
    this.mx = gf(this.mx); this.my = gf(this.my); this.mz = gf(this.mz);
    this.px = gf(this.px); this.py = gf(this.py); this.pz = gf(this.pz);
    this.qxx = gf(this.qxx); this.qyy = gf(this.qyy); this.qzz = gf(this.qzz);
    this.qxy = gf(this.qxy); this.qxz = gf(this.qxz); this.qyz = gf(this.qyz);
    this.cap = c;
  }

  /** Build the tree over the cloud's current positions and charges. */
  build(c: ChargeCloud): void {
    const n = c.n;
    this.ensureIons(n);
    this.ensureNodes(Math.max(64, (4 * n) / this.leafSize + 16));
    const { x, y, z } = c;
    let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity, z0 = Infinity, z1 = -Infinity;
    for (let i = 0; i < n; i++) {
      const xi = x[i], yi = y[i], zi = z[i];
      if (xi < x0) x0 = xi; if (xi > x1) x1 = xi;
      if (yi < y0) y0 = yi; if (yi > y1) y1 = yi;
      if (zi < z0) z0 = zi; if (zi > z1) z1 = zi;
      this.perm[i] = i;
    }
    if (n === 0) { this.nodes = 0; return; }
    const h0 = 0.5 * Math.max(x1 - x0, y1 - y0, z1 - z0) * (1 + 1e-12) + 1e-300;
    this.nodes = 1;
    this.lo[0] = 0; this.hi[0] = n; this.depth[0] = 0;
    this.bx[0] = 0.5 * (x0 + x1); this.by[0] = 0.5 * (y0 + y1); this.bz[0] = 0.5 * (z0 + z1); this.half[0] = h0;
    // Split nodes in creation order; children of a node are stored consecutively.
    const perm = this.perm, tmp = this.tmp, oct = this.oct;
    const counts = this.counts, start = this.start, fill = this.fill;
    for (let k = 0; k < this.nodes; k++) {
      const a = this.lo[k], b = this.hi[k];
      this.first[k] = 0; this.nch[k] = 0;
      if (b - a <= this.leafSize || this.depth[k] >= MAX_DEPTH) continue;
      const cx = this.bx[k], cy = this.by[k], cz = this.bz[k], h = this.half[k];
      counts.fill(0);
      for (let p = a; p < b; p++) {
        const i = perm[p];
        const o = (x[i] >= cx ? 1 : 0) | (y[i] >= cy ? 2 : 0) | (z[i] >= cz ? 4 : 0);
        oct[p] = o; counts[o]++;
      }
      let nonEmpty = 0;
      for (let o = 0; o < 8; o++) if (counts[o] > 0) nonEmpty++;
      this.ensureNodes(this.nodes + nonEmpty);
      // Counting sort of the range by octant (stable, so the order is a function of positions only).
      let s = a;
      for (let o = 0; o < 8; o++) { start[o] = s; fill[o] = s; s += counts[o]; }
      for (let p = a; p < b; p++) tmp[fill[oct[p]]++] = perm[p];
      for (let p = a; p < b; p++) perm[p] = tmp[p];
      this.first[k] = this.nodes;
      const hh = 0.5 * h;
      for (let o = 0; o < 8; o++) {
        if (counts[o] === 0) continue;
        const m = this.nodes++;
        this.lo[m] = start[o]; this.hi[m] = start[o] + counts[o]; this.depth[m] = this.depth[k] + 1;
        this.bx[m] = cx + ((o & 1) ? hh : -hh);
        this.by[m] = cy + ((o & 2) ? hh : -hh);
        this.bz[m] = cz + ((o & 4) ? hh : -hh);
        this.half[m] = hh;
      }
      this.nch[k] = nonEmpty;
    }
    // Ions in tree order, for contiguous leaf sums.
    for (let p = 0; p < n; p++) {
      const i = perm[p];
      this.sx[p] = x[i]; this.sy[p] = y[i]; this.sz[p] = z[i]; this.sq[p] = c.qs[i];
    }
    this.moments();
  }

  /** Multipole moments of every node from its own ions (O(N · depth)). */
  private moments(): void {
    const { sx, sy, sz, sq } = this;
    const th = this.theta;
    for (let k = 0; k < this.nodes; k++) {
      const a = this.lo[k], b = this.hi[k];
      let Q = 0, W = 0, cx = 0, cy = 0, cz = 0;
      for (let p = a; p < b; p++) {
        const q = sq[p], w = Math.abs(q);
        Q += q; W += w; cx += w * sx[p]; cy += w * sy[p]; cz += w * sz[p];
      }
      if (W > 0) { cx /= W; cy /= W; cz /= W; } else { cx = this.bx[k]; cy = this.by[k]; cz = this.bz[k]; }
      let dpx = 0, dpy = 0, dpz = 0, xx = 0, yy = 0, zz = 0, xy = 0, xz = 0, yz = 0;
      for (let p = a; p < b; p++) {
        const q = sq[p], dx = sx[p] - cx, dy = sy[p] - cy, dz = sz[p] - cz;
        dpx += q * dx; dpy += q * dy; dpz += q * dz;
        const d2 = dx * dx + dy * dy + dz * dz;
        xx += q * (3 * dx * dx - d2); yy += q * (3 * dy * dy - d2); zz += q * (3 * dz * dz - d2);
        xy += q * 3 * dx * dy; xz += q * 3 * dx * dz; yz += q * 3 * dy * dz;
      }
      this.absq[k] = W; this.mq[k] = Q; this.mx[k] = cx; this.my[k] = cy; this.mz[k] = cz;
      this.px[k] = dpx; this.py[k] = dpy; this.pz[k] = dpz;
      this.qxx[k] = xx; this.qyy[k] = yy; this.qzz[k] = zz; this.qxy[k] = xy; this.qxz[k] = xz; this.qyz[k] = yz;
      const ddx = cx - this.bx[k], ddy = cy - this.by[k], ddz = cz - this.bz[k];
      const delta = Math.sqrt(ddx * ddx + ddy * ddy + ddz * ddz);
      // θ = 0 opens every cell: the tree then reproduces the direct sum.
      const rc = th > 0 ? (2 * this.half[k]) / th + delta : Infinity;
      this.crit2[k] = rc * rc;
    }
  }

  /**
   * Field, V/m, at targets p ∈ [a, b) in tree order (pass 0, n for all), written at the ions'
   * own indices in out. build() must have been called on the same positions.
   *
   * One traversal per leaf, not per ion (Barnes 1990's grouping): the leaf's ions lie within
   * r_g of their box centre g, and a cell is taken whole when |g − c| > s/θ + δ + r_g, which
   * implies the per-ion test for every ion of the leaf (triangle inequality), so the error is no
   * larger than per-ion traversal's. The accepted cells' moments and the near leaves' ions are
   * packed once into flat lists that all the leaf's ions then sum, in list order: each target's
   * sum depends on the positions only, never on [a, b).
   */
  fieldRange(softening: number, a: number, b: number, out: FieldOut): void {
    const eps2 = softening * softening;
    if (this.nodes === 0) return;
    for (let k = 0; k < this.nodes; k++) {
      if (this.nch[k] !== 0) continue;
      const lo = this.lo[k], hi = this.hi[k];
      if (hi <= a || lo >= b) continue;
      this.interactions(k, eps2);
      this.sumLeaf(k, Math.max(lo, a), Math.min(hi, b), eps2, out);
    }
  }

  /** Chunks of LEAF_CHUNK nodes that fieldChunk takes, for threads that share one tree's leaves. */
  get chunks(): number {
    return Math.ceil(this.nodes / LEAF_CHUNK);
  }

  /** Field, V/m, at the ions of the leaves among nodes of chunk c, written at their own indices in out; eps2 the softening squared. */
  fieldChunk(eps2: number, c: number, out: FieldOut): void {
    for (let k = c * LEAF_CHUNK, e = Math.min(this.nodes, k + LEAF_CHUNK); k < e; k++) {
      if (this.nch[k] !== 0) continue;
      this.interactions(k, eps2);
      this.sumLeaf(k, this.lo[k], this.hi[k], eps2, out);
    }
  }

  // Interaction lists of one leaf: far cells, 13 doubles each (centre, charge, dipole, quadrupole),
  // and near ions outside the leaf, 4 doubles each (position, charge).
  private far = new Float64Array(13 * 256); private nFar = 0;
  private near = new Float64Array(4 * 1024); private nNear = 0;
  // The leaf's local expansion: centre g, field, gradient (6) and second derivatives (10) there.
  private local = new Float64Array(22);
  /** Running field sums of one leaf's targets between the passes of sumLeaf. */
  private acc = new Float64Array(3 * 64);

  private interactions(leaf: number, eps2: number): void {
    const { sx, sy, sz, sq, stack, lo, hi, first, nch, crit2, absq, mq, mx, my, mz, px, py, pz } = this;
    const quad = this.quadrupole;
    const { qxx, qyy, qzz, qxy, qxz, qyz } = this;
    // Group centre and radius from the leaf's own ions (its box may be much larger than they are).
    let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity, z0 = Infinity, z1 = -Infinity;
    for (let p = lo[leaf], e = hi[leaf]; p < e; p++) {
      const xp = sx[p], yp = sy[p], zp = sz[p];
      if (xp < x0) x0 = xp; if (xp > x1) x1 = xp;
      if (yp < y0) y0 = yp; if (yp > y1) y1 = yp;
      if (zp < z0) z0 = zp; if (zp > z1) z1 = zp;
    }
    const gx = 0.5 * (x0 + x1), gy = 0.5 * (y0 + y1), gz = 0.5 * (z0 + z1);
    let rg2 = 0;
    for (let p = lo[leaf], e = hi[leaf]; p < e; p++) {
      const dx = sx[p] - gx, dy = sy[p] - gy, dz = sz[p] - gz;
      const d2 = dx * dx + dy * dy + dz * dz;
      if (d2 > rg2) rg2 = d2;
    }
    // Rounding in the triangle inequality: a relative margin far below any θ of use.
    const rg = Math.sqrt(rg2) * (1 + 1e-12);
    // A cell farther than s/θ + δ + r_g + r_g/θ enters the leaf's local expansion about g: every
    // target is then within θ/(1 + θ)·R of g (1/3 of R at θ = 0.5), a ratio below the θ the
    // opening test allows a source cell.
    const rgl = this.theta > 0 ? rg / this.theta : Infinity;
    let ex = 0, ey = 0, ez = 0, gxx = 0, gyy = 0, gzz = 0, gxy = 0, gxz = 0, gyz = 0;
    let hxxx = 0, hyyy = 0, hzzz = 0, hxxy = 0, hxxz = 0, hxyy = 0, hyyz = 0, hxzz = 0, hyzz = 0, hxyz = 0;
    let far = this.far, near = this.near, nFar = 0, nNear = 0;
    let sp = 0;
    stack[sp++] = 0;
    while (sp > 0) {
      const k = stack[--sp];
      if (absq[k] === 0 || k === leaf) continue; // empty cell (removed ions only); own leaf summed apart
      const Rx = gx - mx[k], Ry = gy - my[k], Rz = gz - mz[k];
      const R2 = Rx * Rx + Ry * Ry + Rz * Rz;
      const rc = Math.sqrt(crit2[k]) + rg;
      const rl = rc + rgl;
      if (R2 > rl * rl) {
        // Far enough for the leaf's local expansion: this cell's field and its derivatives at g.
        const inv2 = 1 / (R2 + eps2), inv = Math.sqrt(inv2);
        const inv3 = inv * inv2, inv5 = inv3 * inv2, inv7 = inv5 * inv2;
        const q = mq[k], dx = px[k], dy = py[k], dz = pz[k];
        const pR = dx * Rx + dy * Ry + dz * Rz;
        let sR = q * inv3 + 3 * pR * inv5;
        let fx = -dx * inv3, fy = -dy * inv3, fz = -dz * inv3;
        if (quad) {
          const QRx = qxx[k] * Rx + qxy[k] * Ry + qxz[k] * Rz;
          const QRy = qxy[k] * Rx + qyy[k] * Ry + qyz[k] * Rz;
          const QRz = qxz[k] * Rx + qyz[k] * Ry + qzz[k] * Rz;
          sR += 2.5 * (Rx * QRx + Ry * QRy + Rz * QRz) * inv7;
          fx -= QRx * inv5; fy -= QRy * inv5; fz -= QRz * inv5;
        }
        ex += fx + sR * Rx; ey += fy + sR * Ry; ez += fz + sR * Rz;
        // ∂_b E_a: monopole q(δ_ab/s³ − 3R_aR_b/s⁵); dipole 3(p_aR_b + p_bR_a + (p·R)δ_ab)/s⁵ − 15(p·R)R_aR_b/s⁷.
        const a3 = q * inv3 + 3 * pR * inv5, b5 = 3 * q * inv5 + 15 * pR * inv7, d5 = 3 * inv5;
        gxx += a3 - b5 * Rx * Rx + 2 * d5 * dx * Rx;
        gyy += a3 - b5 * Ry * Ry + 2 * d5 * dy * Ry;
        gzz += a3 - b5 * Rz * Rz + 2 * d5 * dz * Rz;
        gxy += d5 * (dx * Ry + dy * Rx) - b5 * Rx * Ry;
        gxz += d5 * (dx * Rz + dz * Rx) - b5 * Rx * Rz;
        gyz += d5 * (dy * Rz + dz * Ry) - b5 * Ry * Rz;
        // ∂_b∂_c E_a of the monopole: 15q R_aR_bR_c/s⁷ − 3q(δ_ab R_c + δ_ac R_b + δ_bc R_a)/s⁵.
        const c7 = 15 * q * inv7, m5 = 3 * q * inv5;
        hxxx += Rx * (c7 * Rx * Rx - 3 * m5); hyyy += Ry * (c7 * Ry * Ry - 3 * m5); hzzz += Rz * (c7 * Rz * Rz - 3 * m5);
        hxxy += Ry * (c7 * Rx * Rx - m5); hxxz += Rz * (c7 * Rx * Rx - m5);
        hxyy += Rx * (c7 * Ry * Ry - m5); hyyz += Rz * (c7 * Ry * Ry - m5);
        hxzz += Rx * (c7 * Rz * Rz - m5); hyzz += Ry * (c7 * Rz * Rz - m5);
        hxyz += c7 * Rx * Ry * Rz;
      } else if (R2 > rc * rc) {
        if (13 * (nFar + 1) > far.length) { const g = new Float64Array(2 * far.length); g.set(far); far = this.far = g; }
        const o = 13 * nFar++;
        far[o] = mx[k]; far[o + 1] = my[k]; far[o + 2] = mz[k]; far[o + 3] = mq[k];
        far[o + 4] = px[k]; far[o + 5] = py[k]; far[o + 6] = pz[k];
        far[o + 7] = qxx[k]; far[o + 8] = qyy[k]; far[o + 9] = qzz[k];
        far[o + 10] = qxy[k]; far[o + 11] = qxz[k]; far[o + 12] = qyz[k];
      } else if (nch[k] === 0) {
        const p0 = lo[k], p1 = hi[k];
        if (4 * (nNear + p1 - p0) > near.length) {
          const g = new Float64Array(Math.max(2 * near.length, 4 * (nNear + p1 - p0))); g.set(near); near = this.near = g;
        }
        for (let p = p0; p < p1; p++) {
          const o = 4 * nNear++;
          near[o] = sx[p]; near[o + 1] = sy[p]; near[o + 2] = sz[p]; near[o + 3] = sq[p];
        }
      } else {
        for (let c = first[k] + nch[k] - 1; c >= first[k]; c--) stack[sp++] = c;
      }
    }
    this.nFar = nFar; this.nNear = nNear;
    const L = this.local;
    L[0] = gx; L[1] = gy; L[2] = gz; L[3] = ex; L[4] = ey; L[5] = ez;
    L[6] = gxx; L[7] = gyy; L[8] = gzz; L[9] = gxy; L[10] = gxz; L[11] = gyz;
    L[12] = hxxx; L[13] = hyyy; L[14] = hzzz; L[15] = hxxy; L[16] = hxxz; L[17] = hxyy;
    L[18] = hyyz; L[19] = hxzz; L[20] = hyzz; L[21] = hxyz;
  }

  /** Targets [t0, t1) of `leaf`: far cells, then near ions, then the leaf's own other ions. */
  private sumLeaf(leaf: number, t0: number, t1: number, eps2: number, out: FieldOut): void {
    const { sx, sy, sz, sq, perm, far, near, nFar, nNear, quadrupole: quad } = this;
    const p0 = this.lo[leaf], p1 = this.hi[leaf];
    const nf = 13 * nFar, nn = 4 * nNear;
    const L = this.local;
    const gx = L[0], gy = L[1], gz = L[2];
    const gxx = L[6], gyy = L[7], gzz = L[8], gxy = L[9], gxz = L[10], gyz = L[11];
    const hxxx = L[12], hyyy = L[13], hzzz = L[14], hxxy = L[15], hxxz = L[16], hxyy = L[17];
    const hyyz = L[18], hxzz = L[19], hyzz = L[20], hxyz = L[21];
    if (3 * (t1 - t0) > this.acc.length) this.acc = new Float64Array(3 * (t1 - t0)); // a leaf at the depth cap
    const acc = this.acc;
    // Local expansion and far cells, target by target, into acc.
    for (let t = t0; t < t1; t++) {
      const xt = sx[t], yt = sy[t], zt = sz[t];
      // The distant cells through the local expansion: E(g + u) ≈ E + ∇E·u + ½ u·∇∇E·u.
      const ux = xt - gx, uy = yt - gy, uz = zt - gz;
      const xx = 0.5 * ux * ux, yy = 0.5 * uy * uy, zz = 0.5 * uz * uz, xy = ux * uy, xz = ux * uz, yz = uy * uz;
      let fx = L[3] + gxx * ux + gxy * uy + gxz * uz + hxxx * xx + hxyy * yy + hxzz * zz + hxxy * xy + hxxz * xz + hxyz * yz;
      let fy = L[4] + gxy * ux + gyy * uy + gyz * uz + hxxy * xx + hyyy * yy + hyzz * zz + hxyy * xy + hxyz * xz + hyyz * yz;
      let fz = L[5] + gxz * ux + gyz * uy + gzz * uz + hxxz * xx + hyyz * yy + hzzz * zz + hxyz * xy + hxzz * xz + hyzz * yz;
      // Far cells: multipole expansion (Jackson eq. 4.10), softened like the direct kernel.
      for (let o = 0; o < nf; o += 13) {
        const Rx = xt - far[o], Ry = yt - far[o + 1], Rz = zt - far[o + 2];
        const inv2 = 1 / (Rx * Rx + Ry * Ry + Rz * Rz + eps2), inv = Math.sqrt(inv2);
        const inv3 = inv * inv2, inv5 = inv3 * inv2;
        const dx = far[o + 4], dy = far[o + 5], dz = far[o + 6];
        let sR = far[o + 3] * inv3 + 3 * (dx * Rx + dy * Ry + dz * Rz) * inv5;
        fx -= dx * inv3; fy -= dy * inv3; fz -= dz * inv3;
        if (quad) {
          const QRx = far[o + 7] * Rx + far[o + 10] * Ry + far[o + 11] * Rz;
          const QRy = far[o + 10] * Rx + far[o + 8] * Ry + far[o + 12] * Rz;
          const QRz = far[o + 11] * Rx + far[o + 12] * Ry + far[o + 9] * Rz;
          sR += 2.5 * (Rx * QRx + Ry * QRy + Rz * QRz) * inv5 * inv2;
          fx -= QRx * inv5; fy -= QRy * inv5; fz -= QRz * inv5;
        }
        fx += sR * Rx; fy += sR * Ry; fz += sR * Rz;
      }
      acc[3 * (t - t0)] = fx; acc[3 * (t - t0) + 1] = fy; acc[3 * (t - t0) + 2] = fz;
    }
    // Near ions: direct sum, same kernel as direct.ts, two targets per pass over the list (each
    // list entry loaded once for both; every target keeps its own order of additions).
    let t = t0;
    for (; t + 1 < t1; t += 2) {
      const a = 3 * (t - t0);
      const xt = sx[t], yt = sy[t], zt = sz[t], xu = sx[t + 1], yu = sy[t + 1], zu = sz[t + 1];
      let fx = acc[a], fy = acc[a + 1], fz = acc[a + 2], gx2 = acc[a + 3], gy2 = acc[a + 4], gz2 = acc[a + 5];
      for (let o = 0; o < nn; o += 4) {
        const nx = near[o], ny = near[o + 1], nz = near[o + 2], q = near[o + 3];
        const dx = xt - nx, dy = yt - ny, dz = zt - nz;
        const ex = xu - nx, ey = yu - ny, ez = zu - nz;
        const r2 = dx * dx + dy * dy + dz * dz + eps2, s2 = ex * ex + ey * ey + ez * ez + eps2;
        const inv3 = q / (r2 * Math.sqrt(r2)), jnv3 = q / (s2 * Math.sqrt(s2));
        fx += dx * inv3; fy += dy * inv3; fz += dz * inv3;
        gx2 += ex * jnv3; gy2 += ey * jnv3; gz2 += ez * jnv3;
      }
      acc[a] = fx; acc[a + 1] = fy; acc[a + 2] = fz; acc[a + 3] = gx2; acc[a + 4] = gy2; acc[a + 5] = gz2;
    }
    if (t < t1) {
      const a = 3 * (t - t0), xt = sx[t], yt = sy[t], zt = sz[t];
      let fx = acc[a], fy = acc[a + 1], fz = acc[a + 2];
      for (let o = 0; o < nn; o += 4) {
        const dx = xt - near[o], dy = yt - near[o + 1], dz = zt - near[o + 2];
        const r2 = dx * dx + dy * dy + dz * dz + eps2;
        const inv3 = near[o + 3] / (r2 * Math.sqrt(r2));
        fx += dx * inv3; fy += dy * inv3; fz += dz * inv3;
      }
      acc[a] = fx; acc[a + 1] = fy; acc[a + 2] = fz;
    }
    // The leaf's own other ions.
    for (let t = t0; t < t1; t++) {
      const a = 3 * (t - t0), xt = sx[t], yt = sy[t], zt = sz[t];
      let fx = acc[a], fy = acc[a + 1], fz = acc[a + 2];
      for (let p = p0; p < p1; p++) {
        if (p === t) continue;
        const dx = xt - sx[p], dy = yt - sy[p], dz = zt - sz[p];
        const r2 = dx * dx + dy * dy + dz * dz + eps2;
        const inv3 = sq[p] / (r2 * Math.sqrt(r2));
        fx += dx * inv3; fy += dy * inv3; fz += dz * inv3;
      }
      const i = perm[t];
      out.ex[i] = COULOMB_K * fx; out.ey[i] = COULOMB_K * fy; out.ez[i] = COULOMB_K * fz;
    }
  }

  /** Build and evaluate the field at every ion (single thread). */
  field(c: ChargeCloud, softening: number, out: FieldOut): void {
    this.build(c);
    this.fieldRange(softening, 0, c.n, out);
  }
}
