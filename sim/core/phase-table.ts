// cos and sin of the RF phase at every half step of a fixed step that divides the period
// (h = T/n): entry j holds Ω·j·h/2 = π j/n. An ion's own phase offset ψ enters through
// cos(θ_j + ψ) = cos θ_j cos ψ − sin θ_j sin ψ, so no Math.cos runs per step.

export interface PhaseTable {
  stepsPerCycle: number;
  /** Length 2n: half-step entries over one period. */
  cos: Float64Array;
  sin: Float64Array;
}

const cache = new Map<number, PhaseTable>();

export function phaseTable(stepsPerCycle: number): PhaseTable {
  let t = cache.get(stepsPerCycle);
  if (!t) {
    const m = 2 * stepsPerCycle;
    const c = new Float64Array(m + 1);
    const s = new Float64Array(m + 1);
    for (let j = 0; j <= m; j++) {
      c[j] = Math.cos((Math.PI * j) / stepsPerCycle);
      s[j] = Math.sin((Math.PI * j) / stepsPerCycle);
    }
    t = { stepsPerCycle, cos: c, sin: s };
    cache.set(stepsPerCycle, t);
  }
  return t;
}
