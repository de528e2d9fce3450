// Electrode surfaces against their defining equations.
import { describe, expect, it } from 'vitest';
import * as THREE from 'three';
import { buildElectrodes, ROUND_ROD_RATIO } from '../../render/scene3d/electrodes.js';
import type { PlacedStage } from '../../render/scene3d/runInput.js';

const quad: PlacedStage = { type: 'quadrupole', zStart: 0, zEnd: 0.1, r0: 4e-3 };
const trap: PlacedStage = { type: 'trap', zStart: 0, zEnd: 2 * 7.07e-3, r0: 10e-3, z0: 7.07e-3, aperture: 1e-3 };

function worldVertices(root: THREE.Object3D, filter: (m: THREE.Mesh) => boolean): THREE.Vector3[] {
  root.updateMatrixWorld(true);
  const out: THREE.Vector3[] = [];
  root.traverse((o) => {
    const m = o as THREE.Mesh;
    if (!m.isMesh || !filter(m)) return;
    const pos = m.geometry.getAttribute('position');
    for (let i = 0; i < pos.count; i++) out.push(new THREE.Vector3().fromBufferAttribute(pos, i).applyMatrix4(m.matrixWorld));
  });
  return out;
}

describe('quadrupole rods', () => {
  it('hyperbolic faces lie on x² − y² = ±r0² and no rod comes closer to the axis than r0', () => {
    // Dawson (1976) ch. 2: the ideal electrodes are the equipotentials x² − y² = ±r0².
    const r0 = 4; // mm
    const g = buildElectrodes([quad], { rods: 'hyperbolic' });
    const pts = worldVertices(g, () => true);
    let onFace = 0;
    for (const p of pts) {
      const rho = Math.hypot(p.x, p.y);
      expect(rho).toBeGreaterThanOrEqual(r0 * (1 - 1e-6));
      const h = Math.abs(Math.abs(p.x * p.x - p.y * p.y) - r0 * r0);
      // Float32 positions: relative error ~1e-7 of x² ≈ 30 mm², so 1e-4 mm² is far above rounding.
      if (h < 1e-4) onFace++;
    }
    // 29 face samples × 2 ends × (side wall + end cap) per rod at least.
    expect(onFace).toBeGreaterThanOrEqual(4 * 29 * 2);
    expect(g.getObjectByName('rod +x')).toBeDefined();
  });

  it('round rods have radius 1.1468·r0 and their surface starts at r0 from the axis', () => {
    // Denison, J. Vac. Sci. Technol. 8, 266 (1971) ratio (value from memory).
    const r0 = 4;
    const g = buildElectrodes([quad], { rods: 'cylindrical' });
    const pts = worldVertices(g, (m) => m.name === 'rod +x');
    const R = ROUND_ROD_RATIO * r0, cx = r0 + R;
    let minRho = Infinity;
    for (const p of pts) {
      if (Math.abs(Math.hypot(p.x - cx, p.y) - R) > 1e-4 && Math.hypot(p.x - cx, p.y) > 1e-4) {
        throw new Error(`vertex off the cylinder: ${p.x}, ${p.y}`);
      }
      minRho = Math.min(minRho, Math.hypot(p.x, p.y));
    }
    expect(minRho).toBeCloseTo(r0, 4);
  });

  it('the rod toward the viewer becomes an outline when the view is opened', () => {
    const g = buildElectrodes([quad], { rods: 'hyperbolic', cutAzimuth: Math.PI });
    expect(g.getObjectByName('rod −x (outline)')).toBeDefined();
    expect(g.getObjectByName('rod +x')).toBeDefined();
  });
});

describe('trap electrodes (LatheGeometry of the hyperbolae)', () => {
  // March & Todd (2005) ch. 2: ring r² − 2z² = r0², end caps 2z² − r² = 2z0² (about the trap centre).
  const r0 = 10, z0 = 7.07, zc = z0;
  const g = buildElectrodes([trap], { rods: 'hyperbolic' });

  it('ring face vertices satisfy r² − 2z² = r0²', () => {
    const pts = worldVertices(g, (m) => m.name === 'ring');
    const onFace = pts.filter((p) => Math.abs(p.x * p.x + p.y * p.y - 2 * (p.z - zc) ** 2 - r0 * r0) < 1e-3);
    // 49 profile points × 73 meridians on the face; Float32 error of r² ≈ 100 mm² is ~1e-5.
    expect(onFace.length).toBeGreaterThanOrEqual(49 * 73);
    for (const p of pts) expect(Math.hypot(p.x, p.y)).toBeGreaterThanOrEqual(r0 * (1 - 1e-6));
  });

  it('end-cap face vertices satisfy 2z² − r² = 2z0², one cap on each side', () => {
    for (const [name, sign] of [['end cap +z', 1], ['end cap −z', -1]] as const) {
      const pts = worldVertices(g, (m) => m.name === name);
      const onFace = pts.filter((p) => Math.abs(2 * (p.z - zc) ** 2 - (p.x * p.x + p.y * p.y) - 2 * z0 * z0) < 1e-3);
      expect(onFace.length).toBeGreaterThanOrEqual(41 * 73);
      for (const p of onFace) expect(Math.sign(p.z - zc)).toBe(sign);
      // Nearest cap point to the centre along the axis is z0 (within the hole radius 1 mm: √(z0² + 0.5)).
      const nearest = Math.min(...onFace.map((p) => Math.abs(p.z - zc)));
      expect(nearest).toBeCloseTo(Math.sqrt(z0 * z0 + 0.5), 3);
    }
  });

  it('cutting a wedge toward the viewer removes the vertices on that side and adds section faces', () => {
    const cut = buildElectrodes([trap], { rods: 'hyperbolic', cutAzimuth: 0 });
    const pts = worldVertices(cut, (m) => m.name === 'ring');
    // The wedge is ±45° about +x: no ring vertex strictly inside it.
    const inside = pts.filter((p) => Math.abs(Math.atan2(p.y, p.x)) < Math.PI / 4 - 1e-3);
    expect(inside.length).toBe(0);
    expect(cut.getObjectByName('section')).toBeDefined();
  });
});
