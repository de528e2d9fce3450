// Classic fixed-step fourth-order Runge–Kutta (Hairer, Nørsett & Wanner, Solving Ordinary
// Differential Equations I, 2nd ed., Table II.1.2 "the" Runge–Kutta method):
//   k1 = f(t, y)            k2 = f(t + h/2, y + h/2 k1)
//   k3 = f(t + h/2, y + h/2 k2)   k4 = f(t + h, y + h k3)
//   y1 = y + h/6 (k1 + 2 k2 + 2 k3 + k4)
// Scratch vectors are allocated once per instance; step() and integrate() allocate nothing.

import type { Derivative } from './derivative.js';

export class Rk4 {
  readonly n: number;
  private readonly k1: Float64Array;
  private readonly k2: Float64Array;
  private readonly k3: Float64Array;
  private readonly k4: Float64Array;
  private readonly tmp: Float64Array;

  constructor(n: number) {
    if (!Number.isInteger(n) || n <= 0) throw new RangeError(`Rk4: dimension must be a positive integer, got ${n}`);
    this.n = n;
    this.k1 = new Float64Array(n);
    this.k2 = new Float64Array(n);
    this.k3 = new Float64Array(n);
    this.k4 = new Float64Array(n);
    this.tmp = new Float64Array(n);
  }

  /** One step of size h from t; y is overwritten with y(t + h). */
  step(f: Derivative, t: number, y: Float64Array, h: number): void {
    const { n, k1, k2, k3, k4, tmp } = this;
    const h2 = 0.5 * h;
    f(t, y, k1);
    for (let i = 0; i < n; i++) tmp[i] = y[i] + h2 * k1[i];
    f(t + h2, tmp, k2);
    for (let i = 0; i < n; i++) tmp[i] = y[i] + h2 * k2[i];
    f(t + h2, tmp, k3);
    for (let i = 0; i < n; i++) tmp[i] = y[i] + h * k3[i];
    f(t + h, tmp, k4);
    const h6 = h / 6;
    for (let i = 0; i < n; i++) y[i] += h6 * (k1[i] + 2 * (k2[i] + k3[i]) + k4[i]);
  }

  /**
   * Integrate from t0 to t1 in `steps` equal steps; y (initial state) is overwritten with y(t1).
   * Times are t0 + k·h computed from k, so no rounding drift accumulates over many steps.
   */
  integrate(f: Derivative, t0: number, y: Float64Array, t1: number, steps: number): void {
    if (!Number.isInteger(steps) || steps <= 0) throw new RangeError(`Rk4: steps must be a positive integer, got ${steps}`);
    const h = (t1 - t0) / steps;
    for (let k = 0; k < steps; k++) this.step(f, t0 + k * h, y, h);
  }
}
