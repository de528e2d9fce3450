// Single-ion secular spectrum of an ensemble: the power of each ion's motion about the cloud
// centroid along one axis, summed over ions, on a frequency grid (a direct Fourier sum with a Hann
// window; F. J. Harris, Proc. IEEE 66, 51, 1978). The centroid is removed on purpose: in a field
// linear in position (the ideal trap) the centroid moves as one ion and shows no space-charge shift
// (the internal forces cancel in the sum, Newton's third law), while each ion's own secular
// motion is slowed by the cloud's field — the shift designers want to see.

import type { Ensemble } from './ensemble-step.js';

export class SecularSpectrum {
  readonly freqs: Float64Array;
  private readonly re: Float64Array; private readonly im: Float64Array;
  private readonly c: Float64Array; private readonly s: Float64Array;
  private samples = 0;

  /**
   * @param n ions; @param fLo, fHi band, Hz; @param nf grid points; @param t0, t1 window, s;
   * @param axis 'x' | 'y' | 'z'
   */
  constructor(readonly n: number, fLo: number, fHi: number, nf: number,
              readonly t0: number, readonly t1: number, readonly axis: 'x' | 'y' | 'z' = 'z') {
    if (!(fHi > fLo && fLo >= 0 && nf >= 3 && t1 > t0)) throw new RangeError('spectrum: need fHi > fLo ≥ 0 Hz, nf ≥ 3, t1 > t0');
    this.freqs = new Float64Array(nf);
    for (let k = 0; k < nf; k++) this.freqs[k] = fLo + ((fHi - fLo) * k) / (nf - 1);
    this.re = new Float64Array(n * nf); this.im = new Float64Array(n * nf);
    this.c = new Float64Array(nf); this.s = new Float64Array(nf);
  }

  /** Adds the sample at time t (ignored outside [t0, t1]). Removed ions are skipped. */
  add(t: number, e: Ensemble): void {
    if (t < this.t0 || t > this.t1) return;
    const u = this.axis === 'x' ? e.x : this.axis === 'y' ? e.y : e.z;
    const nf = this.freqs.length;
    let m = 0, c0 = 0;
    for (let i = 0; i < this.n; i++) if (e.alive[i]) { m++; c0 += u[i]; }
    if (m === 0) return;
    c0 /= m;
    const w = 0.5 - 0.5 * Math.cos((2 * Math.PI * (t - this.t0)) / (this.t1 - this.t0)); // Hann
    for (let k = 0; k < nf; k++) {
      const ph = 2 * Math.PI * this.freqs[k] * (t - this.t0);
      this.c[k] = w * Math.cos(ph); this.s[k] = w * Math.sin(ph);
    }
    const { re, im, c, s } = this;
    for (let i = 0; i < this.n; i++) {
      if (!e.alive[i]) continue;
      const d = u[i] - c0, base = i * nf;
      for (let k = 0; k < nf; k++) { re[base + k] += d * c[k]; im[base + k] -= d * s[k]; }
    }
    this.samples++;
  }

  /** Power summed over ions, per grid frequency (arbitrary units). */
  power(): Float64Array {
    const nf = this.freqs.length, p = new Float64Array(nf);
    for (let i = 0; i < this.n; i++) {
      const base = i * nf;
      for (let k = 0; k < nf; k++) p[k] += this.re[base + k] ** 2 + this.im[base + k] ** 2;
    }
    return p;
  }

  /** Frequency of the strongest line, Hz, refined by a parabola through the top three points. */
  peak(): number {
    const p = this.power(), f = this.freqs, nf = f.length;
    let k = 0;
    for (let j = 1; j < nf; j++) if (p[j] > p[k]) k = j;
    if (k === 0 || k === nf - 1) return f[k];
    const a = p[k - 1], b = p[k], c = p[k + 1];
    const den = a - 2 * b + c;
    const off = den !== 0 ? (0.5 * (a - c)) / den : 0;
    return f[k] + off * (f[1] - f[0]);
  }
}
