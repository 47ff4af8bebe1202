/**
 * The clean centres and σ of a labelled readout, from the integrated values alone: what a run
 * measures on its clean shots (summary.ts cleanSpread), estimated where nobody knows which
 * records were clean (recorded traces). Each labelled group is modelled as a mixture of the two
 * clean Gaussians N(μ0, σ0), N(μ1, σ1) (the SNR's σ pooled over both, as a run pools its clean shots) and a
 * ramp between them — a record whose state changed inside the window integrates to a value
 * between the centres; for a change at a uniformly distributed time (T1 long against the window)
 * the boxcar value is uniform on [μ0, μ1], and with the noise its density is
 * r(x) = [Φ((x − μ0)/σ) − Φ((x − μ1)/σ)] / |μ1 − μ0|, the histogram model of Barthel, Medford,
 * Marcus, Hanson & Gossard, PRL 103, 160503 (2009) in the limit T1 ≫ window. A mislabelled or
 * mis-prepared record falls in the other Gaussian. The weights of the three parts are free per
 * group; the centres and σ are fitted by expectation–maximisation (Dempster, Laird & Rubin,
 * J. R. Stat. Soc. B 39, 1 (1977)), the ramp taking the current centres and σ at each step (a
 * generalised EM step: the likelihood does not decrease). The ramp and the other Gaussian absorb
 * the records a median and an IQR would be pulled by (robust-spread.ts).
 */
import { normalCdf } from './special.ts';
import { robustSpread } from './robust-spread.ts';
import type { ValueSpread } from './summary.ts';

/** Iterations at most, and the change of μ and σ (relative to σ) that ends them. */
const MAX_ITERATIONS = 2000;
const TOLERANCE = 1e-6;
/**
 * The values are binned first (EM then costs the bins, not the records): 2048 bins over the
 * centres ± 12σ make a bin under σ/50 wide for a separation under 20σ, whose rounding adds w²/12 to σ²
 * (Sheppard's correction: under a relative 4e−5).
 */
const BINS = 2048;

/** The fitted mixture: centres, σ, and each group's weights of (own Gaussian, other Gaussian, ramp). */
export interface ValueMixture extends ValueSpread {
  weights: [number, number, number][];
  iterations: number;
}

const SQRT_2PI = Math.sqrt(2 * Math.PI);

/** Fits the mixture to the values of outcome 0 and outcome 1 (see the file comment). */
export function fitValueMixture(byOutcome: readonly [Float64Array, Float64Array]): ValueMixture {
  // start from the robust estimates
  const start = robustSpread(byOutcome);
  let mu = [start.outcomes[0]!.mean, start.outcomes[1]!.mean];
  let sigma = start.sigma;
  let spread = [start.outcomes[0]!.sigma, start.outcomes[1]!.sigma];
  const weights: [number, number, number][] = [[0.9, 0.05, 0.05], [0.05, 0.9, 0.05]];
  let iterations = 0;
  if (!(byOutcome[0].length >= 2 && byOutcome[1].length >= 2 && sigma > 0 && mu[0] !== mu[1])) {
    return { ...start, weights, iterations };
  }
  // the bins span the centres and 12 σ beyond (a value further out is no Gaussian's nor the ramp's: left out)
  const lo = Math.min(mu[0]!, mu[1]!) - 12 * sigma, hi = Math.max(mu[0]!, mu[1]!) + 12 * sigma;
  const width = (hi - lo) / BINS;
  const centres = Float64Array.from({ length: BINS }, (_, b) => lo + (b + 0.5) * width);
  const groups = byOutcome.map((v) => {
    const counts = new Float64Array(BINS);
    for (let i = 0; i < v.length; i++) {
      const b = Math.floor((v[i]! - lo) / width);
      if (b >= 0 && b < BINS) counts[b]!++;
    }
    return counts;
  });
  for (; iterations < MAX_ITERATIONS; iterations++) {
    const sums = { g: [0, 0], gx: [0, 0], gxx: [0, 0] };
    const span = Math.abs(mu[1]! - mu[0]!);
    const low = Math.min(mu[0]!, mu[1]!), high = Math.max(mu[0]!, mu[1]!);
    const newWeights: [number, number, number][] = [];
    groups.forEach((counts, label) => {
      const w = weights[label]!;
      const own = label, other = 1 - label;
      const acc = [0, 0, 0];
      for (let b = 0; b < BINS; b++) {
        const count = counts[b]!;
        if (count === 0) continue;
        const x = centres[b]!;
        const s0 = spread[own]!, s1 = spread[other]!;
        const z0 = (x - mu[own]!) / s0, z1 = (x - mu[other]!) / s1;
        const f0 = w[0] * Math.exp(-0.5 * z0 * z0) / (s0 * SQRT_2PI);
        const f1 = w[1] * Math.exp(-0.5 * z1 * z1) / (s1 * SQRT_2PI);
        const fr = w[2] * Math.max(0, normalCdf(x, low, sigma) - normalCdf(x, high, sigma)) / span;
        const total = f0 + f1 + fr;
        if (!(total > 0)) continue;
        const g0 = (count * f0) / total, g1 = (count * f1) / total;
        acc[0]! += g0; acc[1]! += g1; acc[2]! += (count * fr) / total;
        sums.g[own]! += g0; sums.gx[own]! += g0 * x; sums.gxx[own]! += g0 * x * x;
        sums.g[other]! += g1; sums.gx[other]! += g1 * x; sums.gxx[other]! += g1 * x * x;
      }
      const n = acc[0]! + acc[1]! + acc[2]!;
      newWeights.push([acc[0]! / n, acc[1]! / n, acc[2]! / n]);
    });
    const next = [sums.gx[0]! / sums.g[0]!, sums.gx[1]! / sums.g[1]!];
    // Σγ(x − μ)² of each Gaussian about its new centre
    const ss = [0, 1].map((k) => Math.max(0, sums.gxx[k]! - 2 * next[k]! * sums.gx[k]! + next[k]! * next[k]! * sums.g[k]!));
    spread = [0, 1].map((k) => Math.sqrt(ss[k]! / sums.g[k]!));
    const nextSigma = Math.sqrt((ss[0]! + ss[1]!) / (sums.g[0]! + sums.g[1]!));
    const change = Math.max(Math.abs(next[0]! - mu[0]!), Math.abs(next[1]! - mu[1]!), Math.abs(nextSigma - sigma)) / sigma;
    mu = next;
    sigma = nextSigma;
    weights.splice(0, 2, ...newWeights);
    if (!(change > TOLERANCE)) break;
  }
  return {
    outcomes: mu.map((m, k) => ({ mean: m, sigma: spread[k]! })),
    separation: Math.abs(mu[1]! - mu[0]!),
    sigma,
    weights,
    iterations,
  };
}
