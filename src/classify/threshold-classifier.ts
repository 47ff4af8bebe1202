/**
 * The threshold classifier: the pipeline's integrated value (projected onto the separation axis,
 * with boxcar, matched or optimal weights) against a threshold — at the midpoint of the outcome
 * means, where it misassigns the fewest calibration shots, or fixed. Its analytic budget is the
 * Gaussian-noise and relaxation budget of a threshold on a linear statistic (analysis/budget.ts,
 * with every noise source's variance: analysis/noise-budget.ts).
 */
import { budgetWithNoise } from '../analysis/noise-budget.ts';
import type { ClassifierKind } from './contract.ts';
import { midpointThreshold, optimalThreshold } from './threshold.ts';

export const thresholdClassifier: ClassifierKind<null> = {
  name: 'threshold',
  description: 'a threshold on the integrated value',
  readsBins: false,
  signalUnitStatistic: true,
  refuses: {},
  exactBlocker: null,
  needsDevice: null,
  needsNoise: null,
  rule(threshold, statistic, m0, m1) {
    if (threshold.method === 'midpoint') return midpointThreshold(m0, m1);
    if (threshold.method === 'fixed') return { threshold: threshold.value, highIsOne: m1 >= m0 };
    const best = optimalThreshold(statistic[0], statistic[1]);
    return { threshold: best.threshold, highIsOne: best.highIsOne };
  },
  budget: (input, noise) => budgetWithNoise(input, noise),
};
