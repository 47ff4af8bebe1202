/**
 * Ordinary least-squares fits: a straight line, and an exponential decay through its logarithm.
 *
 * Line: slope = Sxy/Sxx, intercept = ȳ − slope·x̄, r² = Sxy²/(Sxx·Syy), with the sums of
 * centred products computed in two passes (mean first) for accuracy (common practice, no
 * source). Used for log–log slopes (fit log y against log x).
 */

/** Result of a straight-line least-squares fit y ≈ slope·x + intercept. */
export interface LineFit {
  /** Fitted slope. */
  slope: number;
  /** Fitted intercept. */
  intercept: number;
  /** Coefficient of determination r² in [0, 1] (1 when y is constant and fitted exactly). */
  r2: number;
  /** Number of points used. */
  n: number;
}

/** Result of an exponential decay fit w ≈ amplitude·e^{−t/decayTime}. */
export interface DecayFit {
  /** −1/slope of ln w against t: positive for decay, negative for growth, Infinity if flat. */
  decayTime: number;
  /** e^{intercept}, the fitted value at t = 0. */
  amplitude: number;
  /** r² of the fit of ln w against t. */
  r2: number;
  /** Number of points used (only w > 0 are used). */
  n: number;
}

/**
 * Least-squares straight line through (x[i], y[i]); x and y have the same length.
 * Fewer than two points, or all x equal, give NaN slope and intercept.
 */
export function fitLine(x: ArrayLike<number>, y: ArrayLike<number>): LineFit {
  return fitSelected(x, y, x.length, () => true, (v) => v);
}

/**
 * Exponential decay time from a log-linear least-squares fit of ln w against t, using only the
 * points with w > 0 (non-positive values have no logarithm and are skipped). Note that the
 * log-linear fit weights every point equally in ln w, not in w: simple, not a maximum-likelihood fit.
 */
export function fitExponentialDecay(t: ArrayLike<number>, w: ArrayLike<number>): DecayFit {
  const line = fitSelected(t, w, t.length, (v) => v > 0, Math.log);
  return {
    decayTime: line.slope === 0 ? Infinity : -1 / line.slope,
    amplitude: Math.exp(line.intercept),
    r2: line.r2,
    n: line.n,
  };
}

function fitSelected(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  length: number,
  keep: (v: number) => boolean,
  map: (v: number) => number,
): LineFit {
  let n = 0;
  let sumX = 0;
  let sumY = 0;
  for (let i = 0; i < length; i++) {
    if (!keep(y[i])) continue;
    n++;
    sumX += x[i];
    sumY += map(y[i]);
  }
  if (n < 2) return { slope: NaN, intercept: NaN, r2: NaN, n };
  const meanX = sumX / n;
  const meanY = sumY / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = 0; i < length; i++) {
    if (!keep(y[i])) continue;
    const dx = x[i] - meanX;
    const dy = map(y[i]) - meanY;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  if (sxx === 0) return { slope: NaN, intercept: NaN, r2: NaN, n };
  const slope = sxy / sxx;
  const r2 = syy === 0 ? 1 : (sxy * sxy) / (sxx * syy);
  return { slope, intercept: meanY - slope * meanX, r2, n };
}
