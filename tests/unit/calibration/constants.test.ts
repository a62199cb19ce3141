/**
 * CODATA 2018 values (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021)): h, e and k_B are exact
 * in the 2019 SI; Φ0 = h/2e = 2.067 833 848... × 10⁻¹⁵ Wb (tabulated there as exact, truncated).
 */
import {
  PLANCK_H, ELEMENTARY_CHARGE, BOLTZMANN_K, HBAR, FLUX_QUANTUM, REDUCED_FLUX_QUANTUM,
} from '@/calibration/constants';

describe('CODATA 2018 constants', () => {
  it('defining constants are the exact SI values', () => {
    expect(PLANCK_H).toBe(6.62607015e-34);
    expect(ELEMENTARY_CHARGE).toBe(1.602176634e-19);
    expect(BOLTZMANN_K).toBe(1.380649e-23);
  });

  it.each([
    // [name, value, CODATA 2018 table value, relative tolerance]
    ['flux quantum Φ0 (Wb)', () => FLUX_QUANTUM, 2.067833848e-15, 5e-10], // table: 2.067 833 848 ... e-15
    ['Φ0 to 16 digits (Wb)', () => FLUX_QUANTUM, 2.067833848461929e-15, 1e-15], // h/2e evaluated exactly, PHYSICS.md
    ['Φ0/2π (Wb)', () => REDUCED_FLUX_QUANTUM, 3.291059784754533e-16, 1e-15], // PHYSICS.md, from the exact h/2e
    ['ħ (J s)', () => HBAR, 1.054571817e-34, 1e-9], // CODATA 2018: 1.054 571 817... e-34 [from memory]
    ['Josephson constant 2e/h (Hz/V)', () => 1 / FLUX_QUANTUM, 483597.8484e9, 1e-10], // CODATA 2018 K_J = 483 597.848 4... GHz/V [from memory]
  ])('%s', (_name, get, expected, rel) => {
    const v = (get as () => number)();
    expect(Math.abs(v / (expected as number) - 1)).toBeLessThan(rel as number);
  });
});
