// Per-pixel min/max decimation of a time series: within each pixel column keep the first, the
// lowest, the highest and the last sample (in the order they occur), so the drawn polyline covers
// exactly the pixels the full series would, with at most 4 vertices per column whatever the number
// of samples (the "M4" aggregation of Jugel et al., "M4: A Visualization-Oriented Time Series Data
// Aggregation", PVLDB 7(10), 2014). Input must be sorted by t within [start, end).

/** Scratch output: interleaved (px, y) pairs; grown once to 8 × columns, reused between calls. */
export class Decimator {
  private out = new Float64Array(0);

  /**
   * Decimate samples start..end-1 with pixel column px = ax + bx·t. Returns the vertex count n;
   * the vertices are (this.xy[2k], this.xy[2k+1]) for k < n, x in pixels, y in data units.
   * Samples with non-finite values are dropped.
   */
  run(t: ArrayLike<number>, y: ArrayLike<number>, start: number, end: number, ax: number, bx: number): number {
    const need = 2 * 4 * (Math.ceil(Math.abs(bx * ((t[end - 1] ?? 0) - (t[start] ?? 0)))) + 2);
    if (this.out.length < need) this.out = new Float64Array(Math.max(need, 2 * this.out.length));
    const out = this.out;
    let n = 0;
    let col = NaN;
    let firstY = 0, lastY = 0, minY = 0, maxY = 0, firstX = 0, lastX = 0, minI = 0, maxI = 0, count = 0;
    const emit = () => {
      // Vertices in time order: first, then min/max in the order they occurred, then last.
      out[2 * n] = firstX; out[2 * n + 1] = firstY; n++;
      if (count > 1) {
        const cx = col + 0.5;
        if (minI <= maxI) {
          out[2 * n] = cx; out[2 * n + 1] = minY; n++;
          out[2 * n] = cx; out[2 * n + 1] = maxY; n++;
        } else {
          out[2 * n] = cx; out[2 * n + 1] = maxY; n++;
          out[2 * n] = cx; out[2 * n + 1] = minY; n++;
        }
        out[2 * n] = lastX; out[2 * n + 1] = lastY; n++;
      }
    };
    for (let i = start; i < end; i++) {
      const v = y[i];
      const X = ax + bx * t[i];
      if (!Number.isFinite(v) || !Number.isFinite(X)) continue;
      const c = Math.floor(X);
      if (c !== col) {
        if (count > 0) emit();
        col = c; count = 0;
        firstY = lastY = minY = maxY = v; firstX = lastX = X; minI = maxI = i;
      } else {
        lastY = v; lastX = X;
        if (v < minY) { minY = v; minI = i; }
        if (v > maxY) { maxY = v; maxI = i; }
      }
      count++;
    }
    if (count > 0) emit();
    return n;
  }

  get xy(): Float64Array { return this.out; }
}
