/**
 * How a noise source reaches the record from its injection point, as independent realisations,
 * each with its weight on every record entry (noise-plan.ts says why):
 * - sensor-side: one realisation n(t), entering sample k of channel c as W[c·n + k]·n(t_k) with
 *   W the plan's sensor weight (gain·c_k with a carrier, gain·cos α and gain·sin α on I and Q);
 * - amplifier-side: one realisation per channel, each entering only its own channel with the gain.
 * With one channel that is the familiar g·c_k·n(t_k) and g·n(t_k).
 *
 * A linear statistic V = Σ K·record (K channel-major like the record) then gets Σ_r Σ_k x_r[k]·n_r(t_k)
 * with x_r[k] = Σ_c K[c·n + k]·W_r[c·n + k] on the time grid (`seenThrough`), and the realisations
 * being independent, Var V = Σ_r Var(Σ_k x_r[k]·n(t_k)): each kind's one-channel variance, summed.
 */
import type { NoiseInjection } from '../scenario/types.ts';
import { allChannels, foldedProducts } from './channel-fold.ts';

/** One independent realisation of a source at an injection point. */
export interface Realisation {
  /** Its weight on each record entry (channels × samples, channel-major); zero on channels it does not reach. */
  weight: Float64Array;
  /** The channels it reaches, in order. */
  channels: readonly number[];
  /**
   * Which lane of the source's streams it draws from: 0, or c for channel c's own realisation of
   * amplifier-side noise (random/streams.ts: the second lane), so that channel 0 draws exactly
   * what a one-channel record draws.
   */
  lane: number;
}

/** The realisations of each injection point on a record of `channels` channels of `samples` samples. */
export type Realisations = Readonly<Record<NoiseInjection, readonly Realisation[]>>;

/** The realisations of a point's noise (see the file comment). */
export function injectionRealisations(channels: number, samples: number, gain: number, sensorWeight: Float64Array): Realisations {
  const all = allChannels(channels);
  const amplifier = all.map((c) => {
    const weight = new Float64Array(channels * samples);
    weight.fill(gain, c * samples, (c + 1) * samples);
    return { weight, channels: [c], lane: c };
  });
  return { sensor: [{ weight: sensorWeight, channels: all, lane: 0 }], amplifier };
}

/**
 * The functional realisation `r` sees through a channel-major kernel: x[k] = Σ_c K[c·n + k]·W[c·n + k]
 * over the channels it reaches, for k in [lo, hi) (zero elsewhere), n = `samples`; x is one channel long.
 */
export function seenThrough(r: Realisation, kernel: Float64Array, lo: number, hi: number, samples: number): Float64Array {
  return foldedProducts(kernel, r.weight, lo, hi, samples, r.channels);
}
