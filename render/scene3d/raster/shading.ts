// Lambert diffuse shading, I = ambient + Σ k_i |n·l_i| (J. H. Lambert, Photometria (1760); as in
// Foley et al., "Computer Graphics: Principles and Practice", 2nd ed., eq. 16.7). Lights are fixed
// in view space (key from upper left, weak fill from lower right) so every preset reads the same;
// |n·l| makes surfaces two-sided, since cut-away electrodes show their inner faces.

const norm = (x: number, y: number, z: number): [number, number, number] => {
  const l = Math.hypot(x, y, z);
  return [x / l, y / l, z / l];
};

const KEY = norm(-0.45, 0.7, 0.55);
const FILL = norm(0.6, -0.35, 0.7);
const AMBIENT = 0.3, K_KEY = 0.68, K_FILL = 0.2;

/** Intensity for a unit normal given in view space. */
export function lambert(nx: number, ny: number, nz: number): number {
  return AMBIENT
    + K_KEY * Math.abs(nx * KEY[0] + ny * KEY[1] + nz * KEY[2])
    + K_FILL * Math.abs(nx * FILL[0] + ny * FILL[1] + nz * FILL[2]);
}
