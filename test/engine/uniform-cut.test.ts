/**
 * The integer cuts of the four-lane exact kernel (engine/exact/kernel.ts uniformCut): a decision
 * on u = (r + 0.5)·2^-32 made as (r ≥ cut) XOR flip must agree with the decision on u itself,
 * for every kind the kernel uses (u > c, u ≥ c, u < p), at the cut's edge, at the ends of the
 * range and for random outputs. Exactness: common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { uniformCut, type UniformCut } from '../../src/engine/exact/kernel.ts';
import { makeStream } from '../../src/random/streams.ts';

const u = (r: number): number => (r + 0.5) / 2 ** 32;
const viaCut = (c: UniformCut, r: number): boolean => ((r >>> 0) >= (c.cut >>> 0)) !== (c.flip !== 0);

function expectSameDecisions(cut: UniformCut, decide: (u: number) => boolean, what: string): void {
  const s = makeStream(3, 0, 'aux', 0);
  const rs = [0, 1, 2, 2 ** 31 - 1, 2 ** 31, 2 ** 32 - 2, 2 ** 32 - 1];
  const edge = cut.cut >>> 0;
  for (let d = -3; d <= 3; d++) if (edge + d >= 0 && edge + d < 2 ** 32) rs.push(edge + d);
  for (let i = 0; i < 20000; i++) rs.push(s.nextUint32());
  for (const r of rs) expect(viaCut(cut, r), `${what} at r = ${r}`).toBe(decide(u(r)));
}

describe('uniformCut', () => {
  const s = makeStream(5, 0, 'aux', 1);
  const cs = [0, 1, 0.5, 1e-12, 1 - 1e-12, u(0), u(1), u(12345), u(2 ** 32 - 1), u(2 ** 31) * (1 + 2 ** -52), u(777) * (1 - 2 ** -53),
    -1, 2, Infinity, -Infinity, NaN, 0.0475, Math.exp(-0.1)];
  for (let i = 0; i < 30; i++) cs.push(s.nextDouble());

  it.each(cs.map((c) => [c]))('c = %d: u > c, u ≥ c and u < c give the same decisions', (c) => {
    expectSameDecisions(uniformCut((x) => x > c), (x) => x > c, `u > ${c}`);
    expectSameDecisions(uniformCut((x) => x >= c), (x) => x >= c, `u ≥ ${c}`);
    expectSameDecisions(uniformCut((x) => !(x < c), true), (x) => x < c, `u < ${c}`);
  });
});
