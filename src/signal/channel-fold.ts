/**
 * A linear statistic of a record with several channels (baseband I and Q, stored channel-major:
 * carrier.ts) is Σ_c Σ_k a[c·n + k]·b[c·n + k]. Whatever depends on time alone — a level path's
 * jumps, the analog response's decay, a noise realisation that both channels share — sees it
 * through the per-sample terms folded over the channels, t[k] = Σ_c a[c·n + k]·b[c·n + k].
 */

/** The channel indices 0 … count − 1. */
export function allChannels(count: number): number[] {
  return Array.from({ length: count }, (_, c) => c);
}

/**
 * t[k] = Σ_{c in channels} a[c·n + k]·b[c·n + k] for k in [lo, hi), zero elsewhere; n = `samples`,
 * t one channel long. The first channel's term is assigned, so with one channel t[k] is exactly
 * a[k]·b[k].
 */
export function foldedProducts(
  a: Float64Array, b: Float64Array, lo: number, hi: number, samples: number, channels: readonly number[],
): Float64Array {
  const t = new Float64Array(samples);
  const [first, ...rest] = channels;
  const at = first! * samples;
  for (let k = lo; k < hi; k++) t[k] = a[at + k]! * b[at + k]!;
  for (const c of rest) {
    const base = c * samples;
    for (let k = lo; k < hi; k++) t[k] += a[base + k]! * b[base + k]!;
  }
  return t;
}
