// Labels, diagonals and boundary terms of the operator on each level, from the electrode geometry.
//
// Dirichlet boundaries cutting a grid line are treated by the Shortley–Weller formula (Shortley &
// Weller, J. Appl. Phys. 9 (1938) 334; Hackbusch, Elliptic Differential Equations, §4.8): along an axis with the neighbours at
// fractions θ⁻, θ⁺ of the spacing (1 where free, the boundary crossing where cut),
//   φ_aa ≈ 2/(θ⁻ + θ⁺) · [(φ⁺ − φ)/θ⁺ + (φ⁻ − φ)/θ⁻] / h²,
// consistent to O(h) at the boundary row and second order in φ (Hackbusch §4.8; the symmetric
// ghost-point scheme of Gibou et al., J. Comput. Phys. 176 (2002), was tried first: second order too,
// but 4.5e-4 V per volt off the coaxial closed form at b/32, against 2e-4 required). In the
// weighted form of grid.ts each edge term w(φ_nb − φ)/θ is multiplied by c_a = 2/(θ⁻ + θ⁺); on a
// mirror plane or the axis (no node below) the image gives θ⁻ = θ⁺. The rows with a cut are no
// longer symmetric (BiCGSTAB, bicgstab.ts); they are stored sparsely (their node's diagonal holds
// −(row + 1)) and every other row is the regular stencil (so are mirror-plane rows of Cartesian
// grids, whose half-cell weights would otherwise keep the constant-weight kernels from them). θ is clamped at THETA_MIN (a node that
// close to the surface takes its value; the floor is ours). Grounded box faces are cut the same way,
// at θ = 1 on the finest level and at the true face position on the coarse ones (an odd node count
// puts a coarse node beyond the face). Coarse levels are rediscretised from the geometry at their
// own spacing.

import { ElectrodeSet } from './electrode.js';
import type { Axis, Level } from './grid.js';

export const THETA_MIN = 1e-6;

/** Label of a node of a grounded face or beyond the box (free of electrodes). */
export const FACE = -2;
/** Label of a free node. */
export const FREE = -1;

/** The rows of nodes next to a cut: guarded node index, diagonal, six off-diagonals, colour. */
export interface CutRows {
  node: Int32Array;
  diag: Float64Array;
  /** Per row, the coefficients of the neighbours −a, +a, −b, +b, −c, +c (0 where fixed). */
  off: Float64Array;
  colour: Uint8Array;
}

export interface LevelOperator {
  level: Level;
  /** Diagonal per node (with guard): 0 at fixed nodes, −(row + 1) at a node of a cut row. */
  diag: Float64Array;
  rows: CutRows;
}

export interface BoundaryTerms {
  /** Node index (without guard), the coefficient w/θ, and the electrode of each cut edge. */
  node: Int32Array;
  coef: Float64Array;
  electrode: Int16Array;
}

function shared(bytes: number): SharedArrayBuffer {
  return new SharedArrayBuffer(Math.max(8, bytes));
}

/** Labels of one level: electrode index (first that contains the node), FACE, or FREE. */
export function labelLevel(lv: Level, axes: Axis[], els: ElectrodeSet[], out: Int16Array): void {
  const [nx, ny, nz] = lv.n, H = lv.spacing, tol = 1e-9 * H, d = axes.length;
  const faceA = new Uint8Array(nx), faceB = new Uint8Array(ny), faceC = new Uint8Array(nz);
  const face = [faceA, faceB, faceC];
  for (let a = 0; a < d; a++) {
    const ax = axes[a];
    for (let i = 0; i < lv.n[a]; i++) {
      const p = ax.lo + i * H;
      face[a][i] = p >= ax.hi - tol || (!ax.openLow && i === 0) ? 1 : 0;
    }
  }
  const e = els.length;
  for (let k = 0, n = 0; k < nz; k++) {
    const c = d === 3 ? axes[2].lo + k * H : 0;
    for (let j = 0; j < ny; j++) {
      const b = axes[1].lo + j * H;
      for (let i = 0; i < nx; i++, n++) {
        const a = axes[0].lo + i * H;
        let lab = faceA[i] | faceB[j] | faceC[k] ? FACE : FREE;
        for (let q = 0; q < e; q++) if (els[q].inside(a, b, c)) { lab = q; break; }
        out[n] = lab;
      }
    }
  }
}

/** Scratch and output of the rows assembleLevel writes node by node (allocated once per level). */
interface RowBuilder {
  lv: Level; axes: Axis[]; els: ElectrodeSet[]; labels: Int16Array; diag: Float64Array;
  terms?: { node: number[]; coef: number[]; electrode: number[] };
  stride: number[]; pos: number[]; q: number[]; idx: number[];
  theta: Float64Array; w: Float64Array; elec: Int16Array; offs: Float64Array;
  rNode: number[]; rDiag: number[]; rOff: number[]; rColour: number[];
}

/**
 * The operator of one level (and, when `terms` is given, the boundary terms of the finest level):
 * the regular diagonal Σ w, or a Shortley–Weller row where an edge is cut by an electrode or a face.
 * The loop over nodes is kept small (most nodes of a Cartesian grid take the plain stencil); the
 * other nodes go to nodeRow.
 */
export function assembleLevel(lv: Level, axes: Axis[], els: ElectrodeSet[], labels: Int16Array, terms?: { node: number[]; coef: number[]; electrode: number[] }): LevelOperator {
  const { n, sy, sz, guard } = lv, d = axes.length;
  const diag = new Float64Array(shared((lv.nodes + 2 * guard) * 8));
  const B: RowBuilder = {
    lv, axes, els, labels, diag, terms, stride: [1, sy, sz], pos: [0, 0, 0], q: [0, 0, 0], idx: [0, 0, 0],
    theta: new Float64Array(6), w: new Float64Array(6), elec: new Int16Array(6), offs: new Float64Array(6),
    rNode: [], rDiag: [], rOff: [], rColour: [],
  };
  const uniform = lv.uniform, three = d === 3, dd = 2 * d;
  for (let k = 0, node = 0; k < n[2]; k++) {
    for (let j = 0; j < n[1]; j++) {
      for (let i = 0; i < n[0]; i++, node++) {
        if (labels[node] !== FREE) continue;
        // Fast path: a Cartesian node off the low faces with every neighbour free is the plain stencil.
        if (uniform && i > 0 && j > 0 && (!three || k > 0) && labels[node - 1] === FREE && labels[node + 1] === FREE
          && labels[node - sy] === FREE && labels[node + sy] === FREE && (!three || (labels[node - sz] === FREE && labels[node + sz] === FREE))) {
          diag[guard + node] = dd;
          continue;
        }
        nodeRow(B, i, j, k, node);
      }
    }
  }
  const { rNode, rDiag, rOff, rColour } = B;
  const m = rNode.length;
  const rows: CutRows = {
    node: new Int32Array(shared(m * 4)).subarray(0, m), diag: new Float64Array(shared(m * 8)).subarray(0, m),
    off: new Float64Array(shared(m * 48)).subarray(0, 6 * m), colour: new Uint8Array(shared(m)).subarray(0, m),
  };
  rows.node.set(rNode); rows.diag.set(rDiag); rows.off.set(rOff); rows.colour.set(rColour);
  return { level: lv, diag, rows };
}

/** The row of free node (i, j, k): the regular diagonal, or a stored Shortley–Weller row. */
function nodeRow(B: RowBuilder, i: number, j: number, k: number, node: number): void {
  const { lv, axes, els, labels, diag, terms, stride, pos, q, idx, theta, w, elec, offs } = B;
  const { n, guard } = lv, H = lv.spacing, d = axes.length;
  idx[0] = i; idx[1] = j; idx[2] = k;
  for (let a = 0; a < 3; a++) pos[a] = a < d ? axes[a].lo + idx[a] * H : 0;
  let cut = false, sum = 0;
  theta.fill(1); w.fill(0); elec.fill(-1);
  for (let a = 0; a < d; a++) {
    const ma = a === 0 ? lv.m[1][j] * lv.m[2][k] : a === 1 ? lv.m[0][i] * lv.m[2][k] : lv.m[0][i] * lv.m[1][j];
    for (let s = 0; s < 2; s++) {
      const dir = s === 0 ? -1 : 1, slot = 2 * a + s;
      const wt = (dir < 0 ? lv.em[a][idx[a]] : lv.ep[a][idx[a]]) * ma;
      const ii = idx[a] + dir;
      if (ii < 0 || ii >= n[a]) {
        if (dir > 0) throw new Error('fields: free node on the last index');
        continue;
      }
      w[slot] = wt;
      if (wt === 0) continue;
      sum += wt;
      const nb = node + dir * stride[a], lab = labels[nb];
      if (lab === FREE) continue;
      q[0] = pos[0]; q[1] = pos[1]; q[2] = pos[2]; q[a] += dir * H;
      let t = 2, e = -1;
      const ax = axes[a];
      if (dir > 0 && q[a] >= ax.hi - 1e-9 * H) t = (ax.hi - pos[a]) / H;
      if (dir < 0 && !ax.openLow && q[a] <= ax.lo + 1e-9 * H) t = (pos[a] - ax.lo) / H;
      if (lab >= 0) {
        const te = els[lab].entry(pos[0], pos[1], pos[2], q[0], q[1], q[2]);
        if (te <= t) { t = te; e = lab; }
      }
      if (t > 1) t = 1; // a FACE node on a face the box does not cut: 0 V there
      if (t < THETA_MIN) t = THETA_MIN;
      theta[slot] = t; elec[slot] = e;
      if (t < 1) cut = true;
    }
  }
  // Shortley–Weller factor per axis; no node below (mirror, axis): the image, θ⁻ = θ⁺.
  let dsw = 0;
  offs.fill(0);
  for (let a = 0; a < d; a++) {
    const tm = w[2 * a] === 0 ? theta[2 * a + 1] : theta[2 * a], tp = w[2 * a + 1] === 0 ? tm : theta[2 * a + 1];
    const c = cut ? 2 / (tm + tp) : 1;
    for (let s = 0; s < 2; s++) {
      const slot = 2 * a + s;
      if (w[slot] === 0) continue;
      // Radial axis off the axis: r at the middle of the (possibly cut) edge, r_{i ± θ/2},
      // so that the r-weighted difference stays consistent with (1/r)(r φ_r)_r.
      const wr = axes[a].radial && idx[a] > 0 && cut ? (w[slot] * (idx[a] + (s === 0 ? -0.5 : 0.5) * theta[slot])) / (idx[a] + (s === 0 ? -0.5 : 0.5)) : w[slot];
      const coef = (c * wr) / theta[slot];
      dsw += coef;
      const nb = node + (s === 0 ? -1 : 1) * stride[a];
      if (labels[nb] === FREE) offs[slot] = coef;
      if (terms !== undefined && elec[slot] >= 0) { terms.node.push(node); terms.coef.push(coef); terms.electrode.push(elec[slot]); }
    }
  }
  const onMirror = lv.uniform && ((axes[0].openLow && i === 0) || (axes[1].openLow && j === 0) || (d === 3 && axes[2].openLow && k === 0));
  if (!cut && !onMirror) { diag[guard + node] = sum; return; }
  diag[guard + node] = -(B.rNode.length + 1);
  B.rNode.push(guard + node); B.rDiag.push(dsw);
  for (let s = 0; s < 6; s++) B.rOff.push(offs[s]);
  B.rColour.push((i + j + k) & 1);
}

export function packTerms(t: { node: number[]; coef: number[]; electrode: number[] }): BoundaryTerms {
  const m = t.node.length;
  const node = new Int32Array(shared(m * 4)).subarray(0, m), coef = new Float64Array(shared(m * 8)).subarray(0, m), electrode = new Int16Array(shared(m * 2)).subarray(0, m);
  node.set(t.node); coef.set(t.coef); electrode.set(t.electrode);
  return { node, coef, electrode };
}
