// An electrodes stage's shapes (stored SI form, sim/fields/problem.ts) as solids the 3D view draws
// (sim/stages/outline.ts SolidPart): planar cross-sections extruded over the stage, axial shapes
// revolved about the axis, 3D shapes as they are. Curved outlines become polygons of 48 sides. A
// hole is drawn where the renderer can cut it: a z-axis cylinder through a box or an extruded
// cross-section (the entrance plates of a rod set); other holes are left out of the drawing (the
// solve and the hit test still use them).

import type { SolidPart } from '../outline.js';

type Raw = Readonly<Record<string, unknown>>;
type P2 = readonly [number, number];
const n = (v: unknown, d = 0) => (typeof v === 'number' && Number.isFinite(v) ? v : d);
const vec = (p: unknown, k: number): number[] => Array.from({ length: k }, (_, i) => (Array.isArray(p) ? n(p[i]) : 0));
const SIDES = 48;

function circle(cx: number, cy: number, r: number): P2[] {
  return Array.from({ length: SIDES }, (_, i) => [cx + r * Math.cos((2 * Math.PI * i) / SIDES), cy + r * Math.sin((2 * Math.PI * i) / SIDES)] as const);
}

/** A planar shape's outline (x, y), or undefined for an unknown kind. */
function planarOutline(s: Raw): P2[] | undefined {
  switch (s.kind) {
    case 'circle': { const [x, y] = vec(s.center, 2); return circle(x, y, n(s.radius)); }
    case 'rectangle': { const [x0, y0] = vec(s.min, 2), [x1, y1] = vec(s.max, 2); return [[x0, y0], [x1, y0], [x1, y1], [x0, y1]]; }
    case 'polygon': return Array.isArray(s.points) ? s.points.map((p) => vec(p, 2) as unknown as P2) : undefined;
    case 'hyperbola': {
      // u ≥ sqrt(vertex² + v²) up to u = truncate, rotated to the rod's direction.
      const a = n(s.vertex), T = n(s.truncate), ang = n(s.angle), c = Math.cos(ang), si = Math.sin(ang);
      const vm = Math.sqrt(Math.max(0, T * T - a * a));
      const pts: P2[] = [];
      for (let i = 0; i <= SIDES; i++) {
        const v = -vm + (2 * vm * i) / SIDES, u = Math.sqrt(a * a + v * v);
        pts.push([u * c - v * si, u * si + v * c]);
      }
      return pts;
    }
  }
  return undefined;
}

/** An axial shape's closed (r, z) profile, or undefined. */
function axialProfile(s: Raw): P2[] | undefined {
  switch (s.kind) {
    case 'tube': { const a = n(s.innerRadius), b = n(s.outerRadius), z0 = n(s.from), z1 = n(s.to); return [[a, z0], [b, z0], [b, z1], [a, z1]]; }
    case 'disc': { const h = n(s.hole), R = n(s.radius), z = n(s.at), t = n(s.thickness) / 2; return [[h, z - t], [R, z - t], [R, z + t], [h, z + t]]; }
    case 'polygon': return Array.isArray(s.points) ? s.points.map((p) => vec(p, 2) as unknown as P2) : undefined;
    case 'ball': { const c = n(s.center), R = n(s.radius); return Array.from({ length: SIDES / 2 + 1 }, (_, i) => { const t = -Math.PI / 2 + (Math.PI * i) / (SIDES / 2); return [R * Math.cos(t), c + R * Math.sin(t)] as const; }); }
    case 'hyperboloid': {
      const v = n(s.vertex), c = n(s.center), T = n(s.truncate);
      if (s.sheet === 'ring') {
        // r² − 2(z − c)² ≥ v², r ≤ T: the inner surface, closed by the cylinder r = T.
        const zm = Math.sqrt(Math.max(0, (T * T - v * v) / 2));
        const pts: P2[] = [];
        for (let i = 0; i <= SIDES; i++) { const z = -zm + (2 * zm * i) / SIDES; pts.push([Math.sqrt(v * v + 2 * z * z), c + z]); }
        return pts;
      }
      // Cap: 2(z − c)² − r² ≥ 2v² on its side, r from the hole to T, closed by a flat outer face
      // (the grid's box cuts it flat) a tenth of T beyond the surface's rim.
      const side = n(s.side, 1) >= 0 ? 1 : -1, h = n(s.hole);
      const zs = (r: number) => c + side * Math.sqrt(v * v + (r * r) / 2);
      const far = zs(T) + side * 0.1 * T;
      const pts: P2[] = [];
      for (let i = 0; i <= SIDES / 2; i++) { const r = h + ((T - h) * i) / (SIDES / 2); pts.push([r, zs(r)]); }
      pts.push([T, far], [h, far]);
      return pts;
    }
  }
  return undefined;
}

/** z-axis cylinders among the holes, as (x, y) circles with their z extent. */
function zHoles(holes: readonly Raw[]): { loop: P2[]; from: number; to: number }[] {
  const out: { loop: P2[]; from: number; to: number }[] = [];
  for (const h of holes) {
    if (h.kind !== 'cylinder') continue;
    const [ax, ay, az] = vec(h.axis, 3), [bx, by, bz] = vec(h.base, 3);
    if (Math.abs(ax) > 1e-12 || Math.abs(ay) > 1e-12 || !(az > 0)) continue;
    out.push({ loop: circle(bx, by, n(h.radius)), from: bz + n(h.from), to: bz + n(h.to) });
  }
  return out;
}

/** The drawable solids of a stored electrodes stage (grid symmetry decides how shapes are read). */
export function electrodeSolids(stage: Raw): SolidPart[] {
  const p = (stage.problem ?? {}) as Raw;
  const sym = String(((p.grid ?? {}) as Raw).symmetry ?? 'planar');
  const len = n(stage.length, n(stage.zEnd) - n(stage.zStart));
  const out: SolidPart[] = [];
  const electrodes = Array.isArray(p.electrodes) ? (p.electrodes as Raw[]) : [];
  electrodes.forEach((e, k) => {
    const pot = (e.potential ?? {}) as Raw;
    const volts = n(pot.dc) + n(pot.rf);
    const base = { electrode: k, sign: (volts > 0 ? 1 : volts < 0 ? -1 : 0) as -1 | 0 | 1 };
    const holes = zHoles(Array.isArray(e.holes) ? (e.holes as Raw[]) : []);
    const prism = (outline: P2[], from: number, to: number) => {
      const hs = holes.filter((h) => h.from <= from && h.to >= to).map((h) => h.loop);
      out.push({ ...base, kind: 'prism', outline, holes: hs, from, to });
    };
    for (const s of Array.isArray(e.shapes) ? (e.shapes as Raw[]) : []) {
      if (sym === 'planar') { const o = planarOutline(s); if (o) prism(o, 0, len); continue; }
      if (sym === 'axial') { const pr = axialProfile(s); if (pr) out.push({ ...base, kind: 'lathe', profile: pr, center: [0, 0] }); continue; }
      switch (s.kind) {
        case 'box': {
          const mn = vec(s.min, 3), mx = vec(s.max, 3);
          if (holes.some((h) => h.from <= mn[2] && h.to >= mx[2])) prism([[mn[0], mn[1]], [mx[0], mn[1]], [mx[0], mx[1]], [mn[0], mx[1]]], mn[2], mx[2]);
          else out.push({ ...base, kind: 'box', min: [mn[0], mn[1], mn[2]], max: [mx[0], mx[1], mx[2]] });
          break;
        }
        case 'cylinder': { const b = vec(s.base, 3), a = vec(s.axis, 3); out.push({ ...base, kind: 'cylinder', base: [b[0], b[1], b[2]], axis: [a[0], a[1], a[2]], radius: n(s.radius), from: n(s.from), to: n(s.to) }); break; }
        case 'sphere': { const c = vec(s.center, 3); out.push({ ...base, kind: 'ball', center: [c[0], c[1], c[2]], radius: n(s.radius) }); break; }
        case 'extrude': { const o = planarOutline((s.shape ?? {}) as Raw); if (o) prism(o, n(s.from), n(s.to)); break; }
        case 'revolve': { const pr = axialProfile((s.shape ?? {}) as Raw); const c = vec(s.center, 2); if (pr) out.push({ ...base, kind: 'lathe', profile: pr, center: [c[0], c[1]] }); break; }
      }
    }
  });
  return out;
}
