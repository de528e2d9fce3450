// The 3D drawing of solved electrodes stages from their own shapes (sim/stages/electrodes/solids.ts,
// render/scene3d/electrodes.ts): every shape of the demo scenes becomes a solid whose size is the
// shape's (bounding boxes against the dimensions written in the scene files), holes cut where the
// drawing can cut them, and a quarter of revolved electrodes open towards the viewer.

import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import * as THREE from 'three';
import { parseScene } from '../../sim/scene/load.js';
import { electrodeSolids } from '../../sim/stages/electrodes/solids.js';
import { buildElectrodes } from '../../render/scene3d/electrodes.js';
import type { PlacedStage } from '../../render/scene3d/runInput.js';
import { ROOT } from '../helpers/cli.js';

function placed(file: string): PlacedStage {
  const st = parseScene(readFileSync(join(ROOT, 'scenes', file), 'utf8'), file).stages[0];
  return { type: st.type, zStart: st.zStart, zEnd: st.zEnd, stored: JSON.parse(JSON.stringify(st)) as Record<string, unknown> };
}

const meshes = (g: THREE.Object3D) => { const out: THREE.Object3D[] = []; g.traverse((o) => { if (o instanceof THREE.Mesh || o instanceof THREE.LineSegments) out.push(o); }); return out; };
const box = (o: THREE.Object3D) => new THREE.Box3().setFromObject(o);

describe('electrodes stages drawn from their shapes', () => {
  it('QF-4R: four round rods of 4.52 mm between two 28 mm plates with 3 mm holes', () => {
    const s = placed('qf4r-round-rods.yaml');
    const parts = electrodeSolids(s.stored!);
    expect(parts.filter((p) => p.kind === 'cylinder')).toHaveLength(4);
    const plates = parts.filter((p) => p.kind === 'prism');
    expect(plates).toHaveLength(2);
    for (const p of plates) if (p.kind === 'prism') expect(p.holes).toHaveLength(1);
    const g = buildElectrodes([s], { rods: 'cylindrical' });
    const objs = meshes(g);
    expect(objs).toHaveLength(6);
    const rod = box(objs.find((o) => o.name.startsWith('rods x'))!);
    // Rod centre 8.52 mm off the axis, radius 4.52 mm, from 4 to 36 mm (mm in the scene).
    expect(rod.max.x - rod.min.x).toBeCloseTo(9.04, 2);
    expect((rod.max.x + rod.min.x) / 2).toBeCloseTo(8.52, 2);
    expect(rod.min.z).toBeCloseTo(4, 6);
    expect(rod.max.z).toBeCloseTo(36, 6);
    const plate = box(objs.find((o) => o.name.startsWith('plates'))!);
    expect(plate.max.x - plate.min.x).toBeCloseTo(28, 6);
    expect(plate.max.z - plate.min.z).toBeCloseTo(1, 6);
    // The hole is cut: no triangle of the plate's front face covers the axis.
    const geo = (objs.find((o) => o.name.startsWith('plates')) as THREE.Mesh).geometry;
    const ray = new THREE.Raycaster(new THREE.Vector3(0, 0, -5), new THREE.Vector3(0, 0, 1));
    expect(ray.intersectObject(new THREE.Mesh(geo, new THREE.MeshBasicMaterial({ side: THREE.DoubleSide })))).toHaveLength(0);
  });

  it('T-7T: ring and end caps revolved to 12 mm, the quarter facing the viewer left open', () => {
    const s = placed('t7t-truncated-trap.yaml');
    const parts = electrodeSolids(s.stored!);
    expect(parts.map((p) => p.kind)).toEqual(['lathe', 'lathe', 'lathe']);
    const whole = meshes(buildElectrodes([s], { rods: 'cylindrical' }));
    const ring = box(whole[0]);
    // Ring truncated at r = 12 mm (scene), so the drawing spans ±12 mm across.
    expect(ring.max.x).toBeCloseTo(12, 1);
    expect(ring.min.y).toBeCloseTo(-12, 1);
    // Cut towards +x: no part of the ring there any more (its extent in x stops short of 12 mm on
    // that side by the wedge), while the −x side is whole.
    const cut = box(meshes(buildElectrodes([s], { rods: 'cylindrical', cutAzimuth: 0 }))[0]);
    expect(cut.max.x).toBeLessThan(12 * Math.cos(Math.PI / 4) + 1e-6);
    expect(cut.min.x).toBeCloseTo(-12, 1);
  });
});
