/**
 * Matrix exponential of a small dense matrix (N ≤ 8 in use: the generator of the hidden-state
 * chain times a bin duration).
 *
 * Method: scaling and squaring with the diagonal Padé approximant of degree 6 — Moler & Van Loan,
 * SIAM Rev. 45, 3 (2003), "method 3"; Golub & Van Loan, *Matrix Computations* (1996) Alg. 11.3.1.
 * A is scaled by 2^−s so that ‖A/2^s‖∞ ≤ ½; the (6,6) approximant then has a relative backward
 * error below 2^(3−12)·6!·6!/(12!·13!) ≈ 3.4e−16 (ibid., the bound ε(p,q) for ‖A‖ ≤ ½), i.e. about
 * one unit in the last place. The result is squared s times. Allocates its work arrays per call:
 * it is meant for set-up (one call per classifier), not for a hot loop.
 */

/** Padé (6,6) coefficients c_k = (12−k)!·6! / (12!·k!·(6−k)!), k = 0..6 (Golub & Van Loan 1996). */
const PADE6 = [1, 1 / 2, 5 / 44, 1 / 66, 1 / 792, 1 / 15840, 1 / 665280] as const;

/** C = A·B for n×n row-major matrices; C must not alias A or B. */
function multiply(a: Float64Array, b: Float64Array, c: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let sum = 0;
      for (let k = 0; k < n; k++) sum += a[i * n + k]! * b[k * n + j]!;
      c[i * n + j] = sum;
    }
  }
}

/** Solves D·X = B in place (B is overwritten by X) by Gaussian elimination with partial pivoting. */
function solveInPlace(d: Float64Array, b: Float64Array, n: number): void {
  for (let col = 0; col < n; col++) {
    let pivot = col;
    let best = Math.abs(d[col * n + col]!);
    for (let r = col + 1; r < n; r++) {
      const v = Math.abs(d[r * n + col]!);
      if (v > best) {
        best = v;
        pivot = r;
      }
    }
    if (best === 0) throw new RangeError('matrixExponential: singular Padé denominator');
    if (pivot !== col) {
      for (let k = 0; k < n; k++) {
        const t = d[col * n + k]!;
        d[col * n + k] = d[pivot * n + k]!;
        d[pivot * n + k] = t;
        const u = b[col * n + k]!;
        b[col * n + k] = b[pivot * n + k]!;
        b[pivot * n + k] = u;
      }
    }
    const inv = 1 / d[col * n + col]!;
    for (let r = col + 1; r < n; r++) {
      const f = d[r * n + col]! * inv;
      if (f === 0) continue;
      for (let k = col; k < n; k++) d[r * n + k]! -= f * d[col * n + k]!;
      for (let k = 0; k < n; k++) b[r * n + k]! -= f * b[col * n + k]!;
    }
  }
  for (let col = n - 1; col >= 0; col--) {
    const inv = 1 / d[col * n + col]!;
    for (let k = 0; k < n; k++) b[col * n + k]! *= inv;
    for (let r = 0; r < col; r++) {
      const f = d[r * n + col]!;
      if (f === 0) continue;
      for (let k = 0; k < n; k++) b[r * n + k]! -= f * b[col * n + k]!;
    }
  }
}

/**
 * exp(A) of an n×n row-major matrix by scaling and squaring with Padé(6) (Moler & Van Loan,
 * SIAM Rev. 45, 3, 2003). Writes into `out` (length n², may not alias `a`) and returns it.
 */
export function matrixExponential(a: Float64Array, n: number, out: Float64Array = new Float64Array(n * n)): Float64Array {
  const size = n * n;
  let norm = 0;
  for (let i = 0; i < n; i++) {
    let row = 0;
    for (let j = 0; j < n; j++) row += Math.abs(a[i * n + j]!);
    if (!Number.isFinite(row)) throw new RangeError('matrixExponential: matrix has a non-finite entry');
    if (row > norm) norm = row;
  }
  const squarings = norm > 0.5 ? Math.max(0, Math.ceil(Math.log2(norm / 0.5))) : 0;
  const scale = Math.pow(2, -squarings);

  const x = new Float64Array(size);
  for (let k = 0; k < size; k++) x[k] = a[k]! * scale;
  const x2 = new Float64Array(size);
  const x4 = new Float64Array(size);
  const x6 = new Float64Array(size);
  multiply(x, x, x2, n);
  multiply(x2, x2, x4, n);
  multiply(x4, x2, x6, n);

  // Odd part U = X·(c1·I + c3·X² + c5·X⁴), even part V = c0·I + c2·X² + c4·X⁴ + c6·X⁶.
  const inner = new Float64Array(size);
  const even = new Float64Array(size);
  for (let k = 0; k < size; k++) {
    inner[k] = PADE6[3] * x2[k]! + PADE6[5] * x4[k]!;
    even[k] = PADE6[2] * x2[k]! + PADE6[4] * x4[k]! + PADE6[6] * x6[k]!;
  }
  for (let i = 0; i < n; i++) {
    inner[i * n + i]! += PADE6[1];
    even[i * n + i]! += PADE6[0];
  }
  const odd = new Float64Array(size);
  multiply(x, inner, odd, n);

  // Numerator N = V + U, denominator D = V − U; exp(X) ≈ D⁻¹·N.
  const numerator = out;
  const denominator = new Float64Array(size);
  for (let k = 0; k < size; k++) {
    numerator[k] = even[k]! + odd[k]!;
    denominator[k] = even[k]! - odd[k]!;
  }
  solveInPlace(denominator, numerator, n);

  let current: Float64Array = numerator;
  let spare: Float64Array = x; // reuse as scratch for squaring
  for (let s = 0; s < squarings; s++) {
    multiply(current, current, spare, n);
    const t = current;
    current = spare;
    spare = t;
  }
  if (current !== out) out.set(current);
  return out;
}
