// The `tof` block of summary.json: arrival-time peaks per species, resolution t/(2Δt), the mass
// calibration, the Wiley–McLaren focus of a two-field source, and the first-order energy-focus
// voltage of a single-stage reflectron (Mamyrin et al., Sov. Phys. JETP 37, 45 (1973): for a
// uniform retarding field the flight time is stationary in energy when the field-free path equals
// four times the penetration depth, L = 4p with p = (U/q)·L_r/V_r).

import type { Scene } from '../scene/types.js';
import { peakOf, fitMassCalibration, tofResolution } from './arrival.js';
import { extractionFieldForFocus, spaceFocusDistance } from './wiley-mclaren.js';
import { dcPotential, stageBasePotentials, stageFields } from '../engine/potential.js';
import { stageAt } from '../engine/start.js';
import { tofLayout } from '../stages/accelerate/tof-layout.js';

export function isTimeOfFlight(scene: Scene): boolean {
  return tofLayout(scene.stages).timeOfFlight;
}

/**
 * Flight times a field-free (linear) analyzer of the same nominal flight time would give the same
 * ions: t_i = t̄·sqrt(Ū/U_i) with U_i each ion's kinetic energy in the drift region — the
 * "without reflectron" comparison of energy focusing.
 */
function linearEquivalent(t: number[], ke: number[]): number[] {
  if (t.length === 0) return [];
  const tm = t.reduce((a, b) => a + b, 0) / t.length;
  const um = ke.reduce((a, b) => a + b, 0) / ke.length;
  return ke.map((u) => tm * Math.sqrt(um / u));
}

export function tofSummary(scene: Scene, arrivals: number[][], driftKe: number[][]): Record<string, unknown> {
  const layout = tofLayout(scene.stages);
  const reflecting = layout.reflectron !== undefined;
  const species = scene.ions.map((p, k) => {
    const pk = tofResolution(arrivals[k] ?? []);
    const lin = reflecting ? tofResolution(linearEquivalent(arrivals[k] ?? [], driftKe[k] ?? [])) : null;
    const keSpread = peakOf(driftKe[k] ?? []);
    return {
      population: k, mz: p.mz, detected: arrivals[k]?.length ?? 0,
      arrival_time_s: pk ? pk.centre : null,
      fwhm_s: pk ? pk.fwhm : null,
      resolution_fwhm: pk ? pk.resolution : null,
      energy_fwhm_ev: keSpread ? keSpread.fwhm : null,
      ...(reflecting ? {
        linear_equivalent_fwhm_s: lin ? lin.fwhm : null,
        linear_equivalent_resolution: lin ? lin.resolution : null,
      } : {}),
    };
  });
  const withPeaks = species.filter((s) => s.arrival_time_s !== null);
  const cal = fitMassCalibration(withPeaks.map((s) => s.mz), withPeaks.map((s) => s.arrival_time_s as number));
  const out: Record<string, unknown> = { species, calibration: cal ? { t0_s: cal.t0, k_s_per_sqrt_mz: cal.k } : null };

  if (layout.source) {
    const { extraction: e, acceleration: a } = layout.source;
    // The field-free path to the detector: drift stages after the source up to a reflectron or the end.
    const D = layout.source.driftAfter;
    const s0 = scene.ions[0].position.z - e.zStart;
    const Es = e.voltage / e.length, Ed = a.voltage / a.length;
    if (s0 > 0 && Es > 0) {
      const focus = spaceFocusDistance({ s0, Es, d: a.length, Ed });
      const EsFocus = D > 0 ? extractionFieldForFocus(s0, a.length, Ed, D) : null;
      out.source = {
        start_from_back_plate_m: s0,
        extraction_field_v_per_m: Es,
        acceleration_field_v_per_m: Ed,
        space_focus_distance_m: focus,
        drift_to_detector_m: D,
        extraction_voltage_for_focus_at_detector_v: EsFocus !== null ? EsFocus * e.length : null,
        reference: 'Wiley & McLaren, Rev. Sci. Instrum. 26, 1150 (1955), eq. 9',
      };
    }
  }
  if (layout.reflectron) {
    const { index: ri, stage: r, driftBefore: drift } = layout.reflectron;
    // Energy per charge entering the reflectron: start potential minus the reflectron entrance's.
    const fields = stageFields(scene);
    const base = stageBasePotentials(scene, fields);
    const p0 = scene.ions[0];
    const s0 = stageAt(scene, p0.position.z);
    const U = dcPotential(fields, base, s0, p0.position.x, p0.position.y, p0.position.z) - base[ri] + p0.energy / Math.abs(p0.charge);
    const L = 2 * drift;
    const Vr = -r.voltage;
    const p = (U * r.length) / Vr;
    out.reflectron = {
      energy_per_charge_v: U,
      penetration_m: p,
      field_free_path_m: L,
      voltage_v: Vr,
      voltage_for_energy_focus_v: (4 * U * r.length) / L,
      reference: 'Mamyrin et al., Sov. Phys. JETP 37, 45 (1973): first order when L = 4p',
    };
  }
  return out;
}
