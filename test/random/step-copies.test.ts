/**
 * The inline copies of the xoshiro128** step (random/xoshiro.ts nextInt32Of) in the two hottest
 * loops equal the definition over 10^6 steps: sampleHistories (physics/history.ts), whose four
 * draws a shot decide the intended, prepared and initial states from the outputs, and
 * addNormals (random/stream.ts addNormalsFast), whose normals must be those of nextNormal(),
 * which steps through the definition. Exactness: common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { makePathStore, sampleHistories, type HistoryColumns, type HistoryTables } from '../../src/physics/history.ts';
import { RandomStream } from '../../src/random/stream.ts';
import { nextInt32Of } from '../../src/random/xoshiro.ts';

const STEPS = 1_000_000;
const uniform = (r: number): number => ((r >>> 0) + 0.5) / 2 ** 32;

describe('inline copies of the xoshiro128** step', () => {
  it('sampleHistories: 250 000 shots of four draws each are the definition\'s 10^6 outputs', () => {
    // two states that never jump, with preparation and mapping flips: four draws a shot, every
    // output decides something, and no draw goes through walkChain
    const t: HistoryTables = {
      states: 2, prepareCumulative: Float64Array.of(0.4, 1),
      prepProbability: Float64Array.of(0.3, 0.2), prepInto: Uint8Array.of(1, 0), anyPrep: true,
      mapProbability: Float64Array.of(0.1, 0.25), mapInto: Uint8Array.of(1, 0), anyMap: true,
      exitRate: Float64Array.of(0, 0), noJumpCut: Float64Array.of(2, 2), cumulative: Float64Array.of(1, 1, 1, 1),
      jumpCause: new Uint8Array(4), recordLength: 1e-6, windowStartTime: 0, lastWindowSample: 1e-6,
    };
    const shots = STEPS / 4;
    const u8 = () => new Uint8Array(shots);
    const out: HistoryColumns = {
      intended: u8(), prepared: u8(), initial: u8(), atWindowStart: u8(), atWindowEnd: u8(), firstJump: new Float64Array(shots), jumpCause: u8(),
    };
    const state = Uint32Array.of(0x9e3779b9, 0x243f6a88, 0xb7e15162, 0x12345678);
    const stream = new RandomStream(state);
    sampleHistories(t, stream, out, 0, shots, makePathStore(shots));
    const ref = Int32Array.from(state);
    let differ = 0, first = -1;
    for (let i = 0; i < shots; i++) {
      const intended = +(uniform(nextInt32Of(ref)) > 0.4);
      const prepared = uniform(nextInt32Of(ref)) < t.prepProbability[intended]! ? t.prepInto[intended]! : intended;
      const initial = uniform(nextInt32Of(ref)) < t.mapProbability[prepared]! ? t.mapInto[prepared]! : prepared;
      nextInt32Of(ref); // the first holding time's draw (no jump: both states stay)
      if (out.intended[i] !== intended || out.prepared[i] !== prepared || out.initial[i] !== initial) {
        differ++;
        if (first < 0) first = i;
      }
    }
    expect(differ, `first differing shot ${first}`).toBe(0);
    expect(Array.from(stream.s)).toEqual(Array.from(ref));
    // the decisions went both ways (the comparison is not vacuous)
    expect(out.prepared.some((p, i) => p !== out.intended[i])).toBe(true);
    expect(out.initial.some((p, i) => p !== out.prepared[i])).toBe(true);
  });

  it('addNormals: 10^6 normals equal 10^6 nextNormal() calls, state included', () => {
    const a = new RandomStream(Uint32Array.of(7, 11, 13, 17)), b = new RandomStream(Uint32Array.of(7, 11, 13, 17));
    const x = new Float64Array(STEPS);
    a.addNormals(x, 0, STEPS, 1);
    let differ = 0, first = -1;
    for (let i = 0; i < STEPS; i++) {
      if (!Object.is(x[i], 0 + b.nextNormal())) { differ++; if (first < 0) first = i; }
    }
    expect(differ, `first differing normal ${first}`).toBe(0);
    expect(Array.from(a.s)).toEqual(Array.from(b.s));
  });
});
