/**
 * What a Welch bin expects from a spectrum: not S(f_k) but S seen through the window,
 *
 *   E[Ŝ_k] = ∫ S(|f|)·K(f − f_k) df,   K(f) = |W(f)|² / (fs·Σw²),   ∫K = 1,
 *
 * W the window's transform (Percival & Walden, Spectral Analysis for Physical Applications
 * (1993), §6.3, from memory). Removing each segment's mean changes only bins 0 and ±1, where the
 * Hann window's transform is nonzero, so it does not enter here. For a spectrum that is straight
 * across the window's main lobe the two agree; a steep 1/f is convex there, and its lowest bins
 * read high (about +11 % at bin 2 for 1/f). The periodic Hann window of length L is
 * W(ν) = ½D(ν) − ¼D(ν − 1) − ¼D(ν + 1) in bins ν, D(ν) = Σ_n e^(−i2πνn/L) =
 * e^(−iπν(L−1)/L)·sin(πν)/sin(πν/L); its side lobes fall as ν^−3, so ±8 bins hold all but ~1e−6
 * of K. The integral is taken by 4-point Gauss–Legendre on half-bin panels over ±8 bins, for the
 * low bins where the curvature matters (below CORRECTED_BINS; higher up the bias of a power law
 * falls as 1/k² and is under 0.2 %).
 */

/** Bins below this are read through the window. */
export const CORRECTED_BINS = 24;
const REACH = 8;
const PANELS_PER_BIN = 2;
const NODES = [-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526];
const WEIGHTS = [0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538];

/** Quadrature of one bin: E[Ŝ_k] = Σ_q weight_q·S(|frequency_q|). */
export interface BinReading {
  frequencies: Float64Array;
  weights: Float64Array;
}

/** |W(ν)|² of the periodic Hann window of length L, ν in bins. */
function hannPower(nu: number, length: number): number {
  let re = 0, im = 0;
  for (const [shift, a] of [[0, 0.5], [1, -0.25], [-1, -0.25]] as const) {
    const x = nu - shift;
    const s = Math.sin((Math.PI * x) / length);
    const magnitude = Math.abs(s) < 1e-300 ? length : Math.sin(Math.PI * x) / s;
    const phase = (-Math.PI * x * (length - 1)) / length;
    re += a * magnitude * Math.cos(phase);
    im += a * magnitude * Math.sin(phase);
  }
  return re * re + im * im;
}

/** How bin k of a length-L Hann Welch estimate at fs reads a spectrum (a single node at f_k above CORRECTED_BINS). */
export function binReading(k: number, length: number, sampleRate: number): BinReading {
  const step = sampleRate / length;
  if (k >= CORRECTED_BINS) return { frequencies: Float64Array.of(k * step), weights: Float64Array.of(1) };
  let windowPower = 0;
  for (let n = 0; n < length; n++) windowPower += (0.5 - 0.5 * Math.cos((2 * Math.PI * n) / length)) ** 2;
  const frequencies: number[] = [], weights: number[] = [];
  const half = 1 / PANELS_PER_BIN;
  for (let p = -REACH * PANELS_PER_BIN; p < REACH * PANELS_PER_BIN; p++) {
    const mid = (p + 0.5) * half;
    NODES.forEach((x, i) => {
      const nu = mid + 0.5 * half * x;
      frequencies.push(Math.abs((k + nu) * step));
      weights.push((0.5 * half * WEIGHTS[i]! * hannPower(nu, length)) / (length * windowPower));
    });
  }
  return { frequencies: Float64Array.from(frequencies), weights: Float64Array.from(weights) };
}
