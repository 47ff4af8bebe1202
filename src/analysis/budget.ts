/**
 * The analytic error budget of a two-outcome threshold readout, cause by cause.
 *
 * Model (Barthel, Reilly, Marcus, Hanson & Gossard, Phys. Rev. Lett. 103, 160503 (2009)),
 * evaluated exactly on the sample grid instead of the continuum: the integrated value of a
 * shot that starts in state b is Gaussian with the noise σ around a mean set by its path. With
 * no jump the mean is m_b; a first jump b→c at a time t inside the window moves the mean to the
 * weighted mix of the two levels on either side of t (Barthel's μ_b + (μ_c − μ_b)·(1 − t/τ) for
 * a boxcar); a jump before the window gives m_c. That closed form is exact when every jump ends
 * the chain; when a jump can be followed by others (a stochastic turn-on, a chain of
 * intermediate states, excitation and relaxation both), the value's distribution over every path
 * comes from chain-values.ts and is convolved with the Gaussian noise. Preparation and
 * mapping errors replace the starting state. The probability that a shot is wrong AND owes it to
 * each cause is computed with the same precedence as the simulator's attribution
 * (preparation, then mapping, then the first in-window jump, then noise), so the causes add up
 * exactly to the total and can be compared one by one with the simulated counts.
 */
import { gaussianTail } from './special.ts';
import { kernelPrefixSums } from './linear-statistic.ts';
import { CAUSES, CAUSE_MAPPING, CAUSE_NOISE, CAUSE_PREPARATION } from './causes.ts';
import { chainValues, onlyTerminalJumps, type ValuesByCause } from './chain-values.ts';
import type { ResponseTables } from '../signal/response.ts';

/** What the budget needs to know about a point and one pipeline, in plain arrays. */
export interface BudgetInput {
  /** Projected kernel: value = Σ_k kernel[k]·record[k] on [lo, hi). */
  kernel: Float64Array;
  lo: number;
  hi: number;
  sampleRate: number;
  /** waveforms[s][k]: noise-free record of state s. */
  waveforms: readonly Float64Array[];
  /** Variance of the integrated value from all noise sources. */
  noiseVariance: number;
  /** The analog response on the level path (its transients after jumps), or null/absent. */
  response?: ResponseTables | null;
  /** Channels of the record (absent: 1); kernel, waveforms and response tables are channel-major. */
  channels?: number;
  /** Rate matrix rate[from·N + to] (1/s) and the cause code of each jump. */
  rate: Float64Array;
  jumpCause: Uint8Array;
  prepare: readonly number[];
  outcomeOf: readonly number[];
  preparation: readonly ({ probability: number; into: number } | null)[];
  mapping: readonly ({ probability: number; into: number } | null)[];
  threshold: number;
  highIsOne: boolean;
}

/** Probabilities by cause code (index into CAUSES). */
export type CauseVector = Float64Array;

export interface StateBudget {
  /** P(wrong ∧ cause) for each cause; index 0 unused. */
  causes: CauseVector;
  /** Exact total: P(wrong). */
  total: number;
  /** Sum of each cause's error taken alone (noise-free for preparation, mapping, jumps). */
  linearSum: number;
  /** Each cause's error taken alone. */
  alone: CauseVector;
}

export interface Budget {
  /** Noise-free projected mean per state. */
  means: Float64Array;
  sigma: number;
  /** |mean(outcome 1) − mean(outcome 0)|, each weighted by the prepared mixture. */
  separation: number;
  /** separation / σ (amplitude convention). */
  snr: number;
  perState: StateBudget[];
  /** Averages over intended states weighted by the prepared mixture. */
  mean: StateBudget;
}

/** Error of one start state split into the no-jump part and jump parts by cause. */
interface StartError {
  noJump: number;
  jumps: CauseVector;
  /** Noise-free error of the jumps (indicator of the wrong side). */
  jumpsNoiseFree: CauseVector;
  full: number;
}

export function analyticBudget(input: BudgetInput): Budget {
  const n = input.waveforms.length;
  const { kernel, lo, hi } = input;
  const prefix = input.waveforms.map((w) => kernelPrefixSums(kernel, w, lo, hi, input.channels ?? 1));
  const means = Float64Array.from(prefix, (p) => p[hi - lo]!);
  const sigma = Math.sqrt(input.noiseVariance);
  const wrong = (mean: number, outcome: number): number => {
    const highSide = input.highIsOne ? outcome === 1 : outcome === 0;
    const z = highSide ? (mean - input.threshold) : (input.threshold - mean);
    return sigma > 0 ? gaussianTail(z / sigma) : z > 0 ? 0 : 1;
  };
  const wrongNoiseFree = (mean: number, outcome: number): number => {
    const highSide = input.highIsOne ? outcome === 1 : outcome === 0;
    return (highSide ? mean - input.threshold : input.threshold - mean) > 0 ? 0 : 1;
  };
  const fs = input.sampleRate;
  const lastTime = (hi - 1) / fs;
  // a first jump that ends the chain, and no analog response: the closed form below; otherwise
  // every path, with the response's transients (chain-values.ts)
  const terminal = onlyTerminalJumps(input.rate, n) && !input.response;
  const pathValues = new Map<number, ValuesByCause>();
  const startError = (b: number, outcome: number): StartError => terminal ? firstJumpError(b, outcome) : chainError(b, outcome);
  const firstJumpError = (b: number, outcome: number): StartError => {
    const jumps = new Float64Array(CAUSES.length);
    const jumpsNoiseFree = new Float64Array(CAUSES.length);
    let exit = 0;
    for (let c = 0; c < n; c++) exit += input.rate[b * n + c]!;
    const noJump = Math.exp(-exit * lastTime) * wrong(means[b]!, outcome);
    for (let c = 0; c < n; c++) {
      const r = input.rate[b * n + c]!;
      if (r === 0) continue;
      const share = r / exit;
      const cause = input.jumpCause[b * n + c]!;
      // jump in (0, t_lo]: the whole window sees c
      let pj = share * (1 - Math.exp(-exit * lo / fs));
      jumps[cause] += pj * wrong(means[c]!, outcome);
      jumpsNoiseFree[cause] += pj * wrongNoiseFree(means[c]!, outcome);
      // jump in (t_{j−1}, t_j]: samples lo … j−1 in b, j … hi−1 in c
      for (let j = lo + 1; j < hi; j++) {
        pj = share * (Math.exp(-exit * (j - 1) / fs) - Math.exp(-exit * j / fs));
        const m = prefix[b]![j - lo]! + (means[c]! - prefix[c]![j - lo]!);
        jumps[cause] += pj * wrong(m, outcome);
        jumpsNoiseFree[cause] += pj * wrongNoiseFree(m, outcome);
      }
    }
    const full = noJump + jumps.reduce((a, x) => a + x, 0);
    return { noJump, jumps, jumpsNoiseFree, full };
  };

  const chainError = (b: number, outcome: number): StartError => {
    let byCause = pathValues.get(b);
    if (!byCause) {
      const scale = Math.max(...means.map(Math.abs), sigma);
      byCause = chainValues(input, b, sigma > 0 ? sigma / 16 : scale / 4096);
      pathValues.set(b, byCause);
    }
    const jumps = new Float64Array(CAUSES.length);
    const jumpsNoiseFree = new Float64Array(CAUSES.length);
    let noJump = 0;
    for (const [cause, { values, mass }] of byCause) {
      let p = 0, pNoiseFree = 0;
      for (let i = 0; i < values.length; i++) {
        p += mass[i]! * wrong(values[i]!, outcome);
        pNoiseFree += mass[i]! * wrongNoiseFree(values[i]!, outcome);
      }
      if (cause === 0) noJump = p;
      else {
        jumps[cause] += p;
        jumpsNoiseFree[cause] += pNoiseFree;
      }
    }
    return { noJump, jumps, jumpsNoiseFree, full: noJump + jumps.reduce((a, x) => a + x, 0) };
  };

  const perState: StateBudget[] = [];
  for (let s = 0; s < n; s++) {
    const o = input.outcomeOf[s]!;
    const causes = new Float64Array(CAUSES.length);
    const prep = input.preparation[s];
    const pPrep = prep ? prep.probability : 0;
    const afterPrep: [number, number][] = prep && prep.into !== s ? [[s, 1 - pPrep], [prep.into, pPrep]] : [[s, 1]];
    for (const [a, pa] of afterPrep) {
      const map = input.mapping[a];
      const pMap = map ? map.probability : 0;
      const afterMap: [number, number][] = map && map.into !== a ? [[a, 1 - pMap], [map.into, pMap]] : [[a, 1]];
      for (const [b, pb] of afterMap) {
        const e = startError(b, o);
        const w = pa * pb;
        if (a !== s) causes[CAUSE_PREPARATION] += w * e.full;
        else if (b !== s) causes[CAUSE_MAPPING] += w * e.full;
        else {
          causes[CAUSE_NOISE] += w * e.noJump;
          for (let c = 0; c < CAUSES.length; c++) causes[c] += w * e.jumps[c]!;
        }
      }
    }
    const own = startError(s, o);
    const alone = new Float64Array(CAUSES.length);
    alone[CAUSE_PREPARATION] = prep && prep.into !== s ? pPrep * wrongNoiseFree(means[prep.into]!, o) : 0;
    const map = input.mapping[s];
    alone[CAUSE_MAPPING] = map && map.into !== s ? map.probability * wrongNoiseFree(means[map.into]!, o) : 0;
    for (let c = 0; c < CAUSES.length; c++) alone[c] += own.jumpsNoiseFree[c]!;
    alone[CAUSE_NOISE] = wrong(means[s]!, o);
    perState.push({
      causes, total: causes.reduce((x, y) => x + y, 0), alone, linearSum: alone.reduce((x, y) => x + y, 0),
    });
  }
  const mean: StateBudget = {
    causes: new Float64Array(CAUSES.length), alone: new Float64Array(CAUSES.length), total: 0, linearSum: 0,
  };
  perState.forEach((b, s) => {
    const w = input.prepare[s]!;
    for (let c = 0; c < CAUSES.length; c++) {
      mean.causes[c] += w * b.causes[c]!;
      mean.alone[c] += w * b.alone[c]!;
    }
    mean.total += w * b.total;
    mean.linearSum += w * b.linearSum;
  });
  const groupMean = (o: number): number => {
    let m = 0, w = 0;
    for (let s = 0; s < n; s++) if (input.outcomeOf[s] === o) { const p = input.prepare[s]! || 1e-300; m += p * means[s]!; w += p; }
    return m / w;
  };
  const separation = Math.abs(groupMean(1) - groupMean(0));
  return { means, sigma, separation, snr: sigma > 0 ? separation / sigma : Infinity, perState, mean };
}

/**
 * The budget of a pipeline that has no analytic model (a classifier without one): every value
 * NaN, which the summary shows as "—" and never counts as a disagreement.
 */
export function unavailableBudget(states: number): Budget {
  const state = () => ({
    causes: new Float64Array(CAUSES.length).fill(NaN), alone: new Float64Array(CAUSES.length).fill(NaN), total: NaN, linearSum: NaN,
  });
  return {
    means: new Float64Array(states).fill(NaN), sigma: NaN, separation: NaN, snr: NaN,
    perState: Array.from({ length: states }, state), mean: state(),
  };
}
