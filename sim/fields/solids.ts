// The shapes of problem.ts as point sets of the grid's own coordinates (planar (x, y), axial (r, z),
// 3D (x, y, z); the third coordinate is 0 on 2D grids): an inside test, a bounding box, the
// narrowest feature, and the parameters t ∈ (0, 1] where the segment P + t (Q − P) may cross the
// shape's boundary. Those candidates may be a superset (the roots of each surface the boundary is
// cut from): electrode.ts keeps only the crossings where being inside actually changes.
//
// Circles, spheres, cylinders, tubes, discs, hyperbolas and hyperboloids cross at the roots of a
// quadratic in t (solved in the cancellation-free form of Press et al., Numerical Recipes, 3rd ed.,
// eq. 5.6.4) or of a plane; polygons at the parameter of each edge intersection (exact); a revolved
// shape, whose surfaces are not quadrics in general, by bisection to 1e-12 of the segment.

import type { AxialShape, PlanarShape, Shape, SolidShape, Vec2 } from './problem.js';

export interface Solid {
  inside(a: number, b: number, c: number): boolean;
  /** Pushes candidate crossing parameters of P→Q; absent for shapes found by bisection. */
  crossings?(p: Seg, out: number[]): void;
  /** Axis-aligned bounds [min a, min b, min c, max a, max b, max c]. */
  box: [number, number, number, number, number, number];
  /** Narrowest feature, m, and what it is (for "narrower than three cells"). */
  width: number;
  feature: string;
}

/** A segment P + t D, t ∈ [0, 1]. */
export interface Seg { pa: number; pb: number; pc: number; da: number; db: number; dc: number }

const INF = Infinity;

/** Roots of A t² + B t + C = 0 pushed to out (Numerical Recipes eq. 5.6.4); a linear equation when A = 0. */
function quadRoots(A: number, B: number, C: number, out: number[]): void {
  if (A === 0) { if (B !== 0) out.push(-C / B); return; }
  const disc = B * B - 4 * A * C;
  if (disc < 0) return;
  const q = -0.5 * (B + (B >= 0 ? 1 : -1) * Math.sqrt(disc));
  out.push(q / A);
  if (q !== 0) out.push(C / q);
}

/** t where coordinate `axis` of P + tD equals v. */
function plane(s: Seg, axis: 0 | 1 | 2, v: number, out: number[]): void {
  const p = axis === 0 ? s.pa : axis === 1 ? s.pb : s.pc, d = axis === 0 ? s.da : axis === 1 ? s.db : s.dc;
  if (d !== 0) out.push((v - p) / d);
}

function rect2(a0: number, b0: number, a1: number, b1: number, feature: string): Solid {
  return {
    inside: (a, b) => a >= a0 && a <= a1 && b >= b0 && b <= b1,
    crossings: (s, out) => { plane(s, 0, a0, out); plane(s, 0, a1, out); plane(s, 1, b0, out); plane(s, 1, b1, out); },
    box: [a0, b0, -INF, a1, b1, INF],
    width: Math.min(a1 - a0, b1 - b0), feature,
  };
}

function circle2(ca: number, cb: number, R: number, feature: string): Solid {
  return {
    inside: (a, b) => (a - ca) ** 2 + (b - cb) ** 2 <= R * R,
    crossings: (s, out) => {
      const ea = s.pa - ca, eb = s.pb - cb;
      quadRoots(s.da * s.da + s.db * s.db, 2 * (ea * s.da + eb * s.db), ea * ea + eb * eb - R * R, out);
    },
    box: [ca - R, cb - R, -INF, ca + R, cb + R, INF],
    width: 2 * R, feature,
  };
}

/** Even–odd rule (Shimrat, Comm. ACM 5 (1962) 434, algorithm 112). */
function polygon2(pts: readonly Vec2[]): Solid {
  const n = pts.length;
  const xs = pts.map((p) => p[0]), ys = pts.map((p) => p[1]);
  let minEdge = INF;
  for (let i = 0; i < n; i++) {
    const j = (i + 1) % n;
    minEdge = Math.min(minEdge, Math.hypot(xs[j] - xs[i], ys[j] - ys[i]));
  }
  const w = Math.min(Math.max(...xs) - Math.min(...xs), Math.max(...ys) - Math.min(...ys));
  return {
    inside: (a, b) => {
      let inside = false;
      for (let i = 0, j = n - 1; i < n; j = i++) {
        if ((ys[i] > b) !== (ys[j] > b) && a < ((xs[j] - xs[i]) * (b - ys[i])) / (ys[j] - ys[i]) + xs[i]) inside = !inside;
      }
      if (inside) return true;
      // Closed set: a point on an edge counts as inside, as for the other shapes.
      for (let i = 0, j = n - 1; i < n; j = i++) {
        const ex = xs[i] - xs[j], ey = ys[i] - ys[j], qx = a - xs[j], qy = b - ys[j];
        const L2 = ex * ex + ey * ey, cr = ex * qy - ey * qx, u = ex * qx + ey * qy;
        if (Math.abs(cr) <= 1e-12 * L2 && u >= 0 && u <= L2) return true;
      }
      return false;
    },
    crossings: (s, out) => {
      for (let i = 0, j = n - 1; i < n; j = i++) {
        // P + t D = E_j + u (E_i − E_j): Cramer's rule on the 2×2 system.
        const ex = xs[i] - xs[j], ey = ys[i] - ys[j];
        const det = s.da * -ey - s.db * -ex;
        if (det === 0) continue;
        const rx = xs[j] - s.pa, ry = ys[j] - s.pb;
        const t = (rx * -ey - ry * -ex) / det, u = (s.da * ry - s.db * rx) / det;
        if (u >= -1e-12 && u <= 1 + 1e-12) out.push(t);
      }
    },
    box: [Math.min(...xs), Math.min(...ys), -INF, Math.max(...xs), Math.max(...ys), INF],
    width: Math.min(w, minEdge), feature: 'polygon',
  };
}

/** u ≥ sqrt(vertex² + v²), u ≤ truncate, with (u, v) the coordinates along and across (cos α, sin α). */
function hyperbola2(vertex: number, angle: number, truncate: number): Solid {
  const c = Math.cos(angle), s0 = Math.sin(angle);
  const half = Math.sqrt(Math.max(0, truncate * truncate - vertex * vertex));
  const corners = [[vertex, 0], [truncate, half], [truncate, -half]].map(([u, v]) => [u * c - v * s0, u * s0 + v * c]);
  const xs = corners.map((p) => p[0]), ys = corners.map((p) => p[1]);
  return {
    inside: (a, b) => {
      const u = a * c + b * s0, v = -a * s0 + b * c;
      return u <= truncate && u > 0 && u * u - v * v >= vertex * vertex;
    },
    crossings: (s, out) => {
      const u0 = s.pa * c + s.pb * s0, du = s.da * c + s.db * s0;
      const v0 = -s.pa * s0 + s.pb * c, dv = -s.da * s0 + s.db * c;
      quadRoots(du * du - dv * dv, 2 * (u0 * du - v0 * dv), u0 * u0 - v0 * v0 - vertex * vertex, out);
      if (du !== 0) out.push((truncate - u0) / du);
    },
    box: [Math.min(...xs), Math.min(...ys), -INF, Math.max(...xs), Math.max(...ys), INF],
    width: Math.min(truncate - vertex, 2 * half), feature: 'hyperbola (truncate − vertex)',
  };
}

export function planarSolid(sh: PlanarShape): Solid {
  switch (sh.kind) {
    case 'circle': return circle2(sh.center[0], sh.center[1], sh.radius, 'circle diameter');
    case 'rectangle': return rect2(sh.min[0], sh.min[1], sh.max[0], sh.max[1], 'rectangle side');
    case 'polygon': return polygon2(sh.points);
    case 'hyperbola': return hyperbola2(sh.vertex, sh.angle, sh.truncate);
  }
}

/** The hyperboloids of problem.ts in (r, z): ring r² − 2(z − c)² ≥ vertex²; cap 2(z − c)² − r² ≥ 2 vertex². */
function hyperboloid2(h: Extract<AxialShape, { kind: 'hyperboloid' }>): Solid {
  const { vertex: v0, center: zc, truncate: rt, side, hole } = h;
  if (h.sheet === 'ring') {
    const dz = Math.sqrt(Math.max(0, (rt * rt - v0 * v0) / 2));
    return {
      inside: (r, z) => r <= rt && r * r - 2 * (z - zc) ** 2 >= v0 * v0,
      crossings: (s, out) => {
        const e = s.pb - zc;
        quadRoots(s.da * s.da - 2 * s.db * s.db, 2 * (s.pa * s.da - 2 * e * s.db), s.pa * s.pa - 2 * e * e - v0 * v0, out);
        plane(s, 0, rt, out);
      },
      box: [v0, zc - dz, -INF, rt, zc + dz, INF],
      width: rt - v0, feature: 'hyperboloid ring (truncate − vertex)',
    };
  }
  const zEnd = Math.sqrt(v0 * v0 + (rt * rt) / 2);
  const [zlo, zhi] = side > 0 ? [zc + v0, zc + zEnd] : [zc - zEnd, zc - v0];
  return {
    inside: (r, z) => r <= rt && r >= hole && (z - zc) * side > 0 && 2 * (z - zc) ** 2 - r * r >= 2 * v0 * v0,
    crossings: (s, out) => {
      const e = s.pb - zc;
      quadRoots(2 * s.db * s.db - s.da * s.da, 2 * (2 * e * s.db - s.pa * s.da), 2 * e * e - s.pa * s.pa - 2 * v0 * v0, out);
      plane(s, 0, rt, out); plane(s, 0, hole, out); plane(s, 1, zc, out);
    },
    box: [hole, zlo, -INF, rt, zhi, INF],
    width: zEnd - v0, feature: 'hyperboloid cap (axial depth)',
  };
}

export function axialSolid(sh: AxialShape): Solid {
  switch (sh.kind) {
    case 'tube': {
      const s = rect2(sh.innerRadius, sh.from, sh.outerRadius, sh.to, 'tube');
      s.feature = sh.outerRadius - sh.innerRadius <= sh.to - sh.from ? 'tube wall' : 'tube length';
      return s;
    }
    case 'disc': {
      const s = rect2(sh.hole, sh.at - sh.thickness / 2, sh.radius, sh.at + sh.thickness / 2, 'disc');
      s.feature = sh.thickness <= sh.radius - sh.hole ? 'disc thickness' : 'disc ring (radius − hole)';
      return s;
    }
    case 'polygon': return polygon2(sh.points);
    case 'hyperboloid': return hyperboloid2(sh);
    case 'ball': {
      const s = circle2(0, sh.center, sh.radius, 'ball diameter');
      s.box[0] = 0;
      return s;
    }
  }
}

function extrude(base: Solid, from: number, to: number): Solid {
  return {
    inside: (a, b, c) => c >= from && c <= to && base.inside(a, b, 0),
    crossings: base.crossings === undefined ? undefined : (s, out) => { base.crossings!(s, out); plane(s, 2, from, out); plane(s, 2, to, out); },
    box: [base.box[0], base.box[1], from, base.box[3], base.box[4], to],
    width: Math.min(base.width, to - from), feature: base.width <= to - from ? base.feature : 'extrusion length',
  };
}

function revolve(base: Solid, ca: number, cb: number): Solid {
  const R = Math.max(Math.abs(base.box[3]), Math.abs(base.box[0]));
  return {
    inside: (a, b, c) => base.inside(Math.hypot(a - ca, b - cb), c, 0),
    box: [ca - R, cb - R, base.box[1], ca + R, cb + R, base.box[4]],
    width: base.width, feature: base.feature,
  };
}

export function solid3(sh: SolidShape): Solid {
  switch (sh.kind) {
    case 'box': {
      const [a0, b0, c0] = sh.min, [a1, b1, c1] = sh.max;
      return {
        inside: (a, b, c) => a >= a0 && a <= a1 && b >= b0 && b <= b1 && c >= c0 && c <= c1,
        crossings: (s, out) => { plane(s, 0, a0, out); plane(s, 0, a1, out); plane(s, 1, b0, out); plane(s, 1, b1, out); plane(s, 2, c0, out); plane(s, 2, c1, out); },
        box: [a0, b0, c0, a1, b1, c1], width: Math.min(a1 - a0, b1 - b0, c1 - c0), feature: 'box side',
      };
    }
    case 'sphere': {
      const [ca, cb, cc] = sh.center, R = sh.radius;
      return {
        inside: (a, b, c) => (a - ca) ** 2 + (b - cb) ** 2 + (c - cc) ** 2 <= R * R,
        crossings: (s, out) => {
          const ea = s.pa - ca, eb = s.pb - cb, ec = s.pc - cc;
          quadRoots(s.da * s.da + s.db * s.db + s.dc * s.dc, 2 * (ea * s.da + eb * s.db + ec * s.dc), ea * ea + eb * eb + ec * ec - R * R, out);
        },
        box: [ca - R, cb - R, cc - R, ca + R, cb + R, cc + R], width: 2 * R, feature: 'sphere diameter',
      };
    }
    case 'cylinder': {
      const [ba, bb, bc] = sh.base, n = Math.hypot(...sh.axis);
      const [xa, xb, xc] = sh.axis.map((v) => v / n), R = sh.radius, { from, to } = sh;
      // Bounds: the two end discs, each within R of its centre across the axis.
      const ends = [from, to].map((s) => [ba + s * xa, bb + s * xb, bc + s * xc]);
      const ext = [xa, xb, xc].map((x) => R * Math.sqrt(Math.max(0, 1 - x * x)));
      const lo = [0, 1, 2].map((i) => Math.min(ends[0][i], ends[1][i]) - ext[i]);
      const hi = [0, 1, 2].map((i) => Math.max(ends[0][i], ends[1][i]) + ext[i]);
      return {
        inside: (a, b, c) => {
          const ea = a - ba, eb = b - bb, ec = c - bc, s = ea * xa + eb * xb + ec * xc;
          // The distance from the axis from the perpendicular part E − sA, not |E|² − s²: that
          // difference cancels, and a node on the surface of a rod along z flipped in and out with z.
          const pa = ea - s * xa, pb = eb - s * xb, pc = ec - s * xc;
          return s >= from && s <= to && pa * pa + pb * pb + pc * pc <= R * R;
        },
        crossings: (sg, out) => {
          // |E + tD|² − ((E + tD)·A)² = R², a quadratic in t; and the end planes s = from, to.
          const ea = sg.pa - ba, eb = sg.pb - bb, ec = sg.pc - bc;
          const es = ea * xa + eb * xb + ec * xc, ds = sg.da * xa + sg.db * xb + sg.dc * xc;
          quadRoots(sg.da * sg.da + sg.db * sg.db + sg.dc * sg.dc - ds * ds,
            2 * (ea * sg.da + eb * sg.db + ec * sg.dc - es * ds), ea * ea + eb * eb + ec * ec - es * es - R * R, out);
          if (ds !== 0) { out.push((from - es) / ds); out.push((to - es) / ds); }
        },
        box: [lo[0], lo[1], lo[2], hi[0], hi[1], hi[2]],
        width: Math.min(2 * R, to - from), feature: 2 * R <= to - from ? 'cylinder diameter' : 'cylinder length',
      };
    }
    case 'extrude': return extrude(planarSolid(sh.shape), sh.from, sh.to);
    case 'revolve': return revolve(axialSolid(sh.shape), sh.center[0], sh.center[1]);
  }
}

/** The solid of a shape on a grid of the given symmetry. */
export function solidOf(sh: Shape, symmetry: 'planar' | 'axial' | 'none'): Solid {
  if (symmetry === 'planar') return planarSolid(sh as PlanarShape);
  if (symmetry === 'axial') return axialSolid(sh as AxialShape);
  return solid3(sh as SolidShape);
}
