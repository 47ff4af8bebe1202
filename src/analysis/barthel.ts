/**
 * The continuum histogram model of single-shot readout with relaxation during boxcar
 * integration (Barthel, Reilly, Marcus, Hanson & Gossard, Phys. Rev. Lett. 103, 160503 (2009)).
 *
 * A shot of the upper state (mean μ1) that decays at time t < τ into the lower state (mean μ0)
 * integrates to μ0 + (μ1 − μ0)·t/τ; with Gaussian noise σ its error at threshold T is the
 * tail of that mixture on the wrong side. The lower state has only the Gaussian tail. The
 * integral over t is done by composite Gauss–Legendre quadrature. `budget.ts` evaluates the
 * same model exactly on the sample grid; this continuum form is the published reference.
 */
import { gaussianTail } from './special.ts';

export interface BarthelParameters {
  /** Integrated mean of the lower (ground-outcome) state. */
  mean0: number;
  /** Integrated mean of the upper state that relaxes. */
  mean1: number;
  /** Noise standard deviation of the integrated value. */
  sigma: number;
  /** Boxcar length τ (s). */
  window: number;
  /** Relaxation time of the upper state (s). */
  t1: number;
  threshold: number;
}

// 8-point Gauss–Legendre nodes and weights on [−1, 1] (Abramowitz & Stegun 1964, Table 25.4)
const NODES = [-0.9602898564975363, -0.7966664774136267, -0.5255324099163290, -0.1834346424956498,
  0.1834346424956498, 0.5255324099163290, 0.7966664774136267, 0.9602898564975363];
const WEIGHTS = [0.1012285362903763, 0.2223810344533745, 0.3137066458778873, 0.3626837833783620,
  0.3626837833783620, 0.3137066458778873, 0.2223810344533745, 0.1012285362903763];

/** Error probabilities of the two states; `upper` includes relaxation in the window. */
export function barthelErrors(p: BarthelParameters): { lower: number; upper: number; mean: number } {
  const up = p.mean1 > p.mean0;
  // probability that a value of mean m is reported as the lower state's outcome
  const reportedLower = (m: number) => gaussianTail((up ? m - p.threshold : p.threshold - m) / p.sigma);
  const lower = gaussianTail((up ? p.threshold - p.mean0 : p.mean0 - p.threshold) / p.sigma);
  let decayed = 0;
  const panels = 64;
  const h = p.window / panels;
  for (let j = 0; j < panels; j++) {
    for (let k = 0; k < NODES.length; k++) {
      const t = j * h + 0.5 * h * (NODES[k]! + 1);
      const density = Math.exp(-t / p.t1) / p.t1;
      decayed += 0.5 * h * WEIGHTS[k]! * density * reportedLower(p.mean0 + (p.mean1 - p.mean0) * (t / p.window));
    }
  }
  const upper = Math.exp(-p.window / p.t1) * reportedLower(p.mean1) + decayed;
  return { lower, upper, mean: 0.5 * (lower + upper) };
}
