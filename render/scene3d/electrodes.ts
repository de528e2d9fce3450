// Electrode solids of each stage, in scene millimetres, z along the instrument axis.
// Quadrupole rods: faces of x² − y² = ±r0², the equipotentials of φ ∝ (x² − y²)/r0² (P. H. Dawson,
// "Quadrupole Mass Spectrometry and its Applications" (1976), ch. 2; from memory), or round rods of
// radius 1.1468·r0 (the ratio commonly quoted from D. R. Denison, J. Vac. Sci. Technol. 8, 266
// (1971); value from memory). Trap: ring r² − 2z² = r0² and end caps 2z² − r² = 2z0², the
// equipotentials of φ ∝ (r² − 2z²) (R. E. March, J. F. J. Todd, "Quadrupole Ion Trap Mass
// Spectrometry", 2nd ed. (2005), ch. 2; from memory), built with LatheGeometry.

import * as THREE from 'three';
import { mergeGeometries } from 'three/examples/jsm/utils/BufferGeometryUtils.js';
import { ELECTRODE_COLORS, type Rgb } from './palette.js';
import type { PlacedStage } from './runInput.js';
import { kindNamed } from '../../sim/stages/registry.js';
import type { OutlinePart, SolidPart } from '../../sim/stages/outline.js';

export const MM = 1000;
export type RodShape = 'hyperbolic' | 'cylindrical';

export interface ElectrodeOptions {
  rods: RodShape;
  /**
   * Azimuth (rad, atan2(y, x)) of the viewer seen from the axis: the trap loses a 90° wedge there
   * and a quadrupole rod within 50° of it is drawn as an outline, so the ions inside stay in view.
   */
  cutAzimuth?: number;
}

/** Round-rod radius relative to r0 (Denison 1971, see header). */
export const ROUND_ROD_RATIO = 1.1468;

function material(c: Rgb, role: string): THREE.MeshLambertMaterial {
  const m = new THREE.MeshLambertMaterial({ color: new THREE.Color(c[0], c[1], c[2]), side: THREE.DoubleSide });
  m.name = role;
  return m;
}

/** Prism of a closed 2D profile between z0 and z1 with per-vertex normals given by the profile. */
function prism(profile: { x: number; y: number; nx: number; ny: number; corner: boolean }[], z0: number, z1: number): THREE.BufferGeometry {
  const pos: number[] = [], nor: number[] = [], idx: number[] = [];
  const n = profile.length;
  // Side walls: a vertex pair (z0, z1) per profile point; corners are split so normals stay sharp.
  for (let i = 0; i < n; i++) {
    const a = profile[i], b = profile[(i + 1) % n];
    const base = pos.length / 3;
    const na = a.corner ? edgeNormal(a, b) : [a.nx, a.ny];
    const nb = b.corner ? edgeNormal(a, b) : [b.nx, b.ny];
    pos.push(a.x, a.y, z0, a.x, a.y, z1, b.x, b.y, z0, b.x, b.y, z1);
    nor.push(na[0], na[1], 0, na[0], na[1], 0, nb[0], nb[1], 0, nb[0], nb[1], 0);
    idx.push(base, base + 2, base + 1, base + 1, base + 2, base + 3);
  }
  // End faces.
  const tris = THREE.ShapeUtils.triangulateShape(profile.map((p) => new THREE.Vector2(p.x, p.y)), []);
  for (const [z, nz] of [[z0, -1], [z1, 1]] as const) {
    const base = pos.length / 3;
    for (const p of profile) { pos.push(p.x, p.y, z); nor.push(0, 0, nz); }
    for (const t of tris) idx.push(base + t[0], base + t[1], base + t[2]);
  }
  const g = new THREE.BufferGeometry();
  g.setAttribute('position', new THREE.Float32BufferAttribute(pos, 3));
  g.setAttribute('normal', new THREE.Float32BufferAttribute(nor, 3));
  g.setIndex(idx);
  return g;
}

function edgeNormal(a: { x: number; y: number }, b: { x: number; y: number }): [number, number] {
  const dx = b.x - a.x, dy = b.y - a.y, l = Math.hypot(dx, dy) || 1;
  return [dy / l, -dx / l];
}

/** Cross-section of the rod on +x: face x = √(r0² + y²) for |y| ≤ w, flat back at x = xb. */
function hyperbolicRodProfile(r0: number) {
  const w = 0.9 * r0;
  const xb = Math.sqrt(r0 * r0 + w * w) + 0.7 * r0;
  const pts: { x: number; y: number; nx: number; ny: number; corner: boolean }[] = [];
  const N = 28;
  for (let i = 0; i <= N; i++) {
    const y = -w + (2 * w * i) / N;
    const x = Math.sqrt(r0 * r0 + y * y);
    // Outward from the axis is −∇(x² − y²) direction flipped: the face looks toward the axis.
    const l = Math.hypot(x, y);
    pts.push({ x, y, nx: -x / l, ny: y / l, corner: i === 0 || i === N });
  }
  pts.push({ x: xb, y: w, nx: 1, ny: 0, corner: true }, { x: xb, y: -w, nx: 1, ny: 0, corner: true });
  return pts;
}

function quadrupole(stage: PlacedStage, opts: ElectrodeOptions): THREE.Group {
  const g = new THREE.Group();
  g.name = 'quadrupole rods';
  const r0 = (stage.r0 ?? 4e-3) * MM;
  const z0 = stage.zStart * MM, z1 = stage.zEnd * MM;
  const plus = material(ELECTRODE_COLORS.rodPositive, 'rod +(U + V cos Ωt)');
  const minus = material(ELECTRODE_COLORS.rodNegative, 'rod −(U + V cos Ωt)');
  let rod: THREE.BufferGeometry;
  if (opts.rods === 'hyperbolic') {
    rod = prism(hyperbolicRodProfile(r0), z0, z1);
  } else {
    const R = ROUND_ROD_RATIO * r0;
    rod = new THREE.CylinderGeometry(R, R, z1 - z0, 48, 1, false);
    rod.rotateX(Math.PI / 2);
    rod.translate(r0 + R, 0, (z0 + z1) / 2);
  }
  // x rods carry +, y rods carry − (DESIGN.md: the y motion has (−a, −q)).
  const outline = rodOutline(rod);
  for (let k = 0; k < 4; k++) {
    const az = (k * Math.PI) / 2;
    const open = opts.cutAzimuth !== undefined && angleBetween(az, opts.cutAzimuth) < (50 * Math.PI) / 180;
    const m = open ? outline.clone() : new THREE.Mesh(rod, k % 2 === 0 ? plus : minus);
    m.rotation.z = az;
    m.name = `rod ${['+x', '+y', '−x', '−y'][k]}${open ? ' (outline)' : ''}`;
    g.add(m);
  }
  return g;
}

/**
 * 2n round rods of a multipole guide on the circle r0, at azimuths kπ/n (where cos nθ = ±1),
 * alternately + and −. Rod radius r0/(n − 1): the usual proportion of multipole guides (common
 * practice, no source), which for n = 2 is close to the quadrupole's 1.1468.
 */
function multipoleRods(stage: PlacedStage, opts: ElectrodeOptions, rods: number): THREE.Group {
  const g = new THREE.Group();
  const n = rods / 2;
  g.name = `${rods}-rod multipole`;
  const r0 = (stage.r0 ?? 2e-3) * MM;
  const z0 = stage.zStart * MM, z1 = stage.zEnd * MM;
  const plus = material(ELECTRODE_COLORS.rodPositive, 'rod +(U + V cos Ωt)');
  const minus = material(ELECTRODE_COLORS.rodNegative, 'rod −(U + V cos Ωt)');
  const R = r0 / (n - 1);
  const rod = new THREE.CylinderGeometry(R, R, z1 - z0, 32, 1, false);
  rod.rotateX(Math.PI / 2);
  rod.translate(r0 + R, 0, (z0 + z1) / 2);
  const outline = rodOutline(rod);
  for (let k = 0; k < rods; k++) {
    const az = (k * Math.PI) / n;
    const open = opts.cutAzimuth !== undefined && angleBetween(az, opts.cutAzimuth) < Math.PI / (2 * n);
    const m = open ? outline.clone() : new THREE.Mesh(rod, k % 2 === 0 ? plus : minus);
    m.rotation.z = az;
    m.name = `rod ${k} ${k % 2 === 0 ? '+' : '−'}${open ? ' (outline)' : ''}`;
    g.add(m);
  }
  return g;
}

function angleBetween(a: number, b: number): number {
  const d = Math.abs(((a - b) % (2 * Math.PI) + 3 * Math.PI) % (2 * Math.PI) - Math.PI);
  return d;
}

/** Feature edges of a rod solid (faces meeting at more than 30°): end profiles and long edges. */
function rodOutline(rod: THREE.BufferGeometry): THREE.LineSegments {
  const edges = new THREE.EdgesGeometry(rod, 30);
  const line = new THREE.LineSegments(edges, new THREE.LineBasicMaterial({ color: new THREE.Color(...ELECTRODE_COLORS.outline), transparent: true, opacity: 0.9 }));
  return line;
}

/** Lathe of a smooth curve given in (r, z) about the axis, returned with its axis along scene z. */
function lathe(points: THREE.Vector2[], phiStart: number, phiLength: number): THREE.BufferGeometry {
  // LatheGeometry turns about +y; phi = ψ + π/2 maps its meridian to azimuth ψ once y → z (rotateX).
  const g = new THREE.LatheGeometry(points, 72, phiStart + Math.PI / 2, phiLength);
  g.rotateX(Math.PI / 2);
  return g;
}

function curve(f: (s: number) => [number, number], n: number): THREE.Vector2[] {
  return Array.from({ length: n + 1 }, (_, i) => { const [r, z] = f(i / n); return new THREE.Vector2(r, z); });
}

/** Flat section of a closed (r, z) profile at azimuth ψ: shows where the solid was cut. */
function section(profile: THREE.Vector2[], psi: number): THREE.BufferGeometry {
  const g = new THREE.ShapeGeometry(new THREE.Shape(profile));
  const e1 = new THREE.Vector3(Math.cos(psi), Math.sin(psi), 0);
  const e2 = new THREE.Vector3(0, 0, 1);
  const e3 = new THREE.Vector3().crossVectors(e1, e2);
  g.applyMatrix4(new THREE.Matrix4().makeBasis(e1, e2, e3));
  return g;
}

function trap(stage: PlacedStage, opts: ElectrodeOptions): THREE.Group {
  const g = new THREE.Group();
  g.name = 'trap electrodes';
  const r0 = (stage.r0 ?? 10e-3) * MM;
  const z0 = (stage.z0 ?? r0 / MM / Math.SQRT2) * MM;
  const zc = ((stage.zStart + stage.zEnd) / 2) * MM;
  const cut = opts.cutAzimuth !== undefined;
  const gap = Math.PI / 2;
  const phiStart = cut ? opts.cutAzimuth! + gap / 2 : 0;
  const phiLength = cut ? 2 * Math.PI - gap : 2 * Math.PI;
  const ringMat = material(ELECTRODE_COLORS.ring, 'ring U + V cos Ωt');
  const capMat = material(ELECTRODE_COLORS.cap, 'end cap (ground)');
  const secMat = material(ELECTRODE_COLORS.section, 'section');

  // Ring: inner face r = √(r0² + 2z²) for |z| ≤ h, closed by flat top/bottom and an outer wall.
  const h = 1.05 * z0;
  const rIn = Math.sqrt(r0 * r0 + 2 * h * h);
  const rOut = rIn + 0.35 * r0;
  const face = curve((s) => { const z = -h + 2 * h * s; return [Math.sqrt(r0 * r0 + 2 * z * z), z]; }, 48);
  const ringParts = [
    face,
    [new THREE.Vector2(rIn, h), new THREE.Vector2(rOut, h)],
    [new THREE.Vector2(rOut, h), new THREE.Vector2(rOut, -h)],
    [new THREE.Vector2(rOut, -h), new THREE.Vector2(rIn, -h)],
  ];
  const ringProfile = [...face, new THREE.Vector2(rOut, h), new THREE.Vector2(rOut, -h)];
  const add = (geo: THREE.BufferGeometry, mat: THREE.Material, name: string) => {
    geo.translate(0, 0, zc);
    const m = new THREE.Mesh(geo, mat);
    m.name = name;
    g.add(m);
  };
  // Each electrode is one mesh of its lathed parts: a closed solid when the trap is whole.
  const solid = (parts: THREE.Vector2[][]) => mergeGeometries(parts.map((part) => lathe(part, phiStart, phiLength)));
  add(solid(ringParts), ringMat, 'ring');

  // End caps: face z = √(z0² + r²/2) from the hole (aperture) out to rc, back plate behind it.
  const ra = Math.min(stage.aperture !== undefined ? stage.aperture * MM : 0.1 * z0, 0.6 * r0);
  const rc = rOut;
  const zFace = (r: number) => Math.sqrt(z0 * z0 + (r * r) / 2);
  const zBack = zFace(rc) + 0.25 * z0;
  for (const sgn of [1, -1]) {
    const capFace = curve((s) => { const r = ra + (rc - ra) * s; return [r, sgn * zFace(r)]; }, 40);
    const parts = [
      capFace,
      [new THREE.Vector2(rc, sgn * zFace(rc)), new THREE.Vector2(rc, sgn * zBack)],
      [new THREE.Vector2(rc, sgn * zBack), new THREE.Vector2(ra, sgn * zBack)],
      [new THREE.Vector2(ra, sgn * zBack), new THREE.Vector2(ra, sgn * zFace(ra))],
    ];
    add(solid(parts), capMat, sgn > 0 ? 'end cap +z' : 'end cap −z');
    if (cut) {
      const prof = [...capFace, new THREE.Vector2(rc, sgn * zBack), new THREE.Vector2(ra, sgn * zBack)];
      for (const psi of [opts.cutAzimuth! - gap / 2, opts.cutAzimuth! + gap / 2]) add(section(prof, psi), secMat, 'section');
    }
  }
  if (cut) {
    for (const psi of [opts.cutAzimuth! - gap / 2, opts.cutAzimuth! + gap / 2]) add(section(ringProfile, psi), secMat, 'section');
  }
  return g;
}

/** Grid electrode at z (mm): its rim circle of radius a and a square mesh of wires inside it. */
function gridLines(a: number, z: number, color: Rgb, name: string): THREE.LineSegments {
  const pts: number[] = [];
  const N = 72;
  for (let i = 0; i < N; i++) {
    const p = (2 * Math.PI * i) / N, q = (2 * Math.PI * (i + 1)) / N;
    pts.push(a * Math.cos(p), a * Math.sin(p), z, a * Math.cos(q), a * Math.sin(q), z);
  }
  const wires = 7;
  for (let k = 1; k < wires; k++) {
    const u = -a + (2 * a * k) / wires, h = Math.sqrt(a * a - u * u);
    pts.push(u, -h, z, u, h, z, -h, u, z, h, u, z);
  }
  const geo = new THREE.BufferGeometry();
  geo.setAttribute('position', new THREE.Float32BufferAttribute(pts, 3));
  const line = new THREE.LineSegments(geo, new THREE.LineBasicMaterial({ color: new THREE.Color(...color), transparent: true, opacity: 0.7 }));
  line.name = name;
  return line;
}

/** Ring circles of radius a at z (mm). */
function rings(a: number, zs: readonly number[], color: Rgb, name: string): THREE.LineSegments {
  const pts: number[] = [];
  const N = 72;
  for (const z of zs) {
    for (let i = 0; i < N; i++) {
      const p = (2 * Math.PI * i) / N, q = (2 * Math.PI * (i + 1)) / N;
      pts.push(a * Math.cos(p), a * Math.sin(p), z, a * Math.cos(q), a * Math.sin(q), z);
    }
  }
  const geo = new THREE.BufferGeometry();
  geo.setAttribute('position', new THREE.Float32BufferAttribute(pts, 3));
  const line = new THREE.LineSegments(geo, new THREE.LineBasicMaterial({ color: new THREE.Color(...color), transparent: true, opacity: 0.85 }));
  line.name = name;
  return line;
}

/**
 * Reflectron: a stack of guard rings setting the retarding field, an entrance grid and, when the
 * stage is closed, a back plate (drawn as a grid). Ring pitch about a tenth of the length.
 */
function reflectron(s: PlacedStage, a: number, i: number): THREE.Group {
  const z0 = s.zStart * MM, z1 = s.zEnd * MM;
  const n = 12;
  const grp = new THREE.Group();
  grp.name = `reflectron ${i}`;
  grp.add(gridLines(a, z0, ELECTRODE_COLORS.grid, `reflectron entrance grid ${i}`));
  grp.add(rings(a, Array.from({ length: n - 1 }, (_, k) => z0 + ((k + 1) * (z1 - z0)) / n), ELECTRODE_COLORS.ring, `reflectron rings ${i}`));
  if (s.closed) grp.add(gridLines(a, z1, ELECTRODE_COLORS.cap, `reflectron back plate ${i}`));
  grp.add(tubeOutline(a, z0, z1, ELECTRODE_COLORS.outline, `reflectron outline ${i}`));
  return grp;
}

/** Outline of a tube of radius a between z0 and z1 (mm): end circles and four lengthwise lines. */
function tubeOutline(a: number, z0: number, z1: number, color: Rgb, name: string): THREE.LineSegments {
  const pts: number[] = [];
  const N = 72;
  for (const z of [z0, z1]) {
    for (let i = 0; i < N; i++) {
      const p = (2 * Math.PI * i) / N, q = (2 * Math.PI * (i + 1)) / N;
      pts.push(a * Math.cos(p), a * Math.sin(p), z, a * Math.cos(q), a * Math.sin(q), z);
    }
  }
  for (let k = 0; k < 4; k++) {
    const p = Math.PI / 4 + (k * Math.PI) / 2;
    pts.push(a * Math.cos(p), a * Math.sin(p), z0, a * Math.cos(p), a * Math.sin(p), z1);
  }
  const geo = new THREE.BufferGeometry();
  geo.setAttribute('position', new THREE.Float32BufferAttribute(pts, 3));
  const line = new THREE.LineSegments(geo, new THREE.LineBasicMaterial({ color: new THREE.Color(...color), transparent: true, opacity: 0.8 }));
  line.name = name;
  return line;
}

/** Radius (mm) to outline stages whose aperture is infinite: the widest aperture or electrode radius seen. */
export function defaultTubeRadius(stages: readonly PlacedStage[]): number {
  let r = 0;
  for (const s of stages) {
    if (s.r0) for (const part of outlineOf(s)) if (part.reachR0) r = Math.max(r, s.r0 * MM * part.reachR0);
    if (s.aperture) r = Math.max(r, s.aperture * MM);
  }
  return r > 0 ? r : 5;
}

export function buildElectrodes(stages: readonly PlacedStage[], opts: ElectrodeOptions): THREE.Group {
  const root = new THREE.Group();
  root.name = 'electrodes';
  const tubeR = defaultTubeRadius(stages);
  stages.forEach((s, i) => {
    const z0 = s.zStart * MM, z1 = s.zEnd * MM;
    for (const part of outlineOf(s)) root.add(SHAPES[part.shape](s, opts, i, z0, z1, tubeR, part));
  });
  return root;
}

/** The stage's outline from its kind (sim/stages); a placed stage always has a known kind. */
function outlineOf(s: PlacedStage): OutlinePart[] {
  return kindNamed(s.type)?.outline(s as unknown as Record<string, unknown>) ?? [];
}

type ShapeBuilder = (s: PlacedStage, opts: ElectrodeOptions, i: number, z0: number, z1: number, tubeR: number, part: OutlinePart) => THREE.Object3D;

/** One builder per electrode shape of sim/stages/outline.ts. */
const SHAPES: Record<OutlinePart['shape'], ShapeBuilder> = {
  'rod-set': (s, opts, _i, _z0, _z1, _t, part) => (part.rods !== undefined && part.rods !== 4 ? multipoleRods(s, opts, part.rods) : quadrupole(s, opts)),
  'hyperbolic-trap': (s, opts) => trap(s, opts),
  tube: (s, _o, i, z0, z1, tubeR) => tubeOutline(s.aperture ? s.aperture * MM : tubeR, z0, z1, ELECTRODE_COLORS.outline, `drift tube ${i}`),
  'ring-stack': (s, _o, i, _z0, _z1, tubeR) => reflectron(s, s.aperture ? s.aperture * MM : tubeR, i),
  solids: (s, opts, i, _z0, _z1, _t, part) => solids(s, opts, i, part.solids ?? []),
  'grid-gap': (s, _o, i, z0, z1, tubeR) => {
      const a = s.aperture ? s.aperture * MM : tubeR;
      const grp = new THREE.Group();
      grp.name = `acceleration region ${i}`;
      grp.add(gridLines(a, z0, ELECTRODE_COLORS.grid, `entrance grid ${i}`), gridLines(a, z1, ELECTRODE_COLORS.grid, `exit grid ${i}`));
      grp.add(tubeOutline(a, z0, z1, ELECTRODE_COLORS.grid, `acceleration outline ${i}`));
      return grp;
  },
};

/**
 * The electrodes of a solved stage from their own shapes (sim/stages/electrodes/solids.ts), mm,
 * coloured by the sign of their volts. Revolved solids lose the 90° wedge facing the viewer (as
 * the ideal trap's electrodes do) and a rod-like cylinder or prism within 50° of the viewer is
 * drawn as its outline, so the ions inside stay in view.
 */
function solids(stage: PlacedStage, opts: ElectrodeOptions, i: number, parts: readonly SolidPart[]): THREE.Group {
  const g = new THREE.Group();
  g.name = `electrodes of stage ${i}`;
  const zs = stage.zStart * MM;
  const mats = [material(ELECTRODE_COLORS.rodNegative, 'electrode, negative volts'), material(ELECTRODE_COLORS.outline, 'electrode, 0 V'), material(ELECTRODE_COLORS.rodPositive, 'electrode, positive volts')];
  const cut = opts.cutAzimuth !== undefined;
  const near = (x: number, y: number) => cut && Math.hypot(x, y) > 0 && angleBetween(Math.atan2(y, x), opts.cutAzimuth!) < (50 * Math.PI) / 180;
  const problem = (stage.stored?.problem ?? {}) as { electrodes?: { name?: unknown }[] };
  const names = (problem.electrodes ?? []).map((e) => String(e.name));
  parts.forEach((p, k) => {
    let geo: THREE.BufferGeometry;
    let open = false;
    if (p.kind === 'prism') {
      const shape = new THREE.Shape(p.outline.map(([x, y]) => new THREE.Vector2(x * MM, y * MM)));
      for (const h of p.holes) shape.holes.push(new THREE.Path(h.map(([x, y]) => new THREE.Vector2(x * MM, y * MM))));
      geo = new THREE.ExtrudeGeometry(shape, { depth: (p.to - p.from) * MM, bevelEnabled: false, curveSegments: 1 });
      geo.translate(0, 0, zs + p.from * MM);
      const cx = p.outline.reduce((a, q) => a + q[0], 0) / p.outline.length, cy = p.outline.reduce((a, q) => a + q[1], 0) / p.outline.length;
      open = p.holes.length === 0 && near(cx, cy);
    } else if (p.kind === 'lathe') {
      const gap = cut ? Math.PI / 2 : 0;
      geo = lathe(p.profile.map(([r, z]) => new THREE.Vector2(r * MM, z * MM)), cut ? opts.cutAzimuth! + gap / 2 : 0, 2 * Math.PI - gap);
      geo.translate(p.center[0] * MM, p.center[1] * MM, zs);
    } else if (p.kind === 'box') {
      geo = new THREE.BoxGeometry((p.max[0] - p.min[0]) * MM, (p.max[1] - p.min[1]) * MM, (p.max[2] - p.min[2]) * MM);
      geo.translate(((p.min[0] + p.max[0]) / 2) * MM, ((p.min[1] + p.max[1]) / 2) * MM, zs + ((p.min[2] + p.max[2]) / 2) * MM);
    } else if (p.kind === 'cylinder') {
      geo = new THREE.CylinderGeometry(p.radius * MM, p.radius * MM, (p.to - p.from) * MM, 48, 1, false);
      // CylinderGeometry runs along +y: turned onto the axis, centred on its extent.
      geo.applyQuaternion(new THREE.Quaternion().setFromUnitVectors(new THREE.Vector3(0, 1, 0), new THREE.Vector3(...p.axis).normalize()));
      const mid = (p.from + p.to) / 2;
      geo.translate((p.base[0] + mid * p.axis[0]) * MM, (p.base[1] + mid * p.axis[1]) * MM, zs + (p.base[2] + mid * p.axis[2]) * MM);
      open = Math.abs(p.axis[2]) > 0.99 && near(p.base[0], p.base[1]);
    } else {
      geo = new THREE.SphereGeometry(p.radius * MM, 32, 16);
      geo.translate(p.center[0] * MM, p.center[1] * MM, zs + p.center[2] * MM);
    }
    const obj = open ? rodOutline(geo) : new THREE.Mesh(geo, mats[p.sign + 1]);
    obj.name = `${names[p.electrode] ?? `electrode ${p.electrode}`} ${k}${open ? ' (outline)' : ''}`;
    g.add(obj);
  });
  return g;
}
