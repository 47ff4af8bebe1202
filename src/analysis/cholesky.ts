/**
 * Cholesky factor of a symmetric positive semi-definite matrix, as used to draw correlated
 * Gaussians: x = L·z with z standard normal has covariance L·Lᵀ = A (Golub & Van Loan,
 * "Matrix Computations", 4th ed., Johns Hopkins 2013, Algorithm 4.2.1). Semi-definite input
 * (e.g. two pipelines with the same kernel, or an output with no noise) is handled by setting a
 * column to zero when its pivot is negligible, which keeps L·Lᵀ = A to rounding.
 */

/** Relative size below which a pivot counts as zero (in units of the largest diagonal entry). */
export const PIVOT_TOLERANCE = 1e-12;

/**
 * Writes the lower-triangular factor of the n×n row-major matrix `a` into `out` (row-major,
 * upper part zero) and returns the number of nonzero columns. `a` is not modified.
 */
export function choleskyLower(a: Float64Array, n: number, out: Float64Array = new Float64Array(n * n)): { factor: Float64Array; rank: number } {
  out.fill(0);
  let scale = 0;
  for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(a[i * n + i]!));
  const tiny = PIVOT_TOLERANCE * scale;
  let rank = 0;
  for (let j = 0; j < n; j++) {
    let d = a[j * n + j]!;
    for (let k = 0; k < j; k++) d -= out[j * n + k]! * out[j * n + k]!;
    if (!(d > tiny)) continue; // zero column: this direction carries no (new) variance
    const root = Math.sqrt(d);
    out[j * n + j] = root;
    rank++;
    for (let i = j + 1; i < n; i++) {
      let s = a[i * n + j]!;
      for (let k = 0; k < j; k++) s -= out[i * n + k]! * out[j * n + k]!;
      out[i * n + j] = s / root;
    }
  }
  return { factor: out, rank };
}
