/**
 * Physical constants, CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021)).
 * Since the 2019 SI redefinition h, e and k_B are exact; Φ0 and ħ follow exactly from them.
 */

/** Planck constant h, J s (exact). */
export const PLANCK_H = 6.62607015e-34;
/** Elementary charge e, C (exact). */
export const ELEMENTARY_CHARGE = 1.602176634e-19;
/** Boltzmann constant k_B, J/K (exact). */
export const BOLTZMANN_K = 1.380649e-23;
/** Reduced Planck constant ħ = h/2π, J s. */
export const HBAR = PLANCK_H / (2 * Math.PI);
/** Superconducting flux quantum Φ0 = h/(2e), Wb. */
export const FLUX_QUANTUM = PLANCK_H / (2 * ELEMENTARY_CHARGE);
/** Reduced flux quantum Φ0/2π, Wb (the L_J = (Φ0/2π)/I_c prefactor). */
export const REDUCED_FLUX_QUANTUM = FLUX_QUANTUM / (2 * Math.PI);
