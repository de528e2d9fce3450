// Per-batch scratch the gas kernels keep beside an IonBatch: each ion's gas-stream key (computed
// once, not per step) and a few numbers of per-ion state, interleaved (the hard-sphere model keeps
// its remaining optical depth, speed bound and majorant rate there). Keyed by the batch object; a slot is valid while it holds the same global ion index, so a
// batch refilled with other ions re-initialises those slots instead of inheriting state.

import type { IonBatch } from '../core/batch.js';
import { Purpose, streamKey } from '../random/counter.js';

export interface GasScratch {
  /** Global ion index the slot was set up for; -1 = unused. */
  owner: Float64Array;
  /** Key words of streamKey(seed, index, Purpose.gas). */
  k0: Uint32Array;
  k1: Uint32Array;
  /** Kernel-specific per-ion state: `stride` numbers per ion, ion i at [stride·i, stride·i + stride). */
  state: Float64Array;
}

export class GasScratchTable {
  private readonly table = new WeakMap<IonBatch, GasScratch>();
  constructor(private readonly seed: number, private readonly stride = 1) {}

  /** The scratch of `batch`, allocated on first use (once per batch, never per step). */
  of(batch: IonBatch): GasScratch {
    let s = this.table.get(batch);
    if (s === undefined || s.owner.length < batch.n) {
      const n = batch.index.length;
      s = { owner: new Float64Array(n).fill(-1), k0: new Uint32Array(n), k1: new Uint32Array(n), state: new Float64Array(n * this.stride) };
      this.table.set(batch, s);
    }
    return s;
  }

  /** Set slot i up for the ion now in it (its stream key); the caller initialises `state`. */
  claim(s: GasScratch, batch: IonBatch, i: number): void {
    const [k0, k1] = streamKey(this.seed, batch.index[i], Purpose.gas);
    s.k0[i] = k0;
    s.k1[i] = k1;
    s.owner[i] = batch.index[i];
  }
}
