// The tricubic (and bicubic) gradient of a pair of fields in WebAssembly SIMD (pair3.wat): one compiled module
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
  /** The weights, per axis a the values at 12a and the derivatives at 12a + 6 (a view on the instance's memory). */
  readonly weights: Float64Array;
  /** ∂x, ∂y, ∂z of the last gradient(). */
  readonly result: Float64Array;
  private readonly run: (base: number, cr: number) => void;
  private readonly run2: (base: number, cr: number) => void;

  private constructor(inst: WebAssembly.Instance, memory: WebAssembly.Memory) {
    const buf = memory.buffer;
    this.weights = new Float64Array(buf, 0, 36);
    this.result = new Float64Array(buf, 288, 3);
    this.run = inst.exports.gradient as (base: number, cr: number) => void;
    this.run2 = inst.exports.gradient2 as (base: number, cr: number) => void;
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
    // Made at its full size and never grown: a grow detaches the old buffer, and once any buffer
    // has been detached V8 checks every typed-array access of the process for it (its
    // array-buffer-detaching protector), which slows every kernel.
    const mem = new WebAssembly.Memory({ initial: Math.ceil(bytes / 65536) });
    const inst = new WebAssembly.Instance(mod, { env: { memory: mem } });
    const dc = new Float64Array(mem.buffer, HEADER, nodes), rf = new Float64Array(mem.buffer, HEADER + 8 * nodes, nodes);
    for (let n = 0; n < nodes; n++) { dc[n] = f[2 * n]; rf[n] = f[2 * n + 1]; }
    (inst.exports.layout as (s1: number, s2: number, rf: number) => void)(8 * n0, 8 * n0 * n1, 8 * nodes);
    return new Pair3Simd(inst, mem);
  }

  /** The bicubic form (planar and axial grids): the two derivatives along the grid's axes into result[0..1]. */
  gradient2(b0: number, b1: number, s1: number, cr: number): void {
    this.run2(HEADER + 8 * (b1 * s1 + b0), cr);
  }

  /** ∇(φ_dc + cr φ_rf) over the window at node (b0, b1, b2), with the weights already written, into result. */
  gradient(b0: number, b1: number, b2: number, s1: number, s2: number, cr: number): void {
    this.run(HEADER + 8 * (b2 * s2 + b1 * s1 + b0), cr);
  }
}
