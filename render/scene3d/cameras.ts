// Camera presets. iso: perspective from upstream-left-above; axial: orthographic looking back
// down the axis (x right, y up); side: orthographic from −x so z runs left to right. Each preset is
// fitted to the scene box so the figure fills the drawing area given in pixels.

import * as THREE from 'three';
import { RenderError } from './errors.js';
import { closest } from '../../cli/args.js';

export const CAMERA_NAMES = ['iso', 'axial', 'side'] as const;
export type CameraName = (typeof CAMERA_NAMES)[number];

export function parseCameraName(text: string): CameraName {
  if ((CAMERA_NAMES as readonly string[]).includes(text)) return text as CameraName;
  const hint = closest(text, CAMERA_NAMES);
  throw new RenderError(`--camera: unknown camera '${text}'${hint ? ` (did you mean '${hint}'?)` : ''}; expected ${CAMERA_NAMES.join('|')}`);
}

/** Direction from the scene centre to the camera. */
export function cameraDirection(name: CameraName): THREE.Vector3 {
  switch (name) {
    case 'iso': return new THREE.Vector3(-0.78, 0.52, -0.5).normalize();
    case 'axial': return new THREE.Vector3(0, 0, 1);
    case 'side': return new THREE.Vector3(-1, 0, 0);
  }
}

/** Drawing area inside the image, pixels from each edge. */
export interface Margins { top: number; right: number; bottom: number; left: number }

export function makeCamera(name: CameraName, bounds: THREE.Box3, width: number, height: number, margins: Margins): THREE.Camera {
  const center = bounds.getCenter(new THREE.Vector3());
  const radius = Math.max(1e-6, bounds.getBoundingSphere(new THREE.Sphere()).radius);
  const dir = cameraDirection(name);
  const aspect = width / height;
  let cam: THREE.PerspectiveCamera | THREE.OrthographicCamera;
  let dist: number;
  if (name === 'iso') {
    const fov = 28;
    dist = radius / Math.sin(THREE.MathUtils.degToRad(fov / 2));
    cam = new THREE.PerspectiveCamera(fov, aspect, dist - 1.5 * radius, dist + 1.5 * radius);
  } else {
    dist = 3 * radius;
    cam = new THREE.OrthographicCamera(-radius * aspect, radius * aspect, radius, -radius, dist - 1.5 * radius, dist + 1.5 * radius);
  }
  cam.position.copy(center).addScaledVector(dir, dist);
  cam.up.set(0, 1, 0);
  cam.lookAt(center);
  cam.updateProjectionMatrix();
  cam.updateMatrixWorld(true);
  fitToArea(cam, bounds, width, height, margins);
  return cam;
}

/** Scale and shift the projection (in NDC, uniformly) so the box corners fill the drawing area. */
function fitToArea(cam: THREE.Camera, b: THREE.Box3, W: number, H: number, m: Margins): void {
  const vp = new THREE.Matrix4().multiplyMatrices(cam.projectionMatrix, cam.matrixWorldInverse);
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  const p = new THREE.Vector3();
  for (let i = 0; i < 8; i++) {
    p.set(i & 1 ? b.max.x : b.min.x, i & 2 ? b.max.y : b.min.y, i & 4 ? b.max.z : b.min.z).applyMatrix4(vp);
    x0 = Math.min(x0, p.x); x1 = Math.max(x1, p.x); y0 = Math.min(y0, p.y); y1 = Math.max(y1, p.y);
  }
  // Target rectangle in NDC.
  const tx0 = -1 + (2 * m.left) / W, tx1 = 1 - (2 * m.right) / W;
  const ty0 = -1 + (2 * m.bottom) / H, ty1 = 1 - (2 * m.top) / H;
  // Uniform in pixels: NDC x spans W px, y spans H px, so the same NDC factor keeps the aspect.
  const s = Math.min((tx1 - tx0) / Math.max(1e-9, x1 - x0), (ty1 - ty0) / Math.max(1e-9, y1 - y0));
  const ox = (tx0 + tx1) / 2 - s * (x0 + x1) / 2;
  const oy = (ty0 + ty1) / 2 - s * (y0 + y1) / 2;
  // clip' = F·clip with x' = s·x + ox·w (and y alike), so after the divide ndc' = s·ndc + ox.
  const F = new THREE.Matrix4().set(s, 0, 0, ox, 0, s, 0, oy, 0, 0, 1, 0, 0, 0, 0, 1);
  cam.projectionMatrix.premultiply(F);
  cam.projectionMatrixInverse.copy(cam.projectionMatrix).invert();
}
