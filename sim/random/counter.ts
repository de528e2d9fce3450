// Counter-based random numbers. A stream is keyed by (seed, ion index, purpose); the n-th draw of
// a stream is a pure function of (key, n), so an ion's start and its collisions do not depend on
// how ions are split over workers or batches. The mixer is the "lowbias32" integer hash
// (C. Wellons, hash-prospector, 2018), applied twice with the key folded in between; 53-bit
// uniforms combine two 32-bit outputs. Not for cryptography.

/** Purposes: separate streams for separate uses of randomness of one ion. */
export const Purpose = {
  start: 1,
  gas: 2,
  thermal: 3,
  sampling: 4,
} as const;

export function mix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x21f0aaad);
  h ^= h >>> 15;
  h = Math.imul(h, 0x735a2d97);
  h ^= h >>> 15;
  return h >>> 0;
}

/** Two 32-bit key words for (seed, ion, purpose). Seeds up to 2^53 and ion indices up to 2^32. */
export function streamKey(seed: number, ion: number, purpose: number): [number, number] {
  const sLo = seed >>> 0;
  const sHi = Math.floor(seed / 4294967296) >>> 0;
  const k0 = mix32(mix32(sLo ^ 0x9e3779b9) ^ mix32(ion + 0x7f4a7c15) ^ Math.imul(purpose, 0x85ebca6b));
  const k1 = mix32(mix32(sHi ^ 0x632be5ab) + mix32((ion ^ 0x2545f491) >>> 0) + Math.imul(purpose, 0xc2b2ae35));
  return [k0, k1];
}

/** Uniform in (0, 1) from a key and a counter: a pure function, safe to call from any worker. */
export function uniformAt(k0: number, k1: number, n: number): number {
  const lo = n >>> 0;
  const hi = Math.floor(n / 4294967296) >>> 0;
  const a = mix32(mix32(lo ^ k0) ^ mix32(hi + k1));
  const b = mix32(mix32(a ^ k1) + lo + 0x6a09e667);
  // 53 bits: 27 from a, 26 from b; +0.5 keeps the value strictly inside (0, 1).
  return ((a >>> 5) * 67108864 + (b >>> 6) + 0.5) / 9007199254740992;
}

/** A stream with its own counter: uniform, normal (Box–Muller), exponential draws. */
export class RandomStream {
  private readonly k0: number;
  private readonly k1: number;
  /** Number of uniforms drawn so far; persist it to resume the stream. */
  counter: number;

  constructor(seed: number, ion: number, purpose: number, counter = 0) {
    [this.k0, this.k1] = streamKey(seed, ion, purpose);
    this.counter = counter;
  }

  uniform(): number {
    return uniformAt(this.k0, this.k1, this.counter++);
  }

  /** Standard normal; consumes two uniforms (Box & Muller, Ann. Math. Stat. 29, 610, 1958). */
  normal(): number {
    const u1 = this.uniform();
    const u2 = this.uniform();
    return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  }

  /** Exponential with unit mean. */
  exponential(): number {
    return -Math.log(this.uniform());
  }
}
