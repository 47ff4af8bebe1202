import { describe, expect, it } from 'vitest';
import { makeTelegraphRecord, makeTelegraphTimeline, type Fluctuator, type TelegraphRecord } from '../../src/signal/telegraph-timeline.ts';
import { wilsonInterval } from '../../src/analysis/intervals.ts';
import { seededStream } from './seeded-stream.ts';

const streams = (seed: string) => (block: number) => seededStream(`${seed}:${block}`);

/** State of fluctuator f at the end of a record (start state and its switches). */
function endState(r: TelegraphRecord, f: number): number {
  let s = r.start[f]!;
  for (let e = 0; e < r.count; e++) if (r.which[e] === f) s = 1 - s;
  return s;
}

function copy(r: TelegraphRecord) {
  return { start: Array.from(r.start), times: Array.from(r.times.subarray(0, r.count)), which: Array.from(r.which.subarray(0, r.count)) };
}

describe('telegraph timeline: consistency and random access', () => {
  const fluctuators: Fluctuator[] = [
    { amplitude: 1, rateUp: 3e4, rateDown: 5e4 }, // many switches per record
    { amplitude: -2, rateUp: 40, rateDown: 60 }, // slower than a block
    { amplitude: 0.5, rateUp: 0, rateDown: 0 }, // frozen: keeps its genesis state
  ];
  const timing = { period: 1e-4, recordLength: 1e-4, shotsPerBlock: 32 };

  it('with records end to end, every block starts where the previous one ended', () => {
    const t = makeTelegraphTimeline(fluctuators, timing, streams('ends'));
    const r = makeTelegraphRecord(fluctuators.length);
    for (let b = 0; b < 60; b++) {
      t.record(b * 32 + 31, r);
      for (let f = 0; f < fluctuators.length; f++) {
        expect(endState(r, f), `block ${b}, fluctuator ${f}`).toBe(t.blockStart(b + 1, f));
      }
    }
    // and within a block each record starts in the state the previous one ended in
    const u = makeTelegraphTimeline(fluctuators, timing, streams('ends'));
    let previous = [0, 0, 0];
    for (let i = 0; i < 200; i++) {
      u.record(i, r);
      if (i > 0) for (let f = 0; f < 3; f++) expect(r.start[f], `shot ${i}, fluctuator ${f}`).toBe(previous[f]);
      previous = [0, 1, 2].map((f) => endState(r, f));
    }
  });

  it('a shot gives the same switches whether reached in order or directly', () => {
    const gapped = { period: 3e-4, recordLength: 1e-4, shotsPerBlock: 32 };
    const sequential = makeTelegraphTimeline(fluctuators, gapped, streams('ra'));
    const r = makeTelegraphRecord(3);
    const seen = new Map<number, ReturnType<typeof copy>>();
    for (let i = 0; i < 400; i++) seen.set(i, copy(sequential.record(i, r)));
    for (const i of [399, 0, 250, 31, 32, 33, 100]) {
      const direct = makeTelegraphTimeline(fluctuators, gapped, streams('ra')).record(i, makeTelegraphRecord(3));
      expect(copy(direct), `shot ${i}`).toEqual(seen.get(i));
    }
  });
});

describe('telegraph timeline statistics (two-state Markov chain; Machlup, J. Appl. Phys. 25, 341 (1954))', () => {
  it('occupation, switch rate and the correlation across gaps, inside blocks and across block joins', () => {
    const up = 2000, down = 3000; // π = 0.4, λ = 5000/s
    const f: Fluctuator = { amplitude: 1, rateUp: up, rateDown: down };
    const timing = { period: 4e-4, recordLength: 1e-4, shotsPerBlock: 8 };
    const t = makeTelegraphTimeline([f], timing, streams('stats'));
    const r = makeTelegraphRecord(1);
    const shots = 40000;
    let ones = 0, switches = 0;
    // pairs (end of record i, start of record i+1), split by whether a block join lies between them
    const pairs = { inside: [0, 0], join: [0, 0] }; // [count with end = 1, of those start = 1]
    let lastEnd = -1;
    for (let i = 0; i < shots; i++) {
      t.record(i, r);
      ones += r.start[0]!;
      switches += r.count;
      if (lastEnd === 1) {
        const bucket = i % timing.shotsPerBlock === 0 ? pairs.join : pairs.inside;
        bucket[0]!++;
        bucket[1]! += r.start[0]!;
      }
      lastEnd = endState(r, 0);
    }
    const pi = up / (up + down);
    const lambda = up + down;
    const occ = wilsonInterval(ones, shots, 0.999);
    // records 3 lifetimes apart: nearly independent, the binomial interval applies
    expect(pi, `occupation ${ones / shots}, interval [${occ.low}, ${occ.high}]`).toBeGreaterThan(occ.low);
    expect(pi).toBeLessThan(occ.high);
    // stationary switch rate 2·up·down/(up + down): Poisson count, 5 SD
    const expected = (2 * up * down / lambda) * timing.recordLength * shots;
    expect(Math.abs(switches - expected), `switches ${switches}, expected ${expected}`).toBeLessThan(5 * Math.sqrt(expected));
    // P(1 at t + g | 1 at t) = π + (1 − π)e^(−λg) over the gap g
    const gap = timing.period - timing.recordLength;
    const stay = pi + (1 - pi) * Math.exp(-lambda * gap);
    for (const [name, [n, k]] of Object.entries(pairs)) {
      const ci = wilsonInterval(k!, n!, 0.999);
      expect(stay, `${name}: ${k}/${n} = ${k! / n!}, interval [${ci.low}, ${ci.high}]`).toBeGreaterThan(ci.low);
      expect(stay).toBeLessThan(ci.high);
    }
  });
});
