/**
 * The hidden-state chain in discrete time: generator matrix from rates, and the per-bin
 * transition matrix P(Δt) = exp(Q·Δt) of a continuous-time Markov chain (Norris, *Markov Chains*,
 * Cambridge 1997, §2.1: the transition matrices of a finite CTMC are P(t) = e^(tQ)).
 */
import { matrixExponential } from './matrix-exponential.ts';

/** One rate of the chain: from state `from` to state `to`, in 1/s (1/T1 for relaxation). */
export interface ChainRate {
  from: number;
  to: number;
  rate: number;
}

/**
 * Generator Q (n×n, row-major) from rates: Q[i][j] = rate i→j for i ≠ j, Q[i][i] = −Σ_j Q[i][j],
 * so every row sums to zero. Several rates for the same pair add up.
 */
export function generatorMatrix(n: number, rates: ReadonlyArray<ChainRate>): Float64Array {
  const q = new Float64Array(n * n);
  for (const { from, to, rate } of rates) {
    if (!(from >= 0 && from < n && to >= 0 && to < n) || from === to) {
      throw new RangeError(`generatorMatrix: bad transition ${from} -> ${to} for ${n} states`);
    }
    if (!(rate >= 0) || !Number.isFinite(rate)) throw new RangeError(`generatorMatrix: bad rate ${rate}`);
    q[from * n + to]! += rate;
    q[from * n + from]! -= rate;
  }
  return q;
}

/**
 * Transition matrix over a time step dt: T = exp(Q·dt), row-major, T[i·n + j] = P(state j at
 * t + dt | state i at t); rows sum to one. Entries that roundoff makes slightly negative are set
 * to zero (exp(Q·dt) of a generator is entrywise non-negative).
 */
export function transitionMatrix(generator: Float64Array, n: number, dt: number): Float64Array {
  const scaled = new Float64Array(n * n);
  for (let k = 0; k < n * n; k++) scaled[k] = generator[k]! * dt;
  const t = matrixExponential(scaled, n);
  for (let k = 0; k < n * n; k++) if (t[k]! < 0) t[k] = 0;
  return t;
}
