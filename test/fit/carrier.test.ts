/**
 * Finding the carrier of real records (src/fit/carrier.ts) on synthetic records of known tone:
 * the frequency within its standard error, the standard error the Cramér–Rao bound of a real
 * tone (Kay, Fundamentals of Statistical Signal Processing I (1993), Example 3.14:
 * var(ω) = 24σ²/(A²N(N² − 1)) per record, Fisher information adding over records), the spread
 * over independent noise matching it, the shape from the third harmonic (a square wave's Fourier
 * series has 1/3 of the fundamental there), and no line in white noise (negative control).
 */
import { describe, expect, it } from 'vitest';
import { fitCarrier, strongestLine } from '../../src/fit/carrier.ts';
import { makeStream } from '../../src/random/streams.ts';
import { spread } from '../../src/fit/estimate.ts';

const fs = 1e6, samples = 400, rows = 100, frequency = 123_456.7, phase = 0.7, sigma = 2;
const amplitude = (r: number) => (r % 2 ? 3 : 1);

/** Records of a tone of amplitude 1 or 3 (alternating) at `frequency`, sine or square, plus white noise of σ per sample. */
function records(seed: number, shape: 'sine' | 'square' | 'none'): Float64Array {
  const stream = makeStream(seed, 0, 'aux', 0);
  const x = new Float64Array(rows * samples);
  stream.fillNormals(x, 0, x.length);
  for (let r = 0; r < rows; r++) {
    for (let k = 0; k < samples; k++) {
      const c = Math.cos((2 * Math.PI * frequency * k) / fs + phase);
      const tone = shape === 'none' ? 0 : shape === 'sine' ? c : Math.sign(c);
      x[r * samples + k] = sigma * x[r * samples + k]! + amplitude(r) * tone;
    }
  }
  return x;
}

/** Kay (1993), Example 3.14, with Fisher information added over the records. */
function cramerRao(): number {
  let a2 = 0;
  for (let r = 0; r < rows; r++) a2 += amplitude(r) ** 2;
  const omegaVariance = (24 * sigma * sigma) / (samples * (samples * samples - 1) * a2);
  return (Math.sqrt(omegaVariance) * fs) / (2 * Math.PI);
}

describe('the carrier of real records', () => {
  it('finds a sine tone: its frequency within four standard errors, the error the Cramér–Rao bound', () => {
    const fit = fitCarrier(records(1, 'sine'), rows, samples, fs, null)!;
    expect(fit).not.toBeNull();
    expect(fit.shape).toBe('sine');
    expect(Math.abs(fit.frequency - frequency), `found ${fit.frequency} ± ${fit.standardError}`).toBeLessThan(4 * fit.standardError);
    // σ and the amplitudes are estimated from the records: within 10 % of the bound with the true ones
    expect(Math.abs(fit.standardError / cramerRao() - 1)).toBeLessThan(0.1);
  });

  it('the frequencies found in independent noise spread as the bound says', () => {
    const found = Array.from({ length: 20 }, (_, i) => fitCarrier(records(100 + i, 'sine'), rows, samples, fs, null)!.frequency);
    // 20 draws: the sample standard deviation lies in [0.508, 1.556] of the true one at 99.9 %
    // (χ² with 19 degrees of freedom at 0.05 % and 99.95 %: 4.912 and 45.97, scipy.stats.chi2.ppf)
    const ratio = spread(found) / cramerRao();
    expect(ratio).toBeGreaterThan(0.508);
    expect(ratio).toBeLessThan(1.556);
  });

  it('tells a square carrier from a sine by its third harmonic', () => {
    expect(fitCarrier(records(2, 'square'), rows, samples, fs, null)!.shape).toBe('square');
    expect(fitCarrier(records(3, 'sine'), rows, samples, fs, frequency)!.shape).toBe('sine');
  });

  it('finds no line in white noise (negative control)', () => {
    expect(strongestLine(records(4, 'none'), rows, samples, fs)).toBeNull();
    expect(fitCarrier(records(4, 'none'), rows, samples, fs, null)).toBeNull();
  });
});
