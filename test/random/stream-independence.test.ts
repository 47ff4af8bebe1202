/**
 * Independence of the per-block streams (random/streams.ts): neighbouring blocks, the other
 * purposes and the next sweep point must look uncorrelated. With n independent pairs the sample
 * correlation ρ̂ is about N(0, 1/n), so |ρ̂| < 5/√n fails by chance with probability ≈ 6e-7 per
 * pair (common practice, no source); the seeds are fixed, so the test is deterministic.
 */
import { describe, expect, it } from 'vitest';
import { makeStream, type StreamPurpose } from '../../src/random/streams.ts';

const N = 2 ** 16;
type StreamKey = [seed: number, point: number, purpose: StreamPurpose, block: number];
const BOUND = 5 / Math.sqrt(N);

function normals(seed: number, point: number, purpose: StreamPurpose, block: number): Float64Array {
  const out = new Float64Array(N);
  makeStream(seed, point, purpose, block).fillNormals(out, 0, N);
  return out;
}

function uniforms(seed: number, point: number, purpose: StreamPurpose, block: number): Float64Array {
  const s = makeStream(seed, point, purpose, block);
  const out = new Float64Array(N);
  for (let i = 0; i < N; i++) out[i] = s.nextDouble();
  return out;
}

/** Sample correlation of x[i] and y[i + lag]. */
function correlation(x: Float64Array, y: Float64Array, lag = 0): number {
  const n = Math.min(x.length, y.length - lag);
  let mx = 0, my = 0;
  for (let i = 0; i < n; i++) { mx += x[i]!; my += y[i + lag]!; }
  mx /= n; my /= n;
  let sxy = 0, sxx = 0, syy = 0;
  for (let i = 0; i < n; i++) {
    const a = x[i]! - mx, b = y[i + lag]! - my;
    sxy += a * b; sxx += a * a; syy += b * b;
  }
  return sxy / Math.sqrt(sxx * syy);
}

describe('streams of neighbouring seeding blocks', () => {
  const streams = Array.from({ length: 16 }, (_, b) => normals(1, 0, 'score', b));

  it(`16 streams × 2^16 normals: every pair |ρ| < 5/√n = ${BOUND.toFixed(4)}`, () => {
    const bad: string[] = [];
    for (let a = 0; a < 16; a++) {
      for (let b = a + 1; b < 16; b++) {
        const r = correlation(streams[a]!, streams[b]!);
        if (!(Math.abs(r) < BOUND)) bad.push(`blocks ${a},${b}: ρ = ${r.toFixed(5)}`);
      }
    }
    expect(bad, `bound ${BOUND}`).toEqual([]);
  });

  it('each stream with itself at lags 1 … 16: |ρ| < 5/√n', () => {
    const bad: string[] = [];
    streams.forEach((x, b) => {
      for (let lag = 1; lag <= 16; lag++) {
        const r = correlation(x, x, lag);
        if (!(Math.abs(r) < BOUND)) bad.push(`block ${b} lag ${lag}: ρ = ${r.toFixed(5)}`);
      }
    });
    expect(bad, `bound ${BOUND}`).toEqual([]);
  });

  it('neighbouring streams at lags −4 … 4 (a shifted copy would show here)', () => {
    const bad: string[] = [];
    for (let b = 0; b + 1 < 16; b++) {
      for (let lag = 0; lag <= 4; lag++) {
        for (const [x, y] of [[streams[b]!, streams[b + 1]!], [streams[b + 1]!, streams[b]!]]) {
          const r = correlation(x, y, lag);
          if (!(Math.abs(r) < BOUND)) bad.push(`blocks ${b},${b + 1} lag ${lag}: ρ = ${r.toFixed(5)}`);
        }
      }
    }
    expect(bad).toEqual([]);
  });
});

describe('streams of other purposes, points and seeds', () => {
  it.each([
    ['score vs calibrate', [1, 0, 'score', 0], [1, 0, 'calibrate', 0]],
    ['score vs slow-noise', [1, 0, 'score', 0], [1, 0, 'slow-noise', 0]],
    ['score vs aux', [1, 0, 'score', 0], [1, 0, 'aux', 0]],
    ['point 0 vs point 1', [1, 0, 'score', 0], [1, 1, 'score', 0]],
    ['seed 1 vs seed 2', [1, 0, 'score', 0], [2, 0, 'score', 0]],
    ['last block of a point vs the next point', [1, 0, 'score', 2 ** 24 - 1], [1, 1, 'score', 0]],
  ] as [string, StreamKey, StreamKey][])('%s: uniforms and normals uncorrelated', (_name, a, b) => {
    const ru = correlation(uniforms(...a), uniforms(...b));
    const rn = correlation(normals(...a), normals(...b));
    expect(Math.abs(ru), `uniform ρ = ${ru}`).toBeLessThan(BOUND);
    expect(Math.abs(rn), `normal ρ = ${rn}`).toBeLessThan(BOUND);
  });
});
