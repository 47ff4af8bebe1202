/**
 * Physical constants, exact by definition since the 2019 redefinition of the SI
 * (BIPM, The International System of Units, 9th edition, 2019, Table 1), except ħ,
 * which is derived from h exactly as h/(2π).
 */

/** Boltzmann constant k_B in J/K (exact, SI Brochure 2019). */
export const BOLTZMANN = 1.380649e-23;

/** Elementary charge e in C (exact, SI Brochure 2019); also the size of 1 eV in J. */
export const ELEMENTARY_CHARGE = 1.602176634e-19;

/** Planck constant h in J·s (exact, SI Brochure 2019). */
export const PLANCK = 6.62607015e-34;

/** Reduced Planck constant ħ = h/(2π) in J·s. */
export const REDUCED_PLANCK = PLANCK / (2 * Math.PI);
