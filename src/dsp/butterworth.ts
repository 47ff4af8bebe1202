/**
 * Digital Butterworth low-pass design as second-order sections.
 *
 * Method: the analog Butterworth prototype (poles evenly spaced on the left half of the unit
 * circle, Butterworth, *Wireless Engineer* 7, 536, 1930), scaled to the pre-warped cutoff
 * Ωc = 2·fs·tan(π·fc/fs), mapped to the z-plane by the bilinear transform s = 2·fs·(z − 1)/(z + 1)
 * (Oppenheim & Schafer, *Discrete-Time Signal Processing*, 3rd ed., 2010, ch. 7), which puts all
 * N zeros at z = −1. The poles are then grouped into sections exactly as scipy.signal's
 * `zpk2sos(..., pairing='nearest')` does, so `butterworthSections(N, fc, fs).sos` equals
 * `scipy.signal.butter(N, fc, output='sos', fs=fs)` to rounding.
 *
 * Section layout for odd orders (as scipy): the real pole sits in section 0 with a2 = 0 (a
 * first-order denominator); the zeros are distributed by nearness, so one section carries the
 * zeros {−1, 0} (b2 = 0). The overall gain is folded into section 0's numerator.
 */

import { type ComplexSeries, makeComplexSeries } from './complex-response.ts';

/** A Butterworth low-pass: second-order sections plus the zeros, poles and gain they came from. */
export interface ButterworthDesign {
  /** Row-major sections × 6: b0 b1 b2 a0 a1 a2 per section, a0 = 1. */
  sos: Float64Array;
  /** Number of second-order sections, ⌈order/2⌉. */
  sections: number;
  /** Digital zeros (all at z = −1), `order` values. */
  zeros: ComplexSeries;
  /** Digital poles, `order` values, in prototype order. */
  poles: ComplexSeries;
  /** Overall gain k of H(z) = k·Π(1 − zᵢ/z)/Π(1 − pᵢ/z). */
  gain: number;
}

/** One pole or zero during pairing. */
interface Root {
  re: number;
  im: number;
}

/** Relative tolerance below which a pole counts as real (scipy's `_cplxreal` default). */
const REAL_TOLERANCE = 100 * Number.EPSILON;

/**
 * Designs an order-`order` digital Butterworth low-pass with −3 dB point `cutoff` (Hz) at
 * `sampleRate` (Hz), bilinear transform with pre-warping; throws RangeError on invalid arguments.
 */
export function butterworthSections(order: number, cutoff: number, sampleRate: number): ButterworthDesign {
  if (!Number.isInteger(order) || order < 1) throw new RangeError(`Butterworth order must be an integer ≥ 1, got ${order}`);
  if (!(sampleRate > 0) || !Number.isFinite(sampleRate)) throw new RangeError(`sample rate must be positive, got ${sampleRate}`);
  if (!(cutoff > 0 && cutoff < sampleRate / 2)) {
    throw new RangeError(`cutoff must lie in (0, sampleRate/2) = (0, ${sampleRate / 2}), got ${cutoff}`);
  }
  const n = order;
  // Work in units where the sampling rate is 2 (scipy's convention): Ωc = 4·tan(π·Wn/2), Wn = 2fc/fs.
  const wn = (2 * cutoff) / sampleRate;
  const warped = 4 * Math.tan((Math.PI * wn) / 2);
  const bilinearScale = 4; // 2·fs with fs = 2

  const poles = makeComplexSeries(n);
  // Product Π(bilinearScale − p_analog), for the gain of the bilinear map.
  let prodRe = 1;
  let prodIm = 0;
  for (let i = 0; i < n; i++) {
    const m = -n + 1 + 2 * i;
    const theta = (Math.PI * m) / (2 * n);
    const pr = -Math.cos(theta) * warped;
    const pi = -Math.sin(theta) * warped;
    // z = (s2 + p) / (s2 − p)
    const numRe = bilinearScale + pr;
    const numIm = pi;
    const denRe = bilinearScale - pr;
    const denIm = -pi;
    const d = denRe * denRe + denIm * denIm;
    poles.re[i] = (numRe * denRe + numIm * denIm) / d;
    poles.im[i] = (numIm * denRe - numRe * denIm) / d;
    const nextRe = prodRe * denRe - prodIm * denIm;
    const nextIm = prodRe * denIm + prodIm * denRe;
    prodRe = nextRe;
    prodIm = nextIm;
  }
  // k = warped^N · Re(1 / Π(s2 − p)); the analog prototype has unit gain and no zeros.
  const gain = Math.pow(warped, n) * (prodRe / (prodRe * prodRe + prodIm * prodIm));

  const zeros = makeComplexSeries(n);
  zeros.re.fill(-1);

  const sections = (n + 1) >> 1;
  const sos = pairNearest(poles, zeros.re, sections);
  for (let j = 0; j < 3; j++) sos[j] *= gain;
  return { sos, sections, zeros, poles, gain };
}

/**
 * Groups poles (complex, conjugate-closed) and real zeros into sections as scipy's
 * `zpk2sos(pairing='nearest')` does for a digital filter: the pole nearest the unit circle
 * goes to the last section, paired with its nearest zeros. Assumes all zeros are real (true for
 * the low-pass designs here), which rules out scipy's complex-zero special case.
 */
function pairNearest(poles: ComplexSeries, realZeros: Float64Array, sections: number): Float64Array {
  // Split poles like scipy's _cplxreal: one representative (im > 0) per conjugate pair, sorted by
  // real part then |im|; then the real poles sorted by value.
  const complexPoles: Root[] = [];
  const realPoles: Root[] = [];
  for (let i = 0; i < poles.re.length; i++) {
    const re = poles.re[i];
    const im = poles.im[i];
    if (Math.abs(im) <= REAL_TOLERANCE * Math.hypot(re, im)) realPoles.push({ re, im: 0 });
    else if (im > 0) complexPoles.push({ re, im });
  }
  complexPoles.sort((a, b) => a.re - b.re || Math.abs(a.im) - Math.abs(b.im));
  const zeros: number[] = Array.from(realZeros);
  // Pad to an even count with a pole and a zero at the origin (scipy does this for 'nearest').
  if ((realPoles.length + 2 * complexPoles.length) % 2 === 1) {
    realPoles.push({ re: 0, im: 0 });
    zeros.push(0);
  }
  realPoles.sort((a, b) => a.re - b.re);
  zeros.sort((a, b) => a - b);
  const pool: Root[] = complexPoles.concat(realPoles);

  const sos = new Float64Array(sections * 6);
  for (let si = sections - 1; si >= 0; si--) {
    const p1 = takeWorst(pool, () => true);
    const row = si * 6;
    sos[row + 3] = 1;
    // Real poles come in an even count (the odd-order real pole plus the origin pad), so a real
    // p1 always has a real partner: scipy's "last real pole" special case cannot arise here.
    const p1Real = p1.im === 0;
    const p2: Root = p1Real ? takeWorst(pool, (p) => p.im === 0) : { re: p1.re, im: -p1.im };
    // Numerator from the nearest zero and the next nearest (all real; counts are equal).
    const z1 = takeNearestZero(zeros, p1);
    const z2 = takeNearestZero(zeros, p1);
    sos[row] = 1;
    sos[row + 1] = -z1 - z2;
    sos[row + 2] = z1 * z2;
    if (p1Real) {
      sos[row + 4] = -p1.re - p2.re;
      sos[row + 5] = p1.re * p2.re;
    } else {
      sos[row + 4] = -2 * p1.re;
      sos[row + 5] = p1.re * p1.re + p1.im * p1.im;
    }
  }
  return sos;
}

/** Removes and returns the pole of `pool` (among those passing `accept`) nearest the unit circle. */
function takeWorst(pool: Root[], accept: (p: Root) => boolean): Root {
  let best = -1;
  let bestDistance = Infinity;
  for (let i = 0; i < pool.length; i++) {
    if (!accept(pool[i])) continue;
    const distance = Math.abs(1 - Math.hypot(pool[i].re, pool[i].im));
    if (distance < bestDistance) {
      bestDistance = distance;
      best = i;
    }
  }
  return pool.splice(best, 1)[0];
}

/** Removes and returns the real zero nearest to `p` (first one on ties, as a sorted argsort would). */
function takeNearestZero(zeros: number[], p: Root): number {
  let best = 0;
  let bestDistance = Infinity;
  for (let i = 0; i < zeros.length; i++) {
    const distance = Math.hypot(zeros[i] - p.re, p.im);
    if (distance < bestDistance) {
      bestDistance = distance;
      best = i;
    }
  }
  return zeros.splice(best, 1)[0];
}

/**
 * Complex frequency response H(e^{jω}), ω = 2π·f/fs, of a cascade of second-order sections
 * (row-major n×6, any a0) at each frequency of `freqs` (Hz); same evaluation as scipy's `sosfreqz`.
 */
export function sosFrequencyResponse(sos: Float64Array, freqs: ArrayLike<number>, sampleRate: number): ComplexSeries {
  const out = makeComplexSeries(freqs.length);
  const sections = Math.floor(sos.length / 6);
  for (let i = 0; i < freqs.length; i++) {
    const w = (2 * Math.PI * freqs[i]) / sampleRate;
    const zr = Math.cos(w); // z^-1 = e^{-jω}
    const zi = -Math.sin(w);
    let hr = 1;
    let hi = 0;
    for (let s = 0; s < sections; s++) {
      const r = s * 6;
      // Horner: b0 + z⁻¹·(b1 + z⁻¹·b2)
      let nr = sos[r + 1] + zr * sos[r + 2];
      let ni = zi * sos[r + 2];
      let tr = sos[r] + (zr * nr - zi * ni);
      let ti = zr * ni + zi * nr;
      nr = tr;
      ni = ti;
      let dr = sos[r + 4] + zr * sos[r + 5];
      let di = zi * sos[r + 5];
      tr = sos[r + 3] + (zr * dr - zi * di);
      ti = zr * di + zi * dr;
      dr = tr;
      di = ti;
      const dd = dr * dr + di * di;
      const qr = (nr * dr + ni * di) / dd;
      const qi = (ni * dr - nr * di) / dd;
      const pr = hr * qr - hi * qi;
      hi = hr * qi + hi * qr;
      hr = pr;
    }
    out.re[i] = hr;
    out.im[i] = hi;
  }
  return out;
}
