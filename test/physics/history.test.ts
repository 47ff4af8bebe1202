/**
 * The shared history sampler (plan/history.ts), written for speed, against the laws it samples:
 * - the first jump time of a state with exit rate r, given a jump inside the record T, has the
 *   truncated exponential law F(t) = (1 − e^(−rt))/(1 − e^(−rT)) (Norris, "Markov Chains",
 *   Cambridge 1997, §2.6) — one-sample KS with Stephens' correction (Stephens, J. R. Stat. Soc. B
 *   32, 115 (1970)), p > 0.01 — and the share of shots that jump is 1 − e^(−rT);
 * - destinations split as the rates (r_a/(r_a + r_b)), flips happen at their probabilities;
 * - the jump times agree in distribution with physics/chain.ts samplePath (two-sample KS);
 * every rate inside its 99.9 % Wilson interval (Wilson, J. Am. Stat. Assoc. 22, 209 (1927)).
 * Drawing a block in two calls gives the same histories as in one (the stream carries over).
 */
import { describe, expect, it } from 'vitest';
import { kolmogorovTail, ksTwoSample } from '../support/ks.ts';
import { wilsonInterval } from '../../src/analysis/intervals.ts';
import { makePathBuffer } from '../../src/physics/chain.ts';
import { samplePath } from '../support/sample-path.ts';
import { makeStream } from '../../src/random/streams.ts';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { makeShotBatch } from '../../src/engine/trace/batch.ts';
import { historyTables, makePathStore, sampleHistories } from '../../src/physics/history.ts';
import type { Scenario } from '../../src/scenario/types.ts';
import { twoStateScenario } from '../support/scenarios.ts';

const RECORD = 4e-6;

/** Three states: excited (1) relaxes to ground (0) or leaks to 2, which relaxes to ground. */
function chainScenario(): Scenario {
  const s = twoStateScenario({ recordLength: RECORD, sampleRate: 50e6, preparationError: 0.1 });
  s.states.push({ name: 'leaked', level: { re: 0.5, im: 0 }, outcome: 1 });
  s.prepare = [0.3, 0.7, 0];
  s.preparationError = [{ probability: 0.1, into: 1, origin: 't' }, null, null];
  s.mappingError = [null, { probability: 0.2, into: 0, origin: 't' }, null];
  s.transitions = [
    { from: 1, to: 0, rate: 2e5, kind: 'relaxation' },
    { from: 1, to: 2, rate: 1e5, kind: 'leakage' },
    { from: 2, to: 0, rate: 4e5, kind: 'relaxation' },
  ];
  return s;
}

function draw(s: Scenario, shots: number, seed = 5) {
  const p = compilePoint(s);
  const t = historyTables(p);
  const out = makeShotBatch(p, 0, 'score', 0, shots);
  const store = makePathStore(shots);
  sampleHistories(t, makeStream(seed, 0, 'score', 0), out, 0, shots, store);
  return { out, store };
}

const N = 60000;
const { out, store } = draw(chainScenario(), N);

function expectRate(what: string, k: number, n: number, p: number): void {
  const w = wilsonInterval(k, n, 0.999);
  expect(p, `${what}: ${k}/${n} = ${k / n}, interval [${w.low}, ${w.high}], expected ${p}`).toBeGreaterThanOrEqual(w.low);
  expect(p, `${what}: ${k}/${n} = ${k / n}, interval [${w.low}, ${w.high}], expected ${p}`).toBeLessThanOrEqual(w.high);
}

describe('history sampling', () => {
  it('intended states, preparation and mapping flips at their probabilities', () => {
    let excited = 0, prepFlips = 0, ground = 0, mapFlips = 0, preparedExcited = 0;
    for (let i = 0; i < N; i++) {
      if (out.intended[i] === 1) excited++;
      if (out.intended[i] === 0) { ground++; if (out.prepared[i] === 1) prepFlips++; }
      if (out.prepared[i] === 1) { preparedExcited++; if (out.initial[i] === 0) mapFlips++; }
    }
    expectRate('intended excited', excited, N, 0.7);
    expectRate('preparation flip', prepFlips, ground, 0.1);
    expectRate('mapping flip', mapFlips, preparedExcited, 0.2);
  });

  it('first jump: share 1 − e^(−rT), truncated exponential law (KS p > 0.01), destinations by rate', () => {
    const r = 3e5;
    const times: number[] = [];
    let starts = 0, leaks = 0;
    for (let i = 0; i < N; i++) {
      if (out.initial[i] !== 1) continue;
      starts++;
      const a = store.offset[i]!, b = store.offset[i + 1]!;
      if (b > a) {
        times.push(store.times[a]!);
        if (store.entered[a] === 2) leaks++;
        expect(out.firstJump[i]).toBe(store.times[a]);
      }
    }
    expectRate('jumps inside the record', times.length, starts, 1 - Math.exp(-r * RECORD));
    expectRate('leakage share of first jumps', leaks, times.length, 1e5 / r);
    times.sort((x, y) => x - y);
    const n = times.length;
    const cdf = (t: number) => (1 - Math.exp(-r * t)) / (1 - Math.exp(-r * RECORD));
    let d = 0;
    times.forEach((t, i) => { d = Math.max(d, Math.abs(cdf(t) - i / n), Math.abs(cdf(t) - (i + 1) / n)); });
    const p = kolmogorovTail((Math.sqrt(n) + 0.12 + 0.11 / Math.sqrt(n)) * d);
    expect(p, `D = ${d}, n = ${n}, p = ${p}`).toBeGreaterThan(0.01);
  });

  it('jump times agree in distribution with physics/chain.ts samplePath', () => {
    const s = chainScenario();
    const p = compilePoint(s);
    const stream = makeStream(77, 0, 'aux', 0);
    const path = makePathBuffer();
    const reference: number[] = [], ours: number[] = [];
    for (let i = 0; i < 20000; i++) {
      samplePath(p.chain, 1, RECORD, stream, path);
      for (let j = 0; j < path.jumps; j++) reference.push(path.times[j]!);
    }
    for (let i = 0; i < N; i++) {
      if (out.initial[i] !== 1) continue;
      for (let j = store.offset[i]!; j < store.offset[i + 1]!; j++) ours.push(store.times[j]!);
    }
    const r = ksTwoSample(Float64Array.from(reference), Float64Array.from(ours));
    expect(r.pValue, `D = ${r.statistic}, p = ${r.pValue}`).toBeGreaterThan(0.01);
    expect(ours.length).toBeGreaterThan(Math.round(0.5 * N * 0.7 * 0.7)); // second jumps (leaked → ground) are present
  });

  it('the window states follow the path', () => {
    const s = chainScenario();
    const p = compilePoint(s);
    const lastSample = (p.grid.windowHi - 1) / p.grid.sampleRate;
    for (let i = 0; i < 2000; i++) {
      let state = out.initial[i]!;
      for (let j = store.offset[i]!; j < store.offset[i + 1]!; j++) if (store.times[j]! <= lastSample) state = store.entered[j]!;
      expect(out.atWindowEnd[i], `shot ${i}`).toBe(state);
    }
  });

  it('a block drawn in two calls equals one call', () => {
    const s = chainScenario();
    const p = compilePoint(s);
    const t = historyTables(p);
    const one = makeShotBatch(p, 0, 'score', 0, 1024), two = makeShotBatch(p, 0, 'score', 0, 1024);
    sampleHistories(t, makeStream(9, 0, 'score', 0), one, 0, 1024, makePathStore(1024));
    const stream = makeStream(9, 0, 'score', 0);
    sampleHistories(t, stream, two, 0, 300, makePathStore(1024));
    sampleHistories(t, stream, two, 300, 1024, makePathStore(1024));
    for (const k of ['intended', 'prepared', 'initial', 'atWindowStart', 'atWindowEnd', 'jumpCause', 'firstJump'] as const) {
      expect(Array.from(two[k]), k).toEqual(Array.from(one[k]));
    }
  });
});
