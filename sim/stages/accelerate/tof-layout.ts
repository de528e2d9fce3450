// Where the time-of-flight parts sit in a stage list: the two-field source (extraction region
// followed by its acceleration region), the drift length after it, and a reflectron with the
// field-free path ahead of it. The TOF figures (sim/analysis/tof-summary.ts) read this.

import type { Stage } from '../types.js';
import type { AccelerateStage } from './stage.js';
import { hasRf } from '../registry.js';

export interface TofLayout {
  /** Uniform-field stages and no RF stage: arrival times are the figure of merit. */
  timeOfFlight: boolean;
  /** Two-field source: its regions and the field-free path after it, up to a reflectron or the end, m. */
  source?: { extraction: AccelerateStage; acceleration: AccelerateStage; driftAfter: number };
  /** A reflectron: its index, stage and the summed drift length ahead of it, m. */
  reflectron?: { index: number; stage: AccelerateStage; driftBefore: number };
}

const isAccelerate = (s: Stage | undefined): s is AccelerateStage => s?.type === 'accelerate';

export function tofLayout(st: readonly Stage[]): TofLayout {
  const out: TofLayout = { timeOfFlight: st.some(isAccelerate) && !st.some(hasRf) };
  const ex = st.findIndex((s) => isAccelerate(s) && s.role === 'source-extraction');
  const a = st[ex + 1];
  if (ex >= 0 && isAccelerate(a)) {
    let D = 0;
    for (let k = ex + 2; k < st.length && st[k].type === 'drift'; k++) D += st[k].length;
    out.source = { extraction: st[ex] as AccelerateStage, acceleration: a, driftAfter: D };
  }
  const ri = st.findIndex((s) => isAccelerate(s) && s.role === 'reflectron');
  if (ri >= 0) {
    let drift = 0;
    for (let k = 0; k < ri; k++) if (st[k].type === 'drift') drift += st[k].length;
    out.reflectron = { index: ri, stage: st[ri] as AccelerateStage, driftBefore: drift };
  }
  return out;
}
