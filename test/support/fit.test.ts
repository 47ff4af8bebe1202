import { describe, expect, it } from 'vitest';
import { fitExponentialDecay, fitLine } from './fit.ts';
import { loadFixture, mismatch, relativeError } from '../analysis/load-fixture.ts';

interface FitFixture {
  lines: { x: number[]; y: number[]; slope: number; intercept: number; r2: number }[];
  decays: { t: number[]; w: number[]; decayTime: number; amplitude: number; used: number }[];
}
const fixture = loadFixture<FitFixture>('fit');
const lines = fixture.lines.map((l, index) => ({ ...l, index }));
const decays = fixture.decays.map((d, index) => ({ ...d, index }));

describe('fitLine', () => {
  // reference library: numpy.polyfit(x, y, 1) and scipy.stats.linregress(x, y).rvalue²,
  // test/fixtures/make-fit.py
  it.each(lines)('line $index: slope $slope, intercept $intercept, r² $r2', ({ index, x, y, slope, intercept, r2 }) => {
    const fit = fitLine(Float64Array.from(x), Float64Array.from(y));
    const tol = 1e-10; // polyfit solves by SVD, we use centred sums: both well conditioned here
    expect(fit.n).toBe(x.length);
    expect(relativeError(fit.slope, slope), mismatch(`line ${index} slope`, fit.slope, slope, tol)).toBeLessThan(tol);
    const tolIntercept = tol * (Math.abs(intercept) + Math.abs(slope)); // intercept can be ~0
    expect(Math.abs(fit.intercept - intercept), mismatch(`line ${index} intercept`, fit.intercept, intercept, tolIntercept)).toBeLessThan(tolIntercept);
    expect(relativeError(fit.r2, r2), mismatch(`line ${index} r2`, fit.r2, r2, tol)).toBeLessThan(tol);
  });

  it('recovers an exact line and a log–log power law exactly', () => {
    // exact by hand: y = 3x − 2; y = 5·x^−1.5 is a line of slope −1.5 in log–log
    const x = Float64Array.from([0, 1, 2, 4, 8]);
    const fit = fitLine(x, x.map((v) => 3 * v - 2));
    expect(Math.abs(fit.slope - 3)).toBeLessThan(8 * Number.EPSILON * 3);
    expect(Math.abs(fit.intercept + 2)).toBeLessThan(32 * Number.EPSILON * 3);
    expect(fit.r2).toBeCloseTo(1, 14);
    const f = Float64Array.from([1, 10, 100, 1000]);
    const logLog = fitLine(f.map(Math.log10), f.map((v) => Math.log10(5 * v ** -1.5)));
    expect(Math.abs(logLog.slope + 1.5)).toBeLessThan(1e-14);
  });

  it('gives NaN for fewer than two points or equal x, and r² = 1 for a flat exact fit', () => {
    expect(fitLine([1], [2]).slope).toBeNaN();
    expect(fitLine([2, 2, 2], [1, 2, 3]).slope).toBeNaN();
    const flat = fitLine([1, 2, 3], [4, 4, 4]);
    expect(flat.slope).toBe(0);
    expect(flat.intercept).toBe(4);
    expect(flat.r2).toBe(1);
  });
});

describe('fitExponentialDecay', () => {
  // reference library: numpy.polyfit(t[w > 0], log(w[w > 0]), 1), test/fixtures/make-fit.py
  it.each(decays)('decay $index: τ = $decayTime from $used positive points', ({ index, t, w, decayTime, amplitude, used }) => {
    const fit = fitExponentialDecay(Float64Array.from(t), Float64Array.from(w));
    const tol = 1e-10;
    expect(fit.n).toBe(used);
    expect(relativeError(fit.decayTime, decayTime), mismatch(`decay ${index} τ`, fit.decayTime, decayTime, tol)).toBeLessThan(tol);
    expect(relativeError(fit.amplitude, amplitude), mismatch(`decay ${index} A`, fit.amplitude, amplitude, tol)).toBeLessThan(tol);
  });

  it('recovers a noiseless decay, skips non-positive values, and gives ∞ for a flat record', () => {
    // exact by hand: w = 2·e^{−t/3e−6}; zeros and negatives are skipped
    const t = Float64Array.from([0, 1e-6, 2e-6, 3e-6, 4e-6, 5e-6]);
    const w = t.map((v) => 2 * Math.exp(-v / 3e-6));
    w[2] = 0;
    w[4] = -0.1;
    const fit = fitExponentialDecay(t, w);
    expect(fit.n).toBe(4);
    expect(relativeError(fit.decayTime, 3e-6)).toBeLessThan(1e-12);
    expect(relativeError(fit.amplitude, 2)).toBeLessThan(1e-12);
    expect(fitExponentialDecay([0, 1, 2], [5, 5, 5]).decayTime).toBe(Infinity);
    expect(fitExponentialDecay([0, 1], [1, Math.E]).decayTime).toBeCloseTo(-1, 14); // growth: negative
  });
});
