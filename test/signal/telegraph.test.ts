import { describe, expect, it } from 'vitest';
import { stationaryOccupation } from '../../src/signal/telegraph.ts';
import { makeTelegraphSource, type TelegraphSpec } from '../support/telegraph-source.ts';
import { normalCdf } from '../../src/analysis/special.ts';
import { seededStream } from './seeded-stream.ts';

/** Pearson χ² statistic of counts against probabilities (Pearson, Phil. Mag. 50, 157 (1900)). */
function chiSquare(observed: number[], probabilities: number[], total: number): number {
  let x2 = 0;
  for (let i = 0; i < observed.length; i++) {
    const e = total * probabilities[i]!;
    x2 += (observed[i]! - e) ** 2 / e;
  }
  return x2;
}

/** One-sample Kolmogorov–Smirnov statistic of `x` against the exponential CDF with the given rate. */
function ksExponential(x: Float64Array, rate: number): number {
  const s = Float64Array.from(x).sort();
  const n = s.length;
  let d = 0;
  for (let i = 0; i < n; i++) {
    const f = 1 - Math.exp(-rate * s[i]!);
    d = Math.max(d, (i + 1) / n - f, f - i / n);
  }
  return d;
}

describe('telegraph noise: marginal distribution (white + one fluctuator)', () => {
  // Fluctuator: amplitude 4, occupation 3e3/(3e3 + 7e3) = 0.3, correlation time 1/(1e4 s⁻¹) = 100
  // samples at 1 MHz; white σ = 1. Samples taken every 2000 samples (skip 1999, correlation
  // e^(−20)) are independent draws from the mixture 0.7·N(0,1) + 0.3·N(4,1).
  const spec: TelegraphSpec = { amplitude: 4, rateUp: 3e3, rateDown: 7e3, sampleRate: 1e6 };
  const total = 20000;
  const edges: number[] = [];
  for (let e = -3; e <= 7 + 1e-9; e += 0.5) edges.push(e);
  const source = makeTelegraphSource(spec, seededStream('telegraph-histogram'));
  const white = seededStream('telegraph-white');
  const one = new Float64Array(1);
  const counts = new Array<number>(edges.length + 1).fill(0);
  for (let i = 0; i < total; i++) {
    one[0] = white.nextNormal();
    source.fill(one, 0, 1);
    source.skip(1999);
    let bin = 0;
    while (bin < edges.length && one[0]! >= edges[bin]!) bin++;
    counts[bin]!++;
  }
  /** Bin probabilities of the mixture with upper-state weight p (tails below −3 and above 7 included). */
  function mixture(p: number): number[] {
    const cdf = (x: number) => (1 - p) * normalCdf(x, 0, 1) + p * normalCdf(x, spec.amplitude, 1);
    const probs: number[] = [cdf(edges[0]!)];
    for (let b = 1; b < edges.length; b++) probs.push(cdf(edges[b]!) - cdf(edges[b - 1]!));
    probs.push(1 - cdf(edges[edges.length - 1]!));
    return probs;
  }
  // 22 bins (smallest expected count ≈ 8, in the upper tail), no fitted parameter: 21 dof.
  // scipy.stats.chi2.ppf(0.999, 21) = 46.797038041561315
  const critical = 46.797038041561315;

  it('side peak at the amplitude with the stationary weight: χ² below chi2.ppf(0.999, 21)', () => {
    const occupation = stationaryOccupation(spec.rateUp, spec.rateDown);
    expect(occupation).toBeCloseTo(0.3, 15);
    const x2 = chiSquare(counts, mixture(occupation), total);
    expect(x2, `χ² = ${x2} over 22 bins, critical ${critical}; counts ${counts.join(',')}`).toBeLessThan(critical);
  });

  it('control: a wrong weight (0.35) is rejected by the same test', () => {
    const x2 = chiSquare(counts, mixture(0.35), total);
    expect(x2).toBeGreaterThan(critical);
  });
});

describe('telegraph noise: dwell times are exponential', () => {
  // 1 MHz sampling, rateUp 1e3 s⁻¹ (mean lower dwell 1000 samples), rateDown 2.5e3 s⁻¹ (400 samples).
  // Dwells are measured from the sampled trace as numbers of samples: |D − T| < 1 sample, so the
  // sampled CDF differs from the continuous one by at most 2·rate/fs ≤ 5e−3 (≈ 13 % of the critical value).
  const spec: TelegraphSpec = { amplitude: 1, rateUp: 1e3, rateDown: 2.5e3, sampleRate: 1e6 };
  const wanted = 2500;
  const source = makeTelegraphSource(spec, seededStream('telegraph-dwell'));
  const lower: number[] = [];
  const upper: number[] = [];
  const chunk = new Float64Array(65536);
  let current = -1;
  let run = 0;
  let first = true; // the first dwell is cut by the start of the record: dropped
  while (lower.length < wanted || upper.length < wanted) {
    chunk.fill(0);
    source.fill(chunk, 0, chunk.length);
    for (let i = 0; i < chunk.length; i++) {
      const s = chunk[i]! > 0.5 ? 1 : 0;
      if (s === current) {
        run++;
        continue;
      }
      if (current >= 0 && !first) (current === 1 ? upper : lower).push(run / spec.sampleRate);
      if (current >= 0) first = false;
      current = s;
      run = 1;
    }
  }
  // n = 2500 per state. scipy.stats.kstwo.ppf(0.999, 2500) = 0.0389180380516872
  const critical = 0.0389180380516872;

  it.each([
    { label: 'lower state, rate rateUp', dwell: () => lower, rate: spec.rateUp },
    { label: 'upper state, rate rateDown', dwell: () => upper, rate: spec.rateDown },
  ])('$label: KS statistic below kstwo.ppf(0.999, 2500)', ({ dwell, rate }) => {
    const times = Float64Array.from(dwell().slice(0, wanted));
    const d = ksExponential(times, rate);
    expect(d, `KS D = ${d} against exponential rate ${rate}, critical ${critical}`).toBeLessThan(critical);
    // control: a rate 25 % off is rejected.
    expect(ksExponential(times, 1.25 * rate)).toBeGreaterThan(critical);
  });
});

describe('telegraph timeline: chunking, skipping, several fluctuators', () => {
  const several: TelegraphSpec[] = [
    { amplitude: 1, rateUp: 2e4, rateDown: 5e4, sampleRate: 1e6 },
    { amplitude: -0.3, rateUp: 1e5, rateDown: 1e5, sampleRate: 1e6 },
    { amplitude: 2.5, rateUp: 300, rateDown: 900, sampleRate: 1e6 },
  ];

  it('adds into out, and chunked fills equal one fill', () => {
    const n = 20000;
    const base = Float64Array.from({ length: n }, (_, i) => Math.sin(i));
    const one = makeTelegraphSource(several, seededStream('telegraph-chunks')).fill(Float64Array.from(base), 0, n);
    const source = makeTelegraphSource(several, seededStream('telegraph-chunks'));
    const out = Float64Array.from(base);
    const sizes = [1, 7, 1000, 3, 4096, 2, 999];
    let at = 0;
    for (let i = 0; at < n; i++) {
      const c = Math.min(sizes[i % sizes.length]!, n - at);
      source.fill(out, at, c);
      at += c;
    }
    expect(Array.from(out)).toEqual(Array.from(one));
    // The added part takes only sums of the amplitudes of the fluctuators in the upper state.
    const allowed = new Set<number>();
    for (let mask = 0; mask < 8; mask++) {
      let v = 0;
      for (let k = 0; k < 3; k++) if (mask & (1 << k)) v += several[k]!.amplitude;
      allowed.add(v);
    }
    for (let i = 0; i < n; i += 97) {
      const added = one[i]! - base[i]!;
      const nearest = Math.min(...[...allowed].map((v) => Math.abs(v - added)));
      expect(nearest, `sample ${i}: added ${added} is not a sum of amplitudes`).toBeLessThan(1e-12);
    }
  });

  it('skips give exactly the fill-through values', () => {
    const n = 50000;
    const through = makeTelegraphSource(several, seededStream('telegraph-skip')).fill(new Float64Array(n), 0, n);
    const source = makeTelegraphSource(several, seededStream('telegraph-skip'));
    const out = new Float64Array(n);
    source.fill(out, 0, 100);
    source.skip(30000);
    source.skip(1);
    source.fill(out, 30101, 50);
    source.skip(n - 30151 - 10);
    source.fill(out, n - 10, 10);
    expect(source.position).toBe(n);
    const observed = [...Array(100).keys(), ...Array.from({ length: 50 }, (_, i) => 30101 + i), ...Array.from({ length: 10 }, (_, i) => n - 10 + i)];
    for (const i of observed) expect(out[i], `sample ${i}`).toBe(through[i]);
  });

  it('mean level is Σ amplitude·occupation and matches a long run', () => {
    const source = makeTelegraphSource(several, seededStream('telegraph-mean'));
    const expected = 1 * (2 / 7) + -0.3 * 0.5 + 2.5 * 0.25; // occupations rateUp/(rateUp + rateDown)
    expect(source.mean).toBeCloseTo(expected, 14);
    const n = 2 ** 22;
    const x = source.fill(new Float64Array(n), 0, n);
    let sum = 0;
    for (let i = 0; i < n; i++) sum += x[i]!;
    // The slowest fluctuator (switching rate ≈ 1/(833 µs)) dominates the error: ≈ 5 000 independent
    // correlation times in 4.2 s gives SD ≈ 2.5·√(0.25·0.75)·√(2/5000) ≈ 0.022; tolerance 0.1 (≈ 4.5 SD).
    expect(Math.abs(sum / n - expected), `mean ${sum / n}, expected ${expected}`).toBeLessThan(0.1);
  });

  it('a fluctuator with both rates zero stays in the lower state', () => {
    const source = makeTelegraphSource({ amplitude: 1, rateUp: 0, rateDown: 0, sampleRate: 1 }, seededStream('z'));
    const x = source.fill(new Float64Array(100), 0, 100);
    expect(x.every((v) => v === 0)).toBe(true);
    expect(source.state(0)).toBe(0);
  });

  it('rejects negative rates and mixed sample rates', () => {
    expect(() => makeTelegraphSource({ amplitude: 1, rateUp: -1, rateDown: 1, sampleRate: 1 }, seededStream('r'))).toThrow(RangeError);
    expect(() => makeTelegraphSource([several[0]!, { ...several[1]!, sampleRate: 2e6 }], seededStream('r'))).toThrow(RangeError);
  });
});
