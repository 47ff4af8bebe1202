/**
 * Integration weights over a record of n samples (or decimated bins): the integrated value is
 * v = Σ_k w_k·y_k. Three designs — boxcar, matched (∝ mean trace difference over the noise variance), and optimal linear
 * (C⁻¹·Δμ) — plus the noise covariance estimator that the last one needs.
 *
 * Normalisation (so that v stays in signal units and the designs compare on one scale):
 * boxcar: Σ w = 1, v is the window mean; matched and optimal linear: scaled so that
 * Σ w·Δμ = Δμ̄ = (1/n)·Σ Δμ, i.e. the separation of the two states' integrated values equals the
 * separation a boxcar over the same n samples gives (when mean(Δμ) = 0, e.g. an oscillating
 * difference, Σ w·Δμ = 1 instead). Only the direction of w matters for the
 * decision; the scale only fixes the units of the value and of the threshold.
 *
 * Optimal linear filter: Gambetta, Braff, Wallraff, Girvin, Schoelkopf, Phys. Rev. A 76, 012325
 * (2007). Among linear filters the Fisher discriminant w ∝ C⁻¹·Δμ maximises the separation over
 * the noise standard deviation (Fisher, Ann. Eugen. 7, 179 (1936)); with white noise it is the
 * matched filter, and for an excited state decaying at rate 1/T1 its weights decay as e^(−t/T1).
 */

/** Boxcar weights over n samples: 1/length on [start, start + length), 0 elsewhere (Σ w = 1). */
export function boxcarWeights(n: number, start: number, length: number, out: Float64Array = new Float64Array(n)): Float64Array {
  if (!(length >= 1) || start < 0 || start + length > n) {
    throw new RangeError(`boxcarWeights: window [${start}, ${start + length}) outside 0..${n}`);
  }
  out.fill(0, 0, n);
  out.fill(1 / length, start, start + length);
  return out;
}

/** Scales w in place so that Σ w·Δμ = mean(Δμ) (the boxcar separation over the same samples). */
function scaleToBoxcarSeparation(w: Float64Array, meanDifference: Float64Array): Float64Array {
  const n = meanDifference.length;
  let projected = 0;
  let sum = 0;
  for (let k = 0; k < n; k++) {
    projected += w[k]! * meanDifference[k]!;
    sum += meanDifference[k]!;
  }
  if (!(projected !== 0) || !Number.isFinite(projected)) {
    throw new RangeError('weights: the mean difference gives no separation to normalise on');
  }
  const boxcarSeparation = sum / n;
  // A mean difference that averages to zero (e.g. IQ rotated off axis) keeps the unit Σ w·Δμ = 1.
  const scale = (boxcarSeparation !== 0 ? boxcarSeparation : 1) / projected;
  for (let k = 0; k < n; k++) w[k]! *= scale;
  return w;
}

/**
 * Matched-filter weights w_k ∝ Δμ_k/v_k (the mean trace of outcome 1 minus outcome 0, over each
 * sample's noise variance; w ∝ Δμ when no variances are given), scaled so that
 * Σ w·Δμ = mean(Δμ). For a window, pass `meanDifference.subarray(start, start + length)`.
 *
 * Why the variance: the matched filter of a signal Δμ in independent noise of variances v_k is
 * Δμ_k/v_k (it maximises (Σ w·Δμ)²/Σ w²·v; Gambetta et al., Phys. Rev. A 76, 012325 (2007), with
 * a diagonal covariance). A demodulated record has non-stationary noise: white noise n_k times
 * the reference 2cos θ_k has variance 4σ²cos²θ_k, while the signal L·cos θ_k demodulates to
 * L(1 + cos 2θ_k) = 2L·cos²θ_k. So Δμ_k/v_k = ΔL/(2σ²) is flat — the boxcar, which is optimal
 * there — whereas w ∝ Δμ would keep the 2f ripple and give ⟨cos⁴⟩/√⟨cos⁶⟩ ÷ √⟨cos²⟩ = 3/√10 ≈ 0.949
 * of the boxcar's SNR. A sample with no noise (v_k = 0) carries no signal there either: weight 0.
 */
export function matchedWeights(
  meanDifference: Float64Array, noiseVariance?: Float64Array, out: Float64Array = new Float64Array(meanDifference.length),
): Float64Array {
  if (noiseVariance) {
    for (let k = 0; k < meanDifference.length; k++) out[k] = noiseVariance[k]! > 0 ? meanDifference[k]! / noiseVariance[k]! : 0;
  } else out.set(meanDifference);
  return scaleToBoxcarSeparation(out, meanDifference);
}

/**
 * Cholesky factor of a symmetric positive-definite n×n row-major matrix: returns lower-triangular
 * L (row-major, upper part zero) with C = L·Lᵀ (Golub & Van Loan, Matrix Computations, 1996,
 * Alg. 4.2.1). Throws if C is not positive definite to working precision.
 */
export function choleskyFactor(covariance: Float64Array, n: number): Float64Array {
  const l = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    let diagonal = covariance[j * n + j]!;
    for (let k = 0; k < j; k++) diagonal -= l[j * n + k]! * l[j * n + k]!;
    if (!(diagonal > 0)) throw new RangeError(`choleskyFactor: matrix not positive definite (pivot ${j})`);
    const ljj = Math.sqrt(diagonal);
    l[j * n + j] = ljj;
    const inv = 1 / ljj;
    for (let i = j + 1; i < n; i++) {
      let v = covariance[i * n + j]!;
      for (let k = 0; k < j; k++) v -= l[i * n + k]! * l[j * n + k]!;
      l[i * n + j] = v * inv;
    }
  }
  return l;
}

/** Solves (L·Lᵀ)·x = b for x given the Cholesky factor L; writes x into `out` and returns it. */
export function choleskySolve(l: Float64Array, b: Float64Array, out: Float64Array = new Float64Array(b.length)): Float64Array {
  const n = b.length;
  for (let i = 0; i < n; i++) {
    let v = b[i]!;
    for (let k = 0; k < i; k++) v -= l[i * n + k]! * out[k]!;
    out[i] = v / l[i * n + i]!;
  }
  for (let i = n - 1; i >= 0; i--) {
    let v = out[i]!;
    for (let k = i + 1; k < n; k++) v -= l[k * n + i]! * out[k]!;
    out[i] = v / l[i * n + i]!;
  }
  return out;
}

/**
 * Optimal linear weights w ∝ C⁻¹·Δμ (Gambetta et al., Phys. Rev. A 76, 012325, 2007), by a
 * Cholesky solve (n up to a few hundred), scaled so that Σ w·Δμ = mean(Δμ).
 * `covariance` is the n×n row-major noise covariance of the samples (see `noiseCovariance`).
 */
export function optimalLinearWeights(
  meanDifference: Float64Array,
  covariance: Float64Array,
  out: Float64Array = new Float64Array(meanDifference.length),
): Float64Array {
  const n = meanDifference.length;
  if (covariance.length !== n * n) throw new RangeError(`optimalLinearWeights: covariance must be ${n}×${n}`);
  choleskySolve(regularisedFactor(covariance, n), meanDifference, out);
  return scaleToBoxcarSeparation(out, meanDifference);
}

/**
 * The Cholesky factor of C, or — when C is singular to working precision (bins that are exact
 * combinations of others, e.g. a filter running into the record's end) — of C + δ·I with the
 * smallest δ of RIDGES (relative to the mean variance) that makes it positive definite: the
 * ridge (Tikhonov) form of the Fisher discriminant, which tends to the pseudo-inverse one as δ → 0.
 * A covariance that the largest ridge does not cure (no noise at all) still throws.
 */
function regularisedFactor(covariance: Float64Array, n: number): Float64Array {
  try {
    return choleskyFactor(covariance, n);
  } catch (e) {
    if (!(e instanceof RangeError)) throw e;
    let mean = 0;
    for (let i = 0; i < n; i++) mean += covariance[i * n + i]! / n;
    if (!(mean > 0) || !Number.isFinite(mean)) throw e;
    for (const ridge of RIDGES) {
      const c = Float64Array.from(covariance);
      for (let i = 0; i < n; i++) c[i * n + i]! += ridge * mean;
      try {
        return choleskyFactor(c, n);
      } catch (again) {
        if (!(again instanceof RangeError)) throw again;
      }
    }
    throw e;
  }
}

/** Relative ridges tried on a singular noise covariance, smallest first (common practice, no source). */
const RIDGES = [1e-12, 1e-10, 1e-8, 1e-6];

/**
 * Sample covariance of calibration records about a given mean trace:
 * C_ij = Σ_r (y_ri − m_i)(y_rj − m_j) / (R − ddof), with R = records.length / n records stored
 * row after row (n = mean.length). ddof = 1 (default, as numpy.cov) when `mean` was estimated
 * from the same records; ddof = 0 when it is known exactly. Returns n×n row-major.
 */
export function noiseCovariance(
  records: Float64Array,
  mean: Float64Array,
  ddof = 1,
  out: Float64Array = new Float64Array(mean.length * mean.length),
): Float64Array {
  const n = mean.length;
  const count = Math.floor(records.length / n);
  if (count * n !== records.length) throw new RangeError(`noiseCovariance: ${records.length} values are not whole records of ${n}`);
  if (count - ddof <= 0) throw new RangeError(`noiseCovariance: ${count} records are too few for ddof = ${ddof}`);
  out.fill(0, 0, n * n);
  const centred = new Float64Array(n);
  for (let r = 0; r < count; r++) {
    const base = r * n;
    for (let i = 0; i < n; i++) centred[i] = records[base + i]! - mean[i]!;
    for (let i = 0; i < n; i++) {
      const ci = centred[i]!;
      if (ci === 0) continue;
      const row = i * n;
      for (let j = i; j < n; j++) out[row + j]! += ci * centred[j]!;
    }
  }
  const inv = 1 / (count - ddof);
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      const v = out[i * n + j]! * inv;
      out[i * n + j] = v;
      out[j * n + i] = v;
    }
  }
  return out;
}
