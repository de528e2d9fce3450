// The model's assumptions and limits as they apply to one scene, and the safety cautions every
// report carries. Plain statements of what the engine does (see sim/engine, sim/gas), so a reviewer
// knows what the numbers do not include.

import { scanTrap } from '../analysis/trap-scan.js';
import type { Scene } from '../scene/types.js';
import type { SceneTraits } from './scene-kind.js';
import { STAGE_KINDS } from '../stages/registry.js';

export const SAFETY_CAUTIONS: readonly string[] = [
  'Simulated operating points are a starting point: verify every one on the bench before relying on it.',
  'RF and DC supplies of quadrupoles, traps and time-of-flight sources work at high voltage, which is lethal.',
  'Follow your local electrical-safety codes; high-voltage work is for qualified staff only, with interlocks and discharge procedures in place.',
];

export function assumptions(scene: Scene, t: SceneTraits): string[] {
  const out: string[] = [];
  // Each kind's own field assumptions, RF kinds first, in registry order (sim/stages/registry.ts).
  const present = STAGE_KINDS.filter((k) => scene.stages.some((s) => s.type === k.type));
  if (t.rf) {
    // Solved electrodes stages have their real shapes (their own assumptions say how they are solved).
    if (present.some((k) => k.hasRf && k.fieldProblem === undefined)) {
      out.push('Ideal quadrupolar fields: exact hyperbolic electrodes of infinite extent; no rod-shape (round-rod) higher multipoles, no machining or alignment errors.');
    }
    for (const k of present) if (k.hasRf) out.push(...k.assumptions);
    out.push('RF is a pure cosine at one frequency; no supply ripple, amplitude noise or detuning.');
  }
  for (const k of present) if (!k.hasRf) out.push(...k.assumptions);
  out.push(t.spaceCharge
    ? `Space charge modelled by a ${scene.spaceCharge!.method} Coulomb sum over macro-ions (weight ${scene.spaceCharge!.weight} charges each); image charges in the electrodes are not included.`
    : 'No space charge: ions move independently; results hold for small ion numbers only.');
  if (t.gas) {
    const models = new Set<string>();
    if (scene.gas) models.add(scene.gas.model);
    for (const s of scene.stages) if (s.gas) models.add(s.gas.model);
    if (models.has('hard-sphere')) out.push('Buffer gas, hard-sphere model: elastic collisions with a constant cross section and isotropic scattering in the centre-of-mass frame, gas at rest and Maxwellian at the given temperature; no inelastic, reactive or charge-exchange collisions and no fragmentation.');
    if (models.has('drag')) out.push('Buffer gas, drag model: a mean friction force from the reduced mobility (low-field limit) plus thermal diffusion; it holds where the ion drift is slow against the gas thermal speed (low E/N), not for energetic ions.');
    out.push('Gas pressure and temperature are uniform in each stage; no gas flow, no pressure gradient at apertures.');
  }
  out.push('Electrodes are perfect absorbers: an ion reaching an electrode or an aperture edge is lost (no secondary electrons, no surface charging).');
  out.push('Classical, non-relativistic motion; ion mass = (m/z)·z·u with the electron mass neglected.');
  out.push(`Integrator: fixed-step RK4 with ${scene.run.stepsPerCycle} steps per RF period where there is RF; exact uniform-field kinematics elsewhere.`);
  if (t.kind === 'tof-linear' || t.kind === 'tof-reflectron') {
    out.push('Detector: an ideal plane with no dead time, transit-time spread or electronics jitter; arrival-time widths are those of the ions alone.');
  }
  if (t.kind === 'trap-scan') {
    const ejection = scanTrap(scene)?.scan.ejection ?? 'from the trap';
    out.push(`Mass scan: linear RF ramp; every ion ejected ${ejection} is counted at the time it leaves; no detector conversion dynode model.`);
  }
  return out;
}
