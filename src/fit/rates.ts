/**
 * Rates of a two-state continuous-time Markov chain from its transition matrix over one step.
 * With rates a (0 → 1) and b (1 → 0), λ = a + b, the step matrix is
 *   P = exp(QΔt) = I + (1 − e^(−λΔt))/λ · Q
 * (the two-state chain solved in closed form, Norris, Markov Chains (1997), §2.1), so
 * P01 + P10 = 1 − e^(−λΔt) gives λ, and a : b = P01 : P10.
 */

/** The rates (1/s) of the chain whose step of `dt` seconds has off-diagonal entries p01, p10. */
export function ratesFromStep(p01: number, p10: number, dt: number): { up: number; down: number } {
  const moved = p01 + p10;
  if (!(moved > 0)) return { up: 0, down: 0 };
  if (moved >= 1) return { up: Infinity, down: Infinity };
  const total = -Math.log1p(-moved) / dt;
  return { up: (total * p01) / moved, down: (total * p10) / moved };
}

/** The step matrix (row-major 2×2) of rates up (0 → 1) and down (1 → 0) over `dt` seconds. */
export function stepFromRates(up: number, down: number, dt: number): Float64Array {
  const total = up + down;
  const moved = total > 0 ? -Math.expm1(-total * dt) : 0;
  const p01 = total > 0 ? (moved * up) / total : 0, p10 = total > 0 ? (moved * down) / total : 0;
  return Float64Array.from([1 - p01, p01, p10, 1 - p10]);
}
