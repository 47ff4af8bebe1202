/**
 * Mapping error from a diabatic (Landau–Zener) passage through an anticrossing.
 */
import { REDUCED_PLANCK } from './constants.ts';

/**
 * Landau–Zener probability of a diabatic transition, P = exp(−2π Δ² / (ħ v)), with Δ the
 * coupling (half the minimum gap) in J and v the sweep rate of the diabatic energy difference
 * in J/s (Landau, Phys. Z. Sowjetunion 2, 46 (1932); Zener, Proc. R. Soc. A 137, 696 (1932)).
 * For a mapping by adiabatic passage this is the probability that the mapping fails.
 * `coupling` ≥ 0, `sweepRate` > 0. Input is assumed valid.
 */
export function landauZenerProbability(coupling: number, sweepRate: number): number {
  return Math.exp((-2 * Math.PI * coupling * coupling) / (REDUCED_PLANCK * sweepRate));
}
