/**
 * The normal sampler (ziggurat over xoshiro128**, random/stream.ts) against the standard normal
 * distribution: Kolmogorov–Smirnov against the exact CDF, the tail probabilities P(|x| > 3) and
 * P(|x| > 4) within 99.9 % Wilson intervals of their counts, and the first four moments. Both
 * paths are checked: the fast batch `addNormals` and the one-at-a-time `nextNormal`.
 */
import { describe, expect, it } from 'vitest';
import { makeStream } from '../../src/random/streams.ts';
import { normalCdf } from '../../src/analysis/special.ts';
import { kolmogorovTail } from '../support/ks.ts';
import { wilsonInterval } from '../../src/analysis/intervals.ts';

const N = 2 ** 22;

function batch(seed: number): Float64Array {
  const out = new Float64Array(N);
  makeStream(seed, 0, 'score', 0).fillNormals(out, 0, N);
  return out;
}

function oneByOne(seed: number): Float64Array {
  const s = makeStream(seed, 0, 'aux', 3);
  const out = new Float64Array(N);
  for (let i = 0; i < N; i++) out[i] = s.nextNormal();
  return out;
}

const samples: [string, Float64Array][] = [['addNormals', batch(5)], ['nextNormal', oneByOne(6)]];

describe.each(samples)('%s: 2^22 standard normals', (_name, x) => {
  it('Kolmogorov–Smirnov against the normal CDF (first 2^20 values): p > 0.001', () => {
    const n = 2 ** 20;
    const sorted = Float64Array.from(x.subarray(0, n)).sort();
    let d = 0;
    for (let i = 0; i < n; i++) {
      const f = normalCdf(sorted[i]!, 0, 1);
      d = Math.max(d, (i + 1) / n - f, f - i / n);
    }
    // one-sample KS: λ = (√n + 0.12 + 0.11/√n)·D (Stephens, J. R. Stat. Soc. B 32, 115 (1970))
    const lambda = (Math.sqrt(n) + 0.12 + 0.11 / Math.sqrt(n)) * d;
    const p = kolmogorovTail(lambda);
    expect(p, `D = ${d}, λ = ${lambda}`).toBeGreaterThan(1e-3);
  });

  it.each([
    // two-sided tails, 2·Q(x): Abramowitz & Stegun (1964) Table 26.1 / NIST DLMF §7:
    // Q(3) = 1.349898e-3, Q(4) = 3.167124e-5
    [3, 2 * 1.349898e-3],
    [4, 2 * 3.167124e-5],
  ])('P(|x| > %i) = %f lies in the 99.9 % Wilson interval of the count', (t, expected) => {
    let k = 0;
    for (let i = 0; i < N; i++) if (Math.abs(x[i]!) > t) k++;
    const ci = wilsonInterval(k, N, 0.999);
    expect(expected, `${k} of ${N} beyond ${t}: [${ci.low}, ${ci.high}]`).toBeGreaterThanOrEqual(ci.low);
    expect(expected, `${k} of ${N} beyond ${t}: [${ci.low}, ${ci.high}]`).toBeLessThanOrEqual(ci.high);
  });

  it('moments: mean 0, variance 1, skewness 0, excess kurtosis 0 within 5 standard errors', () => {
    let m1 = 0;
    for (let i = 0; i < N; i++) m1 += x[i]!;
    m1 /= N;
    let m2 = 0, m3 = 0, m4 = 0;
    for (let i = 0; i < N; i++) {
      const d = x[i]! - m1;
      const d2 = d * d;
      m2 += d2; m3 += d2 * d; m4 += d2 * d2;
    }
    m2 /= N; m3 /= N; m4 /= N;
    const skew = m3 / m2 ** 1.5;
    const excess = m4 / (m2 * m2) - 3;
    // standard errors for normal data: √(1/n), √(2/n), √(6/n), √(24/n) (common practice, no source)
    expect(Math.abs(m1), `mean ${m1}`).toBeLessThan(5 * Math.sqrt(1 / N));
    expect(Math.abs(m2 - 1), `variance ${m2}`).toBeLessThan(5 * Math.sqrt(2 / N));
    expect(Math.abs(skew), `skewness ${skew}`).toBeLessThan(5 * Math.sqrt(6 / N));
    expect(Math.abs(excess), `excess kurtosis ${excess}`).toBeLessThan(5 * Math.sqrt(24 / N));
  });
});
