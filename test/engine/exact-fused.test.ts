/**
 * The fused exact path (engine/exact/fused.ts: simulate, score and tally per seeding block, for
 * runs without a shots table) against the per-shot path (simulateExactBatch → scoreBatch →
 * tallyBatch): the tally-tree nodes, the folded tallies and the paired counts must be equal to
 * the bit, for several scenarios and on 2 worker threads — through the TypeScript path, and
 * through the WebAssembly four-lane kernel on full groups of four blocks, on partial groups
 * (1–3 blocks) and on a short last block. Exactness, not statistics: no source needed beyond
 * the per-shot path itself (common practice, no source).
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
import { compilePoint } from '../../src/engine/compile-point.ts';
import { makeExactScratch } from '../../src/engine/exact/batch.ts';
import { exactKernelApplies } from '../../src/engine/exact/kernel.ts';
import { simulateTalliedBatch } from '../../src/engine/exact/fused.ts';
import { scratchHistory } from '../../src/engine/trace/batch.ts';

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
 * chain, so the WebAssembly kernel runs (engine/exact/kernel.ts) — with preparation and
 * mapping errors and the band, and optionally a pipeline window that ends early.
 */
const oneJump = async (window?: { start: number; length: number }) => {
  const s = await twoState();
  const pipeline = window ? { ...s.pipelines[0]!, window } : s.pipelines[0]!;
  return { ...s, transitions: s.transitions.filter((t) => t.from === 1), signal: { ...s.signal, response: null }, pipelines: [pipeline] } as Scenario;
};

/** Whether the fused path runs the scenario's (first) point through the WebAssembly kernel. */
function kernelRuns(scenario: Scenario): boolean {
  const point = compilePoint(scenario);
  const scratch = makeExactScratch(point);
  return exactKernelApplies(point, scratch.exact, scratchHistory(point, scratch), scenario.pipelines.length, scenario.outcomes.length);
}

const K = 1024;
type Make = () => Promise<Scenario> | Scenario;

describe('fused exact path', () => {
  it.each([
    ['three states, flips, response, band, fixed threshold, short window', mix],
    ['two states: flips both ways, both transitions, response, band', twoState],
    ['two states: a pipeline window shorter than the timing window', shortWindow],
    ['1/f noise on both sides of the sensor (per-shot timeline draws)', async () => {
      const s = twoStateScenario({ t1: 5e-6, recordLength: 2e-6, sampleRate: 20e6, shots: 4100, batchSize: 2048 });
      const flickers: FlickerSourceSpec[] = [
        { kind: 'flicker', name: 'sensor 1/f', amplitude: 0.1, exponent: 1, low: 1e3, high: 5e6, injection: 'sensor', inDetuning: false },
        { kind: 'flicker', name: 'amplifier 1/f', amplitude: 0.05, exponent: 1.5, low: 1e3, high: 5e6, injection: 'amplifier', inDetuning: false },
      ];
      s.signal.sources = flickers;
      return s;
    }],
  ] as [string, Make][])('TypeScript path, %s: the same tally tree and paired counts to the bit', async (_name, make) => {
    const scenario = await make();
    expect(kernelRuns(scenario), 'the kernel does not take this point').toBe(false);
    const [fused, perShot] = await both(scenario);
    expect(fused.points[0]!.tallyStacks[0]!.length).toBeGreaterThan(0);
    expectSameBits(fingerprint(fused), fingerprint(perShot));
  });

  it.each([
    // batches of 2 blocks, then a short last block of 952 shots
    ['the benchmark workload, 3000 shots in batches of 2 blocks', async () => twoStateScenario({ t1: 200e-6, shots: 3000, batchSize: 2 * K })],
    ['outcome 1 below the threshold (highIsOne false), preparation error, batches of one block and a short one', async () => twoStateScenario({ t1: 5e-6, levels: [1, 0], recordLength: 2e-6, sampleRate: 20e6, shots: 4100, preparationError: 0.05 })],
    ['baseband (no Q), relaxation, one block and a short one', async () => twoStateScenario({ t1: 3e-6, carrier: 'none', recordLength: 2e-6, sampleRate: 20e6, shots: K + 500, batchSize: 2 * K })],
    ['flips both ways, relaxation only, no response, band: batches of 2 blocks and a short one', () => oneJump()],
    ['the same with a pipeline window ending early', () => oneJump({ start: 0.5e-6, length: 1e-6 })],
    ['full groups: batches of 8 blocks, then 4 blocks and a short one', async () => twoStateScenario({ t1: 200e-6, shots: 12 * K + 808, batchSize: 8 * K })],
    ['a full group, a group of 2 and a short block', async () => twoStateScenario({ t1: 20e-6, shots: 6 * K + 300, batchSize: 8 * K })],
    ['groups of 3 blocks, batches starting at blocks 3 and 6, a short last block', async () => twoStateScenario({ t1: 20e-6, shots: 9 * K + 5, batchSize: 3 * K })],
    ['baseband (no Q, one normal), many jumps, full groups', async () => twoStateScenario({ t1: 2e-6, carrier: 'none', recordLength: 2e-6, sampleRate: 20e6, shots: 8 * K, batchSize: 4 * K })],
    ['outcome 1 below the threshold, preparation error, many wrong shots, a group of 1 and a short block', async () => twoStateScenario({ t1: 1e-6, levels: [1, 0], recordLength: 2e-6, sampleRate: 20e6, sigmaPerSample: 12, shots: 9 * K + 700, batchSize: 4 * K, preparationError: 0.1 })],
    ['flips both ways, band, pipeline window ending early, full groups', async () => ({ ...(await oneJump({ start: 0.5e-6, length: 1e-6 })), shots: 12 * K, batchSize: 4 * K })],
    ['flips both ways, band, 2 full groups in a batch', async () => ({ ...(await oneJump()), shots: 8 * K, batchSize: 8 * K })],
    ['baseband I and Q (two channels folded into the prefix sums), relaxation, a group of 2 and a short block', async () => {
      const s = twoStateScenario({ t1: 4e-6, carrier: 'baseband-iq', recordLength: 2e-6, sampleRate: 20e6, shots: 2 * K + 300, batchSize: 4 * K });
      s.states[0]!.level = { re: 0.2, im: 0.7 };
      s.states[1]!.level = { re: 0.9, im: -0.1 };
      return s;
    }],
  ] as [string, Make][])('WebAssembly kernel, %s: the same tally tree and paired counts to the bit', async (_name, make) => {
    const scenario = await make();
    expect(kernelRuns(scenario), 'the kernel takes this point').toBe(true);
    const [fused, perShot] = await both(scenario);
    expect(fused.points[0]!.tallyStacks[0]!.length).toBeGreaterThan(0);
    expectSameBits(fingerprint(fused), fingerprint(perShot));
  });

  it('WebAssembly kernel against the TypeScript path, batch by batch: 1 shot to 9 blocks, node by node', () => {
    const scenario = { ...twoStateScenario({ t1: 1e-6, recordLength: 2e-6, sampleRate: 20e6, sigmaPerSample: 12, preparationError: 0.1 }), batchSize: 16 * K };
    const point = compilePoint(scenario);
    const scoring = { pipelines: [{ cos: 1, sin: 0, threshold: 0.5, highIsOne: true, band: 0.3, lastSample: null }] };
    const wasm = makeExactScratch(point), ts = makeExactScratch(point);
    for (const [batch, count] of [[0, 1], [1, 1023], [2, K], [3, K + 1], [1, 2 * K], [2, 3 * K + 17], [5, 4 * K], [7, 5 * K], [3, 9 * K - 1]] as const) {
      const a = simulateTalliedBatch(point, 0, 'score', batch, count, scoring, wasm);
      const b = simulateTalliedBatch(point, 0, 'score', batch, count, scoring, ts, false);
      const nodes = (x: typeof a) => x.nodes[0]!.map((n) => ({ level: n.level, index: n.index, values: numbers(n.tally) }));
      expect(nodes(a).length, `batch ${batch}, ${count} shots`).toBeGreaterThan(0);
      expectSameBits(nodes(a), nodes(b), `batch ${batch}, ${count} shots`);
    }
  });

  it('on 2 worker threads: the same bits as the per-shot path on this thread', async () => {
    const pool = workerPoolExecutor(2);
    pools.push(pool);
    const shared: BatchExecutor = { run: (p, t) => pool.run(p, t) };
    const [fused, perShot] = await both(await mix(), () => shared);
    expectSameBits(fingerprint(fused), fingerprint(perShot));
  }, 60_000);
});
