/**
 * The fused exact path (plan/exact-fused.ts: simulate, score and tally per seeding block, for
 * runs without a shots table) against the per-shot path (simulateExactBatch → scoreBatch →
 * tallyBatch): the tally-tree nodes, the folded tallies and the paired counts must be equal to
 * the bit, for several scenarios and on 2 worker threads. Exactness, not statistics: no source
 * needed beyond the per-shot path itself (common practice, no source).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { loadScenarioFile } from '../../src/scenario/load.ts';
import { runPoints, type RunResult } from '../../src/run/run-points.ts';
import { inProcessExecutor, type BatchExecutor } from '../../src/run/executor.ts';
import { workerPoolExecutor } from '../../src/run/pool.ts';
import type { Tally } from '../../src/analysis/tally.ts';
import type { Scenario } from '../../src/scenario/types.ts';
import type { FlickerSourceSpec } from '../../src/signal/noise/flicker.ts';
import { twoStateScenario } from '../support/scenarios.ts';

const pools: { close(): Promise<void> }[] = [];
afterAll(async () => { await Promise.all(pools.map((p) => p.close())); });

/** Every number of a tally, in a fixed order (compared with Object.is, so −0 ≠ +0). */
function numbers(t: Tally): number[] {
  return [
    ...t.assignments, ...t.causes, ...t.discarded, ...t.discardedWrong,
    ...t.clean.flatMap((m) => [m.n, m.mean, m.m2]),
  ];
}

function fingerprint(r: RunResult): unknown {
  return r.points.map((p) => ({
    stacks: p.tallyStacks.map((s) => s.map((n) => ({ level: n.level, index: n.index, values: numbers(n.tally) }))),
    tallies: p.tallies.map(numbers),
    pairs: p.pairs,
    summaries: p.summaries,
  }));
}

function expectSameBits(got: unknown, want: unknown, path = ''): void {
  if (typeof want === 'number') {
    expect(Object.is(got, want), `${path}: fused ${String(got)}, per-shot ${want}`).toBe(true);
  } else if (Array.isArray(want)) {
    expect((got as unknown[]).length, `${path}: length`).toBe(want.length);
    want.forEach((w, i) => expectSameBits((got as unknown[])[i], w, `${path}[${i}]`));
  } else if (want !== null && typeof want === 'object') {
    for (const [k, w] of Object.entries(want)) expectSameBits((got as Record<string, unknown>)[k], w, `${path}.${k}`);
  } else {
    expect(got, path).toEqual(want);
  }
}

async function both(scenario: Scenario, executor?: () => BatchExecutor): Promise<[RunResult, RunResult]> {
  const points = [{ parameters: {}, scenario }];
  // a per-shot consumer keeps the run on the per-shot path
  const perShot = await runPoints(points, { engine: 'exact', onScoredBatch: () => {} });
  const fused = await runPoints(points, { engine: 'exact', executor: executor?.() ?? inProcessExecutor() });
  return [fused, perShot];
}

const mix = async () => (await loadScenarioFile('test/fixtures/scenarios/fused-mix.yaml')).scenario;
const twoState = async () => (await loadScenarioFile('test/fixtures/scenarios/fused-two-state.yaml')).scenario;
/** The two-state fixture read by a pipeline whose window ends early (its own jump attribution). */
const shortWindow = async () => {
  const s = await twoState();
  return { ...s, pipelines: [{ ...s.pipelines[0]!, ambiguousBand: null, window: { start: 0.5e-6, length: 1e-6 } }] } as Scenario;
};
/**
 * The two-state fixture with no analog response and relaxation only: every jump ends the
 * chain, so the one-loop kernel runs as WebAssembly (plan/exact-kernel.ts) — with preparation
 * and mapping errors and the band, and optionally a pipeline window that ends early.
 */
const oneJump = async (window?: { start: number; length: number }) => {
  const s = await twoState();
  const pipeline = window ? { ...s.pipelines[0]!, window } : s.pipelines[0]!;
  return { ...s, transitions: s.transitions.filter((t) => t.from === 1), signal: { ...s.signal, response: null }, pipelines: [pipeline] } as Scenario;
};

describe('fused exact path', () => {
  it.each([
    ['three states, flips, response, band, fixed threshold, short window', mix],
    ['two states, sine carrier, relaxation (the benchmark workload, 3000 shots)', async () => twoStateScenario({ t1: 200e-6, shots: 3000, batchSize: 2048 })],
    ['outcome 1 below the threshold (highIsOne false), preparation error', async () => twoStateScenario({ t1: 5e-6, levels: [1, 0], recordLength: 2e-6, sampleRate: 20e6, shots: 4100, preparationError: 0.05 })],
    ['baseband (no Q), relaxation', async () => twoStateScenario({ t1: 3e-6, carrier: 'none', recordLength: 2e-6, sampleRate: 20e6, shots: 2500 })],
    ['two states (one-loop kernel): flips both ways, both transitions, response, band', twoState],
    ['two states (one-loop kernel): a pipeline window shorter than the timing window', shortWindow],
    ['two states (WebAssembly kernel): flips both ways, relaxation only, no response, band', () => oneJump()],
    ['two states (WebAssembly kernel): the same with a pipeline window ending early', () => oneJump({ start: 0.5e-6, length: 1e-6 })],
    // batches of ≥ 4 whole seeding blocks: the kernel's four-lane loop (tallyFour), then single blocks
    ['four-lane kernel: the benchmark workload, batches of 8 blocks and a short last one', async () => twoStateScenario({ t1: 200e-6, shots: 9000, batchSize: 8192 })],
    ['four-lane kernel: baseband (no Q, one normal), many jumps', async () => twoStateScenario({ t1: 2e-6, carrier: 'none', recordLength: 2e-6, sampleRate: 20e6, shots: 8192, batchSize: 4096 })],
    ['four-lane kernel: outcome 1 below the threshold, preparation error, many wrong shots', async () => twoStateScenario({ t1: 1e-6, levels: [1, 0], recordLength: 2e-6, sampleRate: 20e6, sigmaPerSample: 12, shots: 8192, batchSize: 4096, preparationError: 0.1 })],
    ['four-lane kernel: flips both ways, band, pipeline window ending early', async () => {
      const s = await oneJump({ start: 0.5e-6, length: 1e-6 });
      return { ...s, shots: 12288, batchSize: 4096 };
    }],
    ['four-lane kernel: flips both ways, band', async () => ({ ...(await oneJump()), shots: 8192, batchSize: 8192 })],
    ['1/f noise on both sides of the sensor (per-shot timeline draws)', async () => {
      const s = twoStateScenario({ t1: 5e-6, recordLength: 2e-6, sampleRate: 20e6, shots: 4100, batchSize: 2048 });
      const flickers: FlickerSourceSpec[] = [
        { kind: 'flicker', name: 'sensor 1/f', amplitude: 0.1, exponent: 1, low: 1e3, high: 5e6, injection: 'sensor', inDetuning: false },
        { kind: 'flicker', name: 'amplifier 1/f', amplitude: 0.05, exponent: 1.5, low: 1e3, high: 5e6, injection: 'amplifier', inDetuning: false },
      ];
      s.signal.sources = flickers;
      return s;
    }],
  ])('%s: the same tally tree and paired counts to the bit', async (_name, make) => {
    const [fused, perShot] = await both(await make());
    expect(fused.points[0]!.tallyStacks[0]!.length).toBeGreaterThan(0);
    expectSameBits(fingerprint(fused), fingerprint(perShot));
  });

  it('on 2 worker threads: the same bits as the per-shot path on this thread', async () => {
    const pool = workerPoolExecutor(2);
    pools.push(pool);
    const shared: BatchExecutor = { run: (p, t) => pool.run(p, t) };
    const [fused, perShot] = await both(await mix(), () => shared);
    expectSameBits(fingerprint(fused), fingerprint(perShot));
  }, 60_000);
});
