/**
 * The noise model fitted to a measured one-sided spectrum:
 *
 *   S(f) = W + A·(f/f_ref)^(−α) + B / (1 + (2πfτ)²)
 *
 * white noise W; 1/f noise of density² A at the reference frequency f_ref and exponent α
 * (signal/noise/flicker.ts writes it the same way); exponentially correlated noise with the
 * Lorentzian spectrum of an Ornstein–Uhlenbeck process, S(0) = B = 4σ²τ and correlation time τ
 * (Gillespie, Phys. Rev. E 54, 2084 (1996); signal/noise/correlated.ts). Sampled at fs, that
 * process is the autoregression x_{k+1} = a·x_k + …, a = e^(−r), r = 1/(fs·τ), whose spectrum —
 * the Lorentzian with its aliases folded in — is what records show and what is fitted:
 *   S_L(f) = (2σ²/fs)·(1 − a²)/(1 − 2a·cos(2πf/fs) + a²) = (B·r/2)·(1 − a²)/D
 * (the spectrum of a first-order autoregression, e.g. Percival & Walden (1993), §9.2, from
 * memory), ≈ B/(1 + (2πfτ)²) for f ≪ fs and τ ≫ 1/fs. The parameters are held
 * on a log scale (ln W, ln A, α, ln B, ln τ) so that every step of the fit keeps them positive;
 * a component that is off is absent from the vector.
 */

/** The frame of a spectrum: the 1/f reference frequency and the sample rate (Hz). */
export interface SpectrumFrame {
  referenceFrequency: number;
  sampleRate: number;
}

/** Which components the model has. */
export interface SpectrumComponents {
  flicker: boolean;
  lorentzian: boolean;
}

/** Parameters in display form. */
export interface SpectrumParameters {
  white: number;
  flicker: { amplitude: number; exponent: number } | null;
  lorentzian: { amplitude: number; correlationTime: number } | null;
}

/** Indices of each parameter in the vector (−1 when the component is off). */
export function layoutOf(c: SpectrumComponents): { size: number; flicker: number; lorentzian: number } {
  let size = 1;
  const flicker = c.flicker ? size : -1;
  if (c.flicker) size += 2;
  const lorentzian = c.lorentzian ? size : -1;
  if (c.lorentzian) size += 2;
  return { size, flicker, lorentzian };
}

/** The vector of `p` (its components decide the layout). */
export function toVector(p: SpectrumParameters): Float64Array {
  const v: number[] = [Math.log(p.white)];
  if (p.flicker) v.push(Math.log(p.flicker.amplitude), p.flicker.exponent);
  if (p.lorentzian) v.push(Math.log(p.lorentzian.amplitude), Math.log(p.lorentzian.correlationTime));
  return Float64Array.from(v);
}

/** The parameters of vector `v` with components `c`. */
export function fromVector(v: Float64Array, c: SpectrumComponents): SpectrumParameters {
  const at = layoutOf(c);
  return {
    white: Math.exp(v[0]!),
    flicker: c.flicker ? { amplitude: Math.exp(v[at.flicker]!), exponent: v[at.flicker + 1]! } : null,
    lorentzian: c.lorentzian ? { amplitude: Math.exp(v[at.lorentzian]!), correlationTime: Math.exp(v[at.lorentzian + 1]!) } : null,
  };
}

/** The sampled Lorentzian S_L(f) of the file comment, and ∂ln S_L/∂ln τ. */
function sampledLorentzian(amplitude: number, correlationTime: number, f: number, sampleRate: number): { density: number; logTimeSlope: number } {
  const r = 1 / (sampleRate * correlationTime), a = Math.exp(-r);
  const oneLessA2 = -Math.expm1(-2 * r);
  const sine = Math.sin((Math.PI * f) / sampleRate);
  // D = (1 − a)² + 2a·(1 − cos 2πf/fs), written without cancellation
  const d = Math.expm1(-r) ** 2 + 4 * a * sine * sine;
  const density = (0.5 * amplitude * r * oneLessA2) / d;
  const cosine = 1 - 2 * sine * sine;
  const logRateSlope = 1 + r * ((2 * a * a) / oneLessA2 - (2 * a * (cosine - a)) / d);
  return { density, logTimeSlope: -logRateSlope };
}

/** Each component's density at f: white, 1/f, Lorentzian (0 when off). */
export function componentDensities(p: SpectrumParameters, frame: SpectrumFrame, f: number): [number, number, number] {
  const flicker = p.flicker ? p.flicker.amplitude * (f / frame.referenceFrequency) ** -p.flicker.exponent : 0;
  const lorentz = p.lorentzian ? sampledLorentzian(p.lorentzian.amplitude, p.lorentzian.correlationTime, f, frame.sampleRate).density : 0;
  return [p.white, flicker, lorentz];
}

/** S(f) of the model. */
export function modelDensity(p: SpectrumParameters, frame: SpectrumFrame, f: number): number {
  const [w, a, b] = componentDensities(p, frame, f);
  return w + a + b;
}

/**
 * S(f) and the derivatives ∂ ln S/∂θ_j at f for vector v (written to `gradient`, length = the vector's).
 */
export function densityAndLogGradient(v: Float64Array, c: SpectrumComponents, frame: SpectrumFrame, f: number, gradient: Float64Array): number {
  const at = layoutOf(c);
  const white = Math.exp(v[0]!);
  let flicker = 0, lorentz = 0, logTimeSlope = 0, logRatio = 0;
  if (c.flicker) {
    logRatio = Math.log(f / frame.referenceFrequency);
    flicker = Math.exp(v[at.flicker]! - v[at.flicker + 1]! * logRatio);
  }
  if (c.lorentzian) {
    const l = sampledLorentzian(Math.exp(v[at.lorentzian]!), Math.exp(v[at.lorentzian + 1]!), f, frame.sampleRate);
    lorentz = l.density;
    logTimeSlope = l.logTimeSlope;
  }
  const s = white + flicker + lorentz;
  gradient[0] = white / s;
  if (c.flicker) {
    gradient[at.flicker] = flicker / s;
    gradient[at.flicker + 1] = (-logRatio * flicker) / s;
  }
  if (c.lorentzian) {
    gradient[at.lorentzian] = lorentz / s;
    gradient[at.lorentzian + 1] = (logTimeSlope * lorentz) / s;
  }
  return s;
}
