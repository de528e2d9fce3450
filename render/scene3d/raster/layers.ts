// Pixel layers of the software renderer, allocated once per image and reused for every primitive.
// Electrodes are rasterised at `ss`× resolution (supersampled edges) and resolved to the image
// grid; polylines are drawn straight on the image grid with analytic coverage.

export class Layers {
  readonly ssW: number;
  readonly ssH: number;
  /** Supersampled electrode colour (RGB) and depth (NDC z, +Inf where empty). */
  readonly sColor: Float32Array;
  readonly sDepth: Float32Array;
  /** Resolved electrode layer on the image grid: mean colour over covered samples, coverage, nearest depth. */
  readonly eColor: Float32Array;
  readonly eCover: Float32Array;
  readonly eDepth: Float32Array;
  /** Polyline layer: premultiplied RGB, alpha and nearest depth. */
  readonly lColor: Float32Array;
  readonly lAlpha: Float32Array;
  readonly lDepth: Float32Array;
  /** Scratch of one polyline: max coverage per pixel, its depth and colour there, and the pixels touched. */
  readonly pCover: Float32Array;
  readonly pColor: Float32Array;
  readonly pDepth: Float32Array;
  readonly touched: Int32Array;

  constructor(readonly width: number, readonly height: number, readonly ss: number) {
    this.ssW = width * ss;
    this.ssH = height * ss;
    const n = width * height, ns = this.ssW * this.ssH;
    this.sColor = new Float32Array(3 * ns);
    this.sDepth = new Float32Array(ns).fill(Infinity);
    this.eColor = new Float32Array(3 * n);
    this.eCover = new Float32Array(n);
    this.eDepth = new Float32Array(n).fill(Infinity);
    this.lColor = new Float32Array(3 * n);
    this.lAlpha = new Float32Array(n);
    this.lDepth = new Float32Array(n).fill(Infinity);
    this.pCover = new Float32Array(n);
    this.pColor = new Float32Array(3 * n);
    this.pDepth = new Float32Array(n).fill(Infinity);
    this.touched = new Int32Array(n);
  }

  /** Box-filter the supersampled electrode layer down to the image grid. */
  resolveElectrodes(): void {
    const { ss, ssW, width, height, sColor, sDepth, eColor, eCover, eDepth } = this;
    const inv = 1 / (ss * ss);
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        let r = 0, g = 0, b = 0, c = 0, d = Infinity;
        for (let j = 0; j < ss; j++) {
          let s = (y * ss + j) * ssW + x * ss;
          for (let i = 0; i < ss; i++, s++) {
            const z = sDepth[s];
            if (z === Infinity) continue;
            c++;
            r += sColor[3 * s]; g += sColor[3 * s + 1]; b += sColor[3 * s + 2];
            if (z < d) d = z;
          }
        }
        const p = y * width + x;
        if (c > 0) {
          eColor[3 * p] = r / c; eColor[3 * p + 1] = g / c; eColor[3 * p + 2] = b / c;
        }
        eCover[p] = c * inv;
        eDepth[p] = d;
      }
    }
  }
}
