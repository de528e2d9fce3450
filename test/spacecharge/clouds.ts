// Test clouds drawn from the project's counter-based streams (reproducible, no Math.random).
import { RandomStream, Purpose } from '../../sim/random/counter.js';
import { allocateEnsemble, type Ensemble } from '../../sim/spacecharge/ensemble-step.js';

/** n ions uniform in a sphere of radius R (rejection sampling), at rest. */
export function uniformSphere(n: number, R: number, mass: number, charge: number, seed: number): Ensemble {
  const e = allocateEnsemble(n);
  for (let i = 0; i < n; i++) {
    const rs = new RandomStream(seed, i, Purpose.start);
    let x = 0, y = 0, z = 0;
    do { x = 2 * rs.uniform() - 1; y = 2 * rs.uniform() - 1; z = 2 * rs.uniform() - 1; } while (x * x + y * y + z * z > 1);
    e.x[i] = R * x; e.y[i] = R * y; e.z[i] = R * z;
    e.mass[i] = mass; e.charge[i] = charge;
  }
  return e;
}

/** n ions, Gaussian positions with RMS sizes (sr per transverse axis, sz), at rest. */
export function gaussianCloud(n: number, sr: number, sz: number, mass: number, charge: number, seed: number): Ensemble {
  const e = allocateEnsemble(n);
  for (let i = 0; i < n; i++) {
    const rs = new RandomStream(seed, i, Purpose.start);
    e.x[i] = sr * rs.normal(); e.y[i] = sr * rs.normal(); e.z[i] = sz * rs.normal();
    e.mass[i] = mass; e.charge[i] = charge;
  }
  return e;
}

/**
 * The points of a simple cubic lattice of spacing R/L inside a sphere of radius R, at rest. A
 * lattice has no random microfield (each ion's neighbours cancel by symmetry), so what is left of
 * the cloud's field is its smooth mean field: the sphere of the fluid solutions.
 */
export function latticeSphere(L: number, R: number, mass: number, charge: number): Ensemble {
  const a = R / L, K = Math.ceil(L), pts: number[] = [];
  for (let i = -K; i <= K; i++) for (let j = -K; j <= K; j++) for (let k = -K; k <= K; k++) {
    if (i * i + j * j + k * k <= L * L) pts.push(i * a, j * a, k * a);
  }
  const e = allocateEnsemble(pts.length / 3);
  for (let i = 0; i < e.n; i++) {
    e.x[i] = pts[3 * i]; e.y[i] = pts[3 * i + 1]; e.z[i] = pts[3 * i + 2];
    e.mass[i] = mass; e.charge[i] = charge;
  }
  return e;
}
