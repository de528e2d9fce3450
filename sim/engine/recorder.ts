// Trajectory points of one batch, 8 doubles a point (ion, t, x, y, z, vx, vy, vz), grown by
// doubling so a push never allocates in the common case.

export class TrajectoryRecorder {
  data: Float64Array;
  points = 0;

  constructor(initialPoints = 4096) {
    this.data = new Float64Array(initialPoints * 8);
  }

  push(ion: number, t: number, x: number, y: number, z: number, vx: number, vy: number, vz: number): void {
    let o = this.points * 8;
    if (o + 8 > this.data.length) {
      const grown = new Float64Array(this.data.length * 2);
      grown.set(this.data);
      this.data = grown;
    }
    const d = this.data;
    d[o++] = ion; d[o++] = t; d[o++] = x; d[o++] = y; d[o++] = z; d[o++] = vx; d[o++] = vy; d[o] = vz;
    this.points++;
  }

  /** The recorded points, trimmed (a view: copy before reusing the recorder). */
  view(): Float64Array {
    return this.data.subarray(0, this.points * 8);
  }
}
