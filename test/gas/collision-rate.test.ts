// Collision frequency of an ion in a buffer gas (sim/gas/collision-rate.ts) against values worked
// by hand from kinetic theory, and the Langevin rate constant in cgs units.

import { describe, expect, it } from 'vitest';
import { collisionFrequency } from '../../sim/gas/collision-rate.js';
import type { GasSettings } from '../../sim/gas/settings.js';

const U = 1.66053906660e-27;
const He = (extra: Partial<GasSettings>): GasSettings => ({
  species: 'He', massKg: 4.002602 * U, polarizabilityM3: 0.2050522e-30, pressurePa: 0.133322, temperatureK: 300, model: 'hard-sphere', ...extra,
});

describe('collision frequency', () => {
  it('hard spheres: ν = n σ ⟨v_rel⟩ (worked by hand)', () => {
    // m/z 609 in 1 mTorr He at 300 K, σ = 150 Å²: n = p/kT = 3.2188e19 m⁻³,
    // μ = 609·4.0026/613.0026 u = 3.9765 u, ⟨v_rel⟩ = (8kT/πμ)^½ = 1263.8 m/s,
    // ν = 3.2188e19 · 1.5e-18 · 1263.8 = 6.102e4 /s (hand arithmetic to 4 digits: 0.1 %).
    const nu = collisionFrequency(He({ crossSectionM2: 150e-20 }), 609 * U, 1.602176634e-19);
    expect(nu / 6.102e4).toBeCloseTo(1, 2);
  });

  it('Langevin: ν = n k_L with k_L ≈ 5.3·10⁻¹⁰ cm³/s for heavy ions in He', () => {
    // cgs: k_L = 2π e (α/μ)^½ = 2π · 4.8032e-10 esu · (0.2051e-24 cm³ / 6.6031e-24 g)^½
    //          = 5.319e-10 cm³/s (Gioumousis & Stevenson 1958, eq. 13; He α from CRC Handbook,
    // 0.205 Å³). ν = k_L · n with n = 3.2188e13 cm⁻³ at 1 mTorr, 300 K.
    const nu = collisionFrequency(He({}), 609 * U, 1.602176634e-19);
    expect(nu / (5.319e-10 * 3.2188e13)).toBeCloseTo(1, 2);
  });

  it('mobility: ν = q/(μK) recovers the frequency behind a given K0', () => {
    // K0 = 2.0 cm²/(V s) at 1 mTorr, 300 K: K = K0 (p0/p)(T/T0) = 2.0e-4 · 760000 · 300/273.15
    // = 166.94 m²/(V s); ν = e/(μK) = 1.602e-19 / (6.6031e-27 · 166.94) = 1.4534e5 /s.
    const nu = collisionFrequency(He({ model: 'drag', reducedMobility: 2.0e-4 }), 609 * U, 1.602176634e-19);
    expect(nu / 1.4534e5).toBeCloseTo(1, 2);
  });
});
