/**
 * The analytic distribution of the integrated (projected) value of one intended state, as a
 * Gaussian mixture: the same model as the budget (Barthel, Reilly, Marcus, Hanson & Gossard,
 * Phys. Rev. Lett. 103, 160503 (2009)), evaluated on the sample grid. A shot without a jump
 * is Gaussian around its state's noise-free mean; a first jump at sample j moves the mean to
 * the mix of the two levels on either side of j (the relaxation "ramp" between the two
 * peaks); a jump before the window gives the landing state's mean; preparation and mapping
 * errors replace the starting state. Only the first jump is modelled, as in `budget.ts`.
 * Every component has the noise σ.
 */
import { normalCdf } from './special.ts';
import { kernelPrefixSums } from './linear-statistic.ts';

/** What the mixture needs: the projected kernel, waveforms, rates and flips of one point. */
export interface MixtureInput {
  /** Projected kernel: value = Σ_k kernel[k]·record[k] on [lo, hi). */
  kernel: Float64Array;
  lo: number;
  hi: number;
  sampleRate: number;
  /** waveforms[s][k]: noise-free record of state s. */
  waveforms: readonly Float64Array[];
  /** Channels of the record (absent: 1); kernel and waveforms are channel-major. */
  channels?: number;
  /** Rate matrix rate[from·N + to] (1/s). */
  rate: Float64Array;
  preparation: readonly ({ probability: number; into: number } | null)[];
  mapping: readonly ({ probability: number; into: number } | null)[];
}

/** A Gaussian mixture with common σ: component means and weights (the weights sum to 1). */
export interface ValueMixture {
  means: Float64Array;
  weights: Float64Array;
}

/** Components below this weight are dropped (they cannot show on a histogram). */
const NEGLIGIBLE = 1e-14;

/** The mixture of the projected value of shots whose intended state is `state`. */
export function valueMixture(input: MixtureInput, state: number): ValueMixture {
  const n = input.waveforms.length;
  const { kernel, lo, hi } = input;
  const fs = input.sampleRate;
  const prefix = input.waveforms.map((w) => kernelPrefixSums(kernel, w, lo, hi, input.channels ?? 1));
  const full = prefix.map((p) => p[hi - lo]!);
  const means: number[] = [];
  const weights: number[] = [];
  const add = (m: number, w: number) => {
    if (w > NEGLIGIBLE) { means.push(m); weights.push(w); }
  };
  const lastTime = (hi - 1) / fs;
  const fromStart = (b: number, w: number) => {
    let exit = 0;
    for (let c = 0; c < n; c++) exit += input.rate[b * n + c]!;
    add(full[b]!, w * Math.exp(-exit * lastTime));
    for (let c = 0; c < n; c++) {
      const r = input.rate[b * n + c]!;
      if (r === 0) continue;
      const share = w * r / exit;
      add(full[c]!, share * (1 - Math.exp(-exit * lo / fs)));
      for (let j = lo + 1; j < hi; j++) {
        const pj = share * (Math.exp(-exit * (j - 1) / fs) - Math.exp(-exit * j / fs));
        add(prefix[b]![j - lo]! + (full[c]! - prefix[c]![j - lo]!), pj);
      }
    }
  };
  const prep = input.preparation[state];
  const pPrep = prep && prep.into !== state ? prep.probability : 0;
  for (const [a, pa] of [[state, 1 - pPrep], [prep?.into ?? state, pPrep]] as [number, number][]) {
    if (pa === 0) continue;
    const map = input.mapping[a];
    const pMap = map && map.into !== a ? map.probability : 0;
    if (1 - pMap > 0) fromStart(a, pa * (1 - pMap));
    if (pMap > 0) fromStart(map!.into, pa * pMap);
  }
  return { means: Float64Array.from(means), weights: Float64Array.from(weights) };
}

/** Probability density of the mixture at each xs[i], written to out. */
export function mixtureDensity(m: ValueMixture, sigma: number, xs: Float64Array, out: Float64Array): Float64Array {
  const norm = 1 / (sigma * Math.sqrt(2 * Math.PI));
  for (let i = 0; i < xs.length; i++) {
    let s = 0;
    for (let c = 0; c < m.means.length; c++) {
      const z = (xs[i]! - m.means[c]!) / sigma;
      s += m.weights[c]! * Math.exp(-0.5 * z * z);
    }
    out[i] = s * norm;
  }
  return out;
}

/** Cumulative distribution of the mixture at each xs[i], written to out. */
export function mixtureCdf(m: ValueMixture, sigma: number, xs: Float64Array, out: Float64Array): Float64Array {
  for (let i = 0; i < xs.length; i++) {
    let s = 0;
    for (let c = 0; c < m.means.length; c++) s += m.weights[c]! * normalCdf(xs[i]!, m.means[c]!, sigma);
    out[i] = s;
  }
  return out;
}
