// The tricubic gradient of a pair of fields in WebAssembly SIMD (pair3.wat): one compiled module
// per process, one instance per interpolant with its own memory holding the two fields as planes.
// The weights live in the instance's memory too, so the interpolant writes them there directly.

import { PAIR3_WASM } from './pair3-binary.js';

let compiled: WebAssembly.Module | null | undefined;

/** The compiled module, or null where WebAssembly SIMD is not available (the scalar path serves). */
function module(): WebAssembly.Module | null {
  if (compiled === undefined) {
    try {
      compiled = new WebAssembly.Module(Buffer.from(PAIR3_WASM, 'base64'));
    } catch {
      compiled = null;
    }
  }
  return compiled;
}

/** Bytes before the dc plane: weights (288) and result (24), rounded up. */
const HEADER = 512;

export class Pair3Simd {
  /** Per axis the value and derivative weights (views on the instance's memory). */
  readonly wv: Float64Array[];
  readonly wd: Float64Array[];
  /** ∂x, ∂y, ∂z of the last gradient(). */
  readonly result: Float64Array;
  private readonly run: (base: number, cr: number) => void;

  private constructor(inst: WebAssembly.Instance, memory: WebAssembly.Memory) {
    const buf = memory.buffer;
    this.wv = [0, 1, 2].map((a) => new Float64Array(buf, 96 * a, 6));
    this.wd = [0, 1, 2].map((a) => new Float64Array(buf, 96 * a + 48, 6));
    this.result = new Float64Array(buf, 288, 3);
    this.run = inst.exports.gradient as (base: number, cr: number) => void;
  }

  /**
   * An instance holding the interleaved pair `f` (node n at 2n, 2n + 1) of a grid n0 × n1 × n2 as
   * two planes, or null without WebAssembly SIMD or beyond its 4 GiB of memory.
   */
  static create(f: Float64Array, n0: number, n1: number, n2: number): Pair3Simd | null {
    const mod = module();
    const nodes = n0 * n1 * n2;
    const bytes = HEADER + 16 * nodes;
    if (mod === null || bytes > 2 ** 32 - 2 ** 16) return null;
    // The module exports its own memory of one page: grown to size before any view is made (a
    // grow detaches the views of the old buffer).
    const inst = new WebAssembly.Instance(mod, {});
    const mem = inst.exports.memory as WebAssembly.Memory;
    const need = Math.ceil(bytes / 65536) - mem.buffer.byteLength / 65536;
    if (need > 0) mem.grow(need);
    const dc = new Float64Array(mem.buffer, HEADER, nodes), rf = new Float64Array(mem.buffer, HEADER + 8 * nodes, nodes);
    for (let n = 0; n < nodes; n++) { dc[n] = f[2 * n]; rf[n] = f[2 * n + 1]; }
    (inst.exports.layout as (s1: number, s2: number, rf: number) => void)(8 * n0, 8 * n0 * n1, 8 * nodes);
    return new Pair3Simd(inst, mem);
  }

  /** ∇(φ_dc + cr φ_rf) over the window at node (b0, b1, b2), with the weights already written, into result. */
  gradient(b0: number, b1: number, b2: number, s1: number, s2: number, cr: number): void {
    this.run(HEADER + 8 * (b2 * s2 + b1 * s1 + b0), cr);
  }
}
