/**
 * The stationary occupation of a two-level fluctuator (random telegraph noise): a two-state
 * continuous-time Markov chain adding 0 in its lower state and its amplitude in its upper one,
 * leaving them at rateUp (0→1) and rateDown (1→0) (Machlup, J. Appl. Phys. 25, 341 (1954)). The
 * engine's generator is telegraph-timeline.ts; its noise kind is noise/telegraph.ts.
 */



/** Stationary upper-state occupation rateUp/(rateUp + rateDown); 0 when both rates are 0. */
export function stationaryOccupation(rateUp: number, rateDown: number): number {
  const total = rateUp + rateDown;
  return total > 0 ? rateUp / total : 0;
}

