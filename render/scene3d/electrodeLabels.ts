// Where the electrode labels of the 3D view point: each stage kind names its electrodes and their
// voltages (StageKind.electrodeLabels, sim/stages); here its anchors become points in scene
// millimetres, and one per label is picked for a camera: the nearest to it among those not cut
// away, so the leader line ends on the side of the electrode the viewer sees.

import * as THREE from 'three';
import { kindNamed } from '../../sim/stages/registry.js';
import { defaultTubeRadius, MM } from './electrodes.js';
import type { PlacedStage } from './runInput.js';

export interface LabelPoints {
  text: string;
  /** Candidate leader-line ends on the electrode, mm. */
  points: THREE.Vector3[];
}

/** Azimuths tried for an electrode that goes all round (every 45°). */
const ROUND = Array.from({ length: 8 }, (_, k) => (k * Math.PI) / 4);
/** An all-round electrode is cut ±45° about the viewer (electrodes.ts); keep clear of the wedge. */
const CUT_CLEARANCE = (50 * Math.PI) / 180;

const angleBetween = (a: number, b: number) => Math.abs(((a - b) % (2 * Math.PI) + 3 * Math.PI) % (2 * Math.PI) - Math.PI);

export function electrodeLabelPoints(stages: readonly PlacedStage[], cutAzimuth: number | undefined): LabelPoints[] {
  const tubeR = defaultTubeRadius(stages);
  const out: LabelPoints[] = [];
  for (const s of stages) {
    const labels = kindNamed(s.type)?.electrodeLabels(s.stored ?? {}) ?? [];
    const rim = s.aperture ? s.aperture * MM : tubeR;
    for (const lb of labels) {
      const points: THREE.Vector3[] = [];
      for (const a of lb.at) {
        const r = a.rim ? a.r * rim : a.r * MM;
        const z = s.zStart * MM + a.z * MM;
        let az = a.azimuths ?? ROUND;
        if (a.azimuths === undefined && cutAzimuth !== undefined) az = az.filter((p) => angleBetween(p, cutAzimuth) > CUT_CLEARANCE);
        for (const p of az) points.push(new THREE.Vector3(r * Math.cos(p), r * Math.sin(p), z));
      }
      if (points.length > 0) out.push({ text: lb.text, points });
    }
  }
  return out;
}

/** The candidate nearest the camera (smallest NDC depth), in mm. */
export function pickAnchor(label: LabelPoints, camera: THREE.Camera): THREE.Vector3 {
  let best = label.points[0], bestZ = Infinity;
  const p = new THREE.Vector3();
  for (const c of label.points) {
    p.copy(c).project(camera);
    // Ties (symmetric candidates, e.g. looking down the axis) go to the first, so the pick does not flip on rounding.
    if (p.z < bestZ - 1e-9) { bestZ = p.z; best = c; }
  }
  return best;
}
