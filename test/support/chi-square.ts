/**
 * Pearson χ² goodness-of-fit test of observed counts against expected probabilities.
 *
 * Statistic X² = Σ (O − E)²/E (Pearson, Philosophical Magazine 50, 157 (1900)); p-value the
 * upper tail of χ² with dof = (groups − 1 − fittedParameters), computed as the upper regularized
 * incomplete gamma function Q(dof/2, X²/2) so that small p-values keep their precision.
 *
 * Bin merging (so that the χ² approximation holds): walking the bins in their given order,
 * adjacent bins are pooled until the pooled expected count reaches `minExpected` (default 5,
 * the usual rule of thumb — common practice, Cochran, Ann. Math. Stat. 23, 315 (1952)); a
 * final group still below it is pooled into the group before it. Order matters: give the bins
 * in their natural order (e.g. histogram bins left to right) so that only neighbours merge.
 */
import gammainc from '@stdlib/math-base-special-gammainc';

/** Result of a χ² goodness-of-fit test. */
export interface ChiSquareResult {
  /** Pearson statistic over the merged groups. */
  statistic: number;
  /** Degrees of freedom: groups − 1 − fittedParameters (≤ 0 means no test). */
  dof: number;
  /** Upper-tail probability P(χ²_dof ≥ statistic); NaN when dof ≤ 0. */
  pValue: number;
  /** Number of groups after merging. */
  groups: number;
}

/** Options of {@link chiSquareTest}. */
export interface ChiSquareOptions {
  /** Smallest expected count allowed in a group before merging stops (default 5). */
  minExpected?: number;
  /** Parameters estimated from the same data, subtracted from the dof (default 0). */
  fittedParameters?: number;
}

/**
 * Pearson χ² goodness of fit of `observed` counts to `probabilities` (same length; they are
 * rescaled to sum to 1, expected counts = total observed × probability), with bin merging.
 */
export function chiSquareTest(
  observed: ArrayLike<number>,
  probabilities: ArrayLike<number>,
  options: ChiSquareOptions = {},
): ChiSquareResult {
  const minExpected = options.minExpected ?? 5;
  const fitted = options.fittedParameters ?? 0;
  const bins = observed.length;
  let total = 0;
  let probabilitySum = 0;
  for (let i = 0; i < bins; i++) {
    total += observed[i];
    probabilitySum += probabilities[i];
  }
  const scale = total / probabilitySum;

  let statistic = 0;
  let groups = 0;
  // The last closed group is kept open for the case where the leftover tail must join it.
  let lastObserved = 0;
  let lastExpected = 0;
  let haveLast = false;
  let runObserved = 0;
  let runExpected = 0;
  for (let i = 0; i < bins; i++) {
    runObserved += observed[i];
    runExpected += probabilities[i] * scale;
    if (runExpected >= minExpected) {
      if (haveLast) statistic += pearsonTerm(lastObserved, lastExpected);
      lastObserved = runObserved;
      lastExpected = runExpected;
      haveLast = true;
      groups++;
      runObserved = 0;
      runExpected = 0;
    }
  }
  if (runExpected > 0 || runObserved > 0) {
    if (haveLast) {
      lastObserved += runObserved;
      lastExpected += runExpected;
    } else {
      lastObserved = runObserved;
      lastExpected = runExpected;
      haveLast = true;
      groups++;
    }
  }
  if (haveLast) statistic += pearsonTerm(lastObserved, lastExpected);

  const dof = groups - 1 - fitted;
  const pValue = dof > 0 ? gammainc(statistic / 2, dof / 2, true, true) : NaN;
  return { statistic, dof, pValue, groups };
}

function pearsonTerm(o: number, e: number): number {
  const diff = o - e;
  return (diff * diff) / e;
}
