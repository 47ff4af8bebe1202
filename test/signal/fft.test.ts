import { describe, expect, it } from 'vitest';
import { makeFft, isPowerOfTwo, nextPowerOfTwo } from '../../src/signal/fft.ts';
import { seededStream } from './seeded-stream.ts';

/** Direct DFT X_k = Σ x_n e^(−2πi kn/N), the definition the FFT must reproduce (Cooley & Tukey, Math. Comput. 19, 297 (1965)). */
function directDft(re: Float64Array, im: Float64Array): { re: Float64Array; im: Float64Array } {
  const n = re.length;
  const outRe = new Float64Array(n);
  const outIm = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    let sr = 0;
    let si = 0;
    for (let j = 0; j < n; j++) {
      const a = (-2 * Math.PI * ((k * j) % n)) / n;
      const c = Math.cos(a);
      const s = Math.sin(a);
      sr += re[j]! * c - im[j]! * s;
      si += re[j]! * s + im[j]! * c;
    }
    outRe[k] = sr;
    outIm[k] = si;
  }
  return { re: outRe, im: outIm };
}

function randomVector(n: number, seed: string): Float64Array {
  const s = seededStream(seed);
  const v = new Float64Array(n);
  for (let i = 0; i < n; i++) v[i] = s.nextNormal();
  return v;
}

// Tolerance: round-off of an N-point FFT grows like log2(N)·ε·‖x‖; 1e-12·‖x‖₁ is generous and still
// far below any indexing or sign mistake (which gives errors of order ‖x‖).
describe('fft wrapper against the direct DFT (Cooley & Tukey 1965)', () => {
  it.each([4, 8, 64, 256])('real forward, N = %i, random input', (n) => {
    const x = randomVector(n, `real-${n}`);
    const fft = makeFft(n);
    const out = new Float64Array(n + 2);
    fft.realForward(x, out);
    const ref = directDft(x, new Float64Array(n));
    const scale = x.reduce((a, b) => a + Math.abs(b), 0);
    for (let k = 0; k <= n / 2; k++) {
      const err = Math.max(Math.abs(out[2 * k]! - ref.re[k]!), Math.abs(out[2 * k + 1]! - ref.im[k]!));
      expect(err, `N=${n} bin ${k}: got (${out[2 * k]}, ${out[2 * k + 1]}) want (${ref.re[k]}, ${ref.im[k]}) tol ${1e-12 * scale}`).toBeLessThan(1e-12 * scale);
    }
  });

  it('real forward reads from an offset', () => {
    const x = randomVector(40, 'offset');
    const fft = makeFft(32);
    const a = new Float64Array(34);
    const b = new Float64Array(34);
    fft.realForward(x, a, 5);
    fft.realForward(x.subarray(5, 37), b);
    expect(Array.from(a)).toEqual(Array.from(b));
  });

  it.each([4, 16, 128])('complex forward and inverse, N = %i, random input', (n) => {
    const re = randomVector(n, `cre-${n}`);
    const im = randomVector(n, `cim-${n}`);
    const input = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) {
      input[2 * i] = re[i]!;
      input[2 * i + 1] = im[i]!;
    }
    const fft = makeFft(n);
    const spec = fft.complexForward(input, new Float64Array(2 * n));
    const ref = directDft(re, im);
    const scale = re.reduce((a, b) => a + Math.abs(b), 0) + im.reduce((a, b) => a + Math.abs(b), 0);
    let err = 0;
    for (let k = 0; k < n; k++) err = Math.max(err, Math.abs(spec[2 * k]! - ref.re[k]!), Math.abs(spec[2 * k + 1]! - ref.im[k]!));
    expect(err, `N=${n}: max deviation ${err}, tol ${1e-12 * scale}`).toBeLessThan(1e-12 * scale);
    const back = fft.complexInverse(spec, new Float64Array(2 * n));
    let backErr = 0;
    for (let i = 0; i < 2 * n; i++) backErr = Math.max(backErr, Math.abs(back[i]! - input[i]!));
    expect(backErr, `N=${n}: inverse round trip ${backErr}`).toBeLessThan(1e-13 * scale);
  });

  it.each([64, 1024])('Parseval: Σ|X_k|² = N Σ x_n², N = %i', (n) => {
    const x = randomVector(n, `parseval-${n}`);
    const fft = makeFft(n);
    const out = fft.realForward(x, new Float64Array(n + 2));
    let spectral = 0;
    for (let k = 0; k <= n / 2; k++) {
      const p = out[2 * k]! ** 2 + out[2 * k + 1]! ** 2;
      spectral += k === 0 || k === n / 2 ? p : 2 * p; // bins above N/2 are the conjugates
    }
    const temporal = n * x.reduce((a, b) => a + b * b, 0);
    expect(Math.abs(spectral / temporal - 1), `N=${n}: ${spectral} vs ${temporal}`).toBeLessThan(1e-12);
  });

  it('rejects sizes that are not powers of two >= 4', () => {
    expect(() => makeFft(12)).toThrow(RangeError);
    expect(() => makeFft(2)).toThrow(RangeError);
    expect(isPowerOfTwo(1024)).toBe(true);
    expect(isPowerOfTwo(1000)).toBe(false);
    expect(nextPowerOfTwo(1000)).toBe(1024);
    expect(nextPowerOfTwo(1024)).toBe(1024);
  });
});
