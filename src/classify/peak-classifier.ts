/**
 * The peak classifier: decides on the extreme of the filtered, decimated record inside the
 * window — its maximum when outcome 1 sits above outcome 0 on the separation axis, its minimum
 * when below — against a threshold calibrated like the threshold classifier's (midpoint of the
 * outcome means of the statistic, fewest misassigned calibration shots, or fixed). This is how
 * energy-selective (tunnelling) spin readout is read: the excited spin leaves a short blip at a
 * random time, which an average over the window dilutes and the record's extreme keeps.
 *
 * Its fitted model is the side of the blip (+1: a maximum, −1: a minimum), from the mean
 * calibration records of the two outcomes; recorded traces alone can calibrate it. The extreme
 * of a record is not linear in it, so the exact engine steps aside, and no closed-form budget
 * exists (the tables show "—").
 */
import type { ClassifierKind } from './contract.ts';
import { thresholdClassifier } from './threshold-classifier.ts';

/** The peak classifier's model: +1 to decide on the maximum, −1 on the minimum. */
export interface PeakModel {
  side: 1 | -1;
}

export const peakClassifier: ClassifierKind<PeakModel> = {
  name: 'peak',
  description: 'a threshold on the extreme (maximum or minimum) of the decimated record in the window',
  readsBins: true,
  signalUnitStatistic: true,
  refuses: { weights: 'it reads the extreme of every bin' },
  exactBlocker: 'the peak classifier decides on the extreme of the record, which is not linear in it',
  needsDevice: null,
  needsNoise: null,

  fit(r) {
    // Σ over bins of the mean record of outcome 1 minus outcome 0: the side the signal moves to
    let sum1 = 0, sum0 = 0, n1 = 0, n0 = 0;
    for (let i = 0; i < r.count; i++) {
      let s = 0;
      for (let b = 0; b < r.bins; b++) s += r.projected[i * r.bins + b]!;
      if (r.outcome[i] === 1) { sum1 += s; n1++; } else { sum0 += s; n0++; }
    }
    return { side: n1 > 0 && n0 > 0 && sum1 / n1 < sum0 / n0 ? -1 : 1 };
  },

  modelProblem(model) {
    const side = (model as { side?: unknown } | null)?.side;
    return side === 1 || side === -1 ? null : 'a side of 1 or -1';
  },

  statistic(model) {
    if (model.side === 1) {
      return (bins, offset, count) => {
        let m = -Infinity;
        for (let b = offset; b < offset + count; b++) if (bins[b]! > m) m = bins[b]!;
        return m;
      };
    }
    return (bins, offset, count) => {
      let m = Infinity;
      for (let b = offset; b < offset + count; b++) if (bins[b]! < m) m = bins[b]!;
      return m;
    };
  },

  rule: thresholdClassifier.rule,

  budget: () => null,
};
