/**
 * Preparation error from a thermal population of the excited manifold.
 */
import { BOLTZMANN } from './constants.ts';

/**
 * Thermal (Boltzmann) population of an excited manifold of degeneracy g at energy E above a
 * non-degenerate ground state, at temperature T: p = g·e^(−E/kT) / (1 + g·e^(−E/kT)).
 * Two-level Boltzmann statistics (e.g. Kittel & Kroemer, Thermal Physics, 2nd ed., 1980, ch. 3).
 * `splitting` in J (≥ 0), `temperature` in K (> 0), `degeneracy` > 0. Input is assumed valid.
 */
export function thermalPopulation(splitting: number, temperature: number, degeneracy = 1): number {
  const x = splitting / (BOLTZMANN * temperature);
  // Written as g / (e^x + g) so a large E/kT underflows to 0 instead of giving NaN.
  const boltzmannFactor = Math.exp(-x);
  if (boltzmannFactor === 0) return 0;
  return (degeneracy * boltzmannFactor) / (1 + degeneracy * boltzmannFactor);
}
