import { describe, expect, it } from 'vitest';
import { FLICKER_MAX_BLOCK, flickerVariance } from '../../src/signal/flicker.ts';
import { makeFlickerSource, planFlickerBlocks, type FlickerSpec } from '../support/flicker-source.ts';
import { welchDensity } from '../../src/analysis/welch.ts';
import type { NoiseStream } from '../../src/signal/stream.ts';
import { seededStream } from './seeded-stream.ts';

/** Wraps a stream and counts the normals drawn (to check that skipping is cheap). */
function countingStream(inner: NoiseStream): NoiseStream & { normals: number } {
  const s = {
    normals: 0,
    nextUint32: () => inner.nextUint32(),
    nextDouble: () => inner.nextDouble(),
    nextNormal: () => {
      s.normals++;
      return inner.nextNormal();
    },
  };
  return s;
}

function meanSquareIncrement(x: Float64Array, at: (t: number) => boolean): number {
  let sum = 0;
  let count = 0;
  for (let t = 1; t < x.length; t++) {
    if (!at(t)) continue;
    sum += (x[t]! - x[t - 1]!) ** 2;
    count++;
  }
  return sum / count;
}

describe('flickerVariance: ∫ A f^−α df', () => {
  // Closed forms of the integral (calculus, exact).
  it.each([
    { alpha: 1, a: 2, b: 250, expected: 3 * Math.log(125) },
    { alpha: 2, a: 2, b: 250, expected: 3 * (1 / 2 - 1 / 250) },
    { alpha: 0.5, a: 2, b: 250, expected: 3 * 2 * (Math.sqrt(250) - Math.sqrt(2)) },
    { alpha: 1 + 1e-14, a: 2, b: 250, expected: 3 * Math.log(125) },
    { alpha: 1.5, a: 5, b: 5, expected: 0 },
  ])('α = $alpha on [$a, $b]', ({ alpha, a, b, expected }) => {
    const got = flickerVariance(3, alpha, a, b);
    expect(Math.abs(got - expected), `got ${got}, expected ${expected}`).toBeLessThanOrEqual(1e-12 * Math.abs(expected));
  });
});

describe('planFlickerBlocks', () => {
  it('chooses N ≥ 4·fs/fLo as a power of two', () => {
    const plan = planFlickerBlocks({ amplitude: 1, exponent: 1, fLo: 2, fHi: 250, sampleRate: 1000 });
    expect(plan.blockLength).toBe(2048); // 4·1000/2 = 2000 → 2048
    expect(plan.warnings).toEqual([]);
  });

  it('raises fLo below 4·fs/FLICKER_MAX_BLOCK and says so', () => {
    const fs = 100e6;
    const plan = planFlickerBlocks({ amplitude: 1, exponent: 1, fLo: 1, fHi: 1e6, sampleRate: fs });
    expect(plan.blockLength).toBe(FLICKER_MAX_BLOCK);
    expect(plan.fLo).toBeCloseTo((4 * fs) / FLICKER_MAX_BLOCK, 9);
    expect(plan.warnings.join(' ')).toMatch(/raised/);
  });

  it('clips fHi to fs/2 and keeps a longer requested block, warns on a short one', () => {
    const a = planFlickerBlocks({ amplitude: 1, exponent: 1, fLo: 10, fHi: 900, sampleRate: 1000, blockLength: 1000 });
    expect(a.fHi).toBe(500);
    expect(a.blockLength).toBe(1024);
    expect(a.warnings.length).toBe(2); // clipped fHi, rounded block length
    const b = planFlickerBlocks({ amplitude: 1, exponent: 1, fLo: 10, fHi: 400, sampleRate: 1000, blockLength: 64 });
    expect(b.blockLength).toBe(512);
    expect(b.warnings.join(' ')).toMatch(/shorter/);
  });

  it('rejects invalid parameters', () => {
    expect(() => planFlickerBlocks({ amplitude: 1, exponent: 1, fLo: 0, fHi: 10, sampleRate: 100 })).toThrow(RangeError);
    expect(() => planFlickerBlocks({ amplitude: 1, exponent: 1, fLo: 20, fHi: 10, sampleRate: 100 })).toThrow(RangeError);
    // raised fLo (4·fs/2^20 ≈ 3815 Hz) above fHi
    expect(() => planFlickerBlocks({ amplitude: 1, exponent: 1, fLo: 1, fHi: 500, sampleRate: 1e9 })).toThrow(RangeError);
  });
});

describe('flicker noise spectrum and variance (Timmer & König, Astron. Astrophys. 300, 707 (1995))', () => {
  // fs = 1 kHz, band [2, 250] Hz → blocks of 2048 with hop 1024; the record of 2^18 samples spans
  // 256 hops, so the PSD is measured across ~256 block joins.
  const fs = 1000;
  const amplitude = 1e-4;
  const n = 2 ** 18;

  it.each([0.8, 1, 1.5])('α = %f: Welch slope −α ± 0.1, level A within 10 %, variance ∫S df', (alpha) => {
    const spec: FlickerSpec = { amplitude, exponent: alpha, fLo: 2, fHi: 250, sampleRate: fs };
    const source = makeFlickerSource(spec, seededStream(`flicker-psd-${alpha}`));
    expect(source.blockLength).toBe(2048);
    const x = source.fill(new Float64Array(n), 0, n);

    // Welch (IEEE Trans. Audio Electroacoust. 15, 70 (1967)), 1024-point segments, Δf ≈ 0.98 Hz.
    const est = welchDensity(x, fs, { segmentLength: 1024 });
    // Interior of the band, [4 fLo, fHi/2], away from the edges smoothed by the window and the cross-fade.
    let sx = 0, sy = 0, sxx = 0, sxy = 0, m = 0, ratio = 0;
    for (let k = 0; k < est.density.length; k++) {
      const f = est.frequencies[k]!;
      if (f < 8 || f > 125) continue;
      const lx = Math.log(f);
      const ly = Math.log(est.density[k]!);
      sx += lx; sy += ly; sxx += lx * lx; sxy += lx * ly; m++;
      ratio += est.density[k]! / (amplitude * f ** -alpha);
    }
    const slope = (m * sxy - sx * sy) / (m * sxx - sx * sx);
    const level = ratio / m;
    expect(Math.abs(slope + alpha), `α=${alpha}: slope ${slope}, expected ${-alpha} ± 0.1`).toBeLessThan(0.1);
    expect(Math.abs(level - 1), `α=${alpha}: level S·f^α/A ${level}, expected 1 ± 0.1`).toBeLessThan(0.1);

    // Variance over the long run against ∫S df. For a Gaussian process observed for T seconds the
    // sample variance has Var ≈ (1/T)·∫S² df (Bartlett, J. R. Stat. Soc. Suppl. 8, 27 (1946) — from
    // memory); tolerance 5 SD of that (≈ 5–9 % here).
    const expected = flickerVariance(amplitude, alpha, 2, 250);
    expect(source.variance).toBeCloseTo(expected, 15);
    let mean = 0;
    for (let i = 0; i < n; i++) mean += x[i]!;
    mean /= n;
    let v = 0;
    for (let i = 0; i < n; i++) v += (x[i]! - mean) ** 2;
    v /= n - 1;
    const sd = Math.sqrt(flickerVariance(amplitude * amplitude, 2 * alpha, 2, 250) / (n / fs));
    expect(Math.abs(v - expected), `α=${alpha}: variance ${v}, ∫S df ${expected}, tol ${5 * sd}`).toBeLessThan(5 * sd);
  });
});

describe('flicker timeline: joins, chunking, skipping', () => {
  const spec: FlickerSpec = { amplitude: 1, exponent: 1, fLo: 2, fHi: 250, sampleRate: 1000 };

  it('has no steps at block joins (a plain concatenation of independent blocks fails the same check)', () => {
    const source = makeFlickerSource(spec, seededStream('flicker-joins'));
    const hop = source.blockLength / 2;
    const n = 400 * hop;
    const x = source.fill(new Float64Array(n), 0, n);
    const all = meanSquareIncrement(x, () => true);
    const atJoins = meanSquareIncrement(x, (t) => t % hop === 0);
    // 399 joins: the mean square of Gaussian increments has relative SD √(2/399) ≈ 7 %; bounds ±40 %.
    expect(atJoins / all, `joins ${atJoins} vs overall ${all}`).toBeGreaterThan(0.6);
    expect(atJoins / all, `joins ${atJoins} vs overall ${all}`).toBeLessThan(1.4);

    // Control: pieces of one hop, each after a jump of several blocks (so independent), butted together.
    const naiveSource = makeFlickerSource(spec, seededStream('flicker-naive'));
    const naive = new Float64Array(n);
    for (let p = 0; p < 400; p++) {
      naiveSource.fill(naive, p * hop, hop);
      naiveSource.skip(4 * source.blockLength);
    }
    const naiveJoins = meanSquareIncrement(naive, (t) => t % hop === 0);
    expect(naiveJoins / meanSquareIncrement(naive, (t) => t % hop !== 0)).toBeGreaterThan(3);
  });

  it('stays continuous across joins reached after long skips (even and odd hops)', () => {
    const reference = makeFlickerSource(spec, seededStream('flicker-skip-ref'));
    const hop = reference.blockLength / 2;
    const long = reference.fill(new Float64Array(200 * hop), 0, 200 * hop);
    const all = meanSquareIncrement(long, () => true);

    const source = makeFlickerSource(spec, seededStream('flicker-skip'));
    const piece = new Float64Array(8);
    let sum = 0;
    const records = 400;
    for (let j = 1; j <= records; j++) {
      const join = 9 * j * hop; // 9 is odd: joins alternate between even and odd hops
      source.skip(join - 4 - source.position);
      source.fill(piece, 0, 8);
      sum += (piece[4]! - piece[3]!) ** 2;
    }
    const ratio = sum / records / all;
    // 400 independent joins: relative SD √(2/400) ≈ 7 %; bounds ±35 %.
    expect(ratio, `mean square increment across joins after skips / overall = ${ratio}`).toBeGreaterThan(0.65);
    expect(ratio).toBeLessThan(1.35);
  });

  it('chunked fills equal one big fill (same seed), also into an offset', () => {
    const small: FlickerSpec = { amplitude: 2, exponent: 1.2, fLo: 20, fHi: 400, sampleRate: 1000 };
    const n = 5000;
    const one = makeFlickerSource(small, seededStream('flicker-chunks')).fill(new Float64Array(n), 0, n);
    const chunked = new Float64Array(n + 7);
    const source = makeFlickerSource(small, seededStream('flicker-chunks'));
    const sizes = [1, 2, 127, 128, 129, 3, 600, 1, 1000, 257];
    let at = 0;
    for (let i = 0; at < n; i++) {
      const c = Math.min(sizes[i % sizes.length]!, n - at);
      source.fill(chunked, 7 + at, c);
      at += c;
    }
    expect(source.position).toBe(n);
    for (let i = 0; i < n; i++) if (chunked[7 + i] !== one[i]) expect(chunked[7 + i], `sample ${i}`).toBe(one[i]);
  });

  it('add() adds the same samples fill() writes', () => {
    const a = makeFlickerSource(spec, seededStream('flicker-add')).fill(new Float64Array(3000), 0, 3000);
    const base = Float64Array.from({ length: 3000 }, (_, i) => i * 0.5);
    const b = makeFlickerSource(spec, seededStream('flicker-add')).add(Float64Array.from(base), 0, 3000);
    for (let i = 0; i < 3000; i++) expect(b[i]).toBe(base[i]! + a[i]!);
  });

  it('a skip inside the blocks already needed gives the fill-through values', () => {
    const n = 6000;
    const through = makeFlickerSource(spec, seededStream('flicker-short-skip')).fill(new Float64Array(n), 0, n);
    const source = makeFlickerSource(spec, seededStream('flicker-short-skip'));
    const out = new Float64Array(n);
    source.fill(out, 0, 1500);
    source.skip(700); // shorter than a hop: every block is still touched
    source.fill(out, 2200, n - 2200);
    for (let i = 0; i < n; i++) if (i < 1500 || i >= 2200) expect(out[i], `sample ${i}`).toBe(through[i]);
  });

  it('values depend only on the samples requested, not on how fills and skips are split', () => {
    const runA = makeFlickerSource(spec, seededStream('flicker-pattern'));
    const a = new Float64Array(400);
    runA.fill(a, 0, 100);
    runA.skip(100000);
    runA.fill(a, 100, 300);
    const runB = makeFlickerSource(spec, seededStream('flicker-pattern'));
    const b = new Float64Array(400);
    runB.fill(b, 0, 40);
    runB.fill(b, 40, 60);
    runB.skip(30000);
    runB.skip(70000);
    runB.fill(b, 100, 1);
    runB.fill(b, 101, 299);
    expect(Array.from(b)).toEqual(Array.from(a));
    expect(runB.position).toBe(100400);
  });

  it('skipping whole blocks draws nothing for them', () => {
    const stream = countingStream(seededStream('flicker-count'));
    const source = makeFlickerSource(spec, stream);
    source.fill(new Float64Array(10), 0, 10);
    const perPair = stream.normals; // one FFT (two blocks) covers the first hop
    expect(perPair).toBeGreaterThan(0);
    source.skip(1000 * source.blockLength);
    source.fill(new Float64Array(10), 0, 10);
    // At most two more pairs (the landing hop may straddle two FFTs), not ~1000.
    expect(stream.normals).toBeLessThanOrEqual(3 * perPair);
  });
});
