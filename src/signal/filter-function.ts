/**
 * The filter-function view of a linear processing chain: the integrated value of a shot is
 * V = Σ_k K[k]·x_k over the record samples, so noise x with autocovariance R(τ) (one-sided PSD
 * S(f)) gives Var V = Σ_k Σ_k' K[k]K[k']·R((k − k')/fs) = ∫_0^∞ S(f)·|H(f)|² df with the kernel's
 * transfer function H(f) = Σ_k K[k]·e^(−i2πf·k/fs) (Wiener–Khinchin; e.g. Bendat & Piersol,
 * "Random Data", Wiley 2010, §6.1). White noise of per-sample variance σ² gives σ²·Σ K². The
 * kernel K is the whole path from the injection point: for sensor-side noise it includes the
 * gain and the carrier (K[k]·g·c_k), for amplifier-side noise the gain (K[k]·g).
 */

/** Σ_{k=lo}^{hi−1} x[k]². */
export function squaredSum(x: Float64Array, lo: number, hi: number): number {
  let s = 0;
  for (let k = lo; k < hi; k++) s += x[k]! * x[k]!;
  return s;
}

/**
 * Σ_k Σ_k' x[k]·x[k']·ρ^|k−k'| over [lo, hi) in O(n): the variance of Σ x[k]·y_k for a sequence
 * of unit variance and autocorrelation ρ^|d| (e.g. a telegraph signal sampled at fs: ρ = e^(−λ/fs)).
 */
export function exponentialQuadraticForm(x: Float64Array, lo: number, hi: number, rho: number): number {
  let total = 0;
  let tail = 0; // Σ_{k'<k} x[k']·ρ^(k−k')
  for (let k = lo; k < hi; k++) {
    tail = rho * (tail + (k > lo ? x[k - 1]! : 0));
    total += x[k]! * (x[k]! + 2 * tail);
  }
  return total;
}

/**
 * Σ_k Σ_k' x[k]·y[k']·ρ^|k−k'| over [lo, hi) in O(n): the covariance of Σ x[k]·z_k and
 * Σ y[k]·z_k for a sequence z of unit variance and autocorrelation ρ^|d|. With x = y it is
 * exponentialQuadraticForm.
 */
export function exponentialBilinearForm(x: Float64Array, y: Float64Array, lo: number, hi: number, rho: number): number {
  let total = 0;
  let tailX = 0, tailY = 0; // Σ_{k'<k} x[k']·ρ^(k−k'), and the same of y
  for (let k = lo; k < hi; k++) {
    tailX = rho * (tailX + (k > lo ? x[k - 1]! : 0));
    tailY = rho * (tailY + (k > lo ? y[k - 1]! : 0));
    total += x[k]! * y[k]! + x[k]! * tailY + y[k]! * tailX;
  }
  return total;
}

/** |H(f)|² of a kernel on [lo, hi) sampled at fs: |Σ_k K[k]·e^(−i2πf·k/fs)|². */
export function kernelPowerGain(kernel: Float64Array, lo: number, hi: number, sampleRate: number, f: number): number {
  const w = (2 * Math.PI * f) / sampleRate;
  // rotate by a recurrence (two multiplications per sample), re-seeded every 256 samples
  let re = 0, im = 0;
  const cw = Math.cos(w), sw = Math.sin(w);
  let c = 1, s = 0;
  for (let k = lo; k < hi; k++) {
    if ((k - lo) % 256 === 0) { c = Math.cos(w * k); s = -Math.sin(w * k); }
    const x = kernel[k]!;
    re += x * c;
    im += x * s;
    const nc = c * cw + s * sw;
    s = s * cw - c * sw;
    c = nc;
  }
  return re * re + im * im;
}

/**
 * ∫_{fLo}^{fHi} S(f)·|H(f)|² df for a one-sided density S and a kernel on the record grid, by the
 * trapezoid rule on a grid that is logarithmic below 1/T (T the kernel's duration) and linear,
 * `perLobe` points per 1/T, above it — fine enough for the sinc lobes of a boxcar.
 */
export function filterFunctionVariance(
  density: (f: number) => number, kernel: Float64Array, lo: number, hi: number, sampleRate: number,
  fLo: number, fHi: number, perLobe = 16,
): number {
  const lobe = sampleRate / Math.max(1, hi - lo);
  const freqs: number[] = [];
  const split = Math.min(fHi, Math.max(fLo, lobe / 4));
  const logSteps = Math.max(8, Math.ceil(32 * Math.log10(split / fLo)));
  for (let i = 0; i <= logSteps; i++) freqs.push(fLo * (split / fLo) ** (i / logSteps));
  const dl = lobe / perLobe;
  for (let f = split + dl; f < fHi; f += dl) freqs.push(f);
  if (freqs[freqs.length - 1]! < fHi) freqs.push(fHi);
  let total = 0;
  let prev = density(freqs[0]!) * kernelPowerGain(kernel, lo, hi, sampleRate, freqs[0]!);
  for (let i = 1; i < freqs.length; i++) {
    const f = freqs[i]!;
    const v = density(f) * kernelPowerGain(kernel, lo, hi, sampleRate, f);
    total += 0.5 * (v + prev) * (f - freqs[i - 1]!);
    prev = v;
  }
  return total;
}
