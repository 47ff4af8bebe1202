/**
 * Shards: `run --shard K/N` for every K, merged, gives the same bytes as the unsharded run —
 * for both engines, a three-point sweep with two pipelines (comparisons.arrow), and shard counts
 * that do not divide the batches evenly. A part that would score no shot at all (more parts than
 * batches) is refused.
 */
import { mkdtempSync, readFileSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { mergeRuns } from '../../src/app/merge.ts';
import type { EngineRequest } from '../../src/engine/choose.ts';

const SWEEP = 'test/fixtures/scenarios/shard-sweep.yaml';

function fresh(tag: string): string {
  return mkdtempSync(join(tmpdir(), `singleshot-shards-${tag}-`));
}

/** Files of an unsharded folder that a merge must reproduce byte for byte (run.json names its shards, so it differs). */
function tablesOf(dir: string): string[] {
  return readdirSync(dir).filter((f) => f !== 'run.json').sort();
}

async function shardedAndWhole(engine: EngineRequest, shards: number, report = false) {
  const whole = fresh('whole');
  await runToDirectory({ scenarioPath: SWEEP, outDir: whole, engine, report, force: true });
  const parts: string[] = [];
  for (let k = 0; k < shards; k++) {
    const dir = fresh(`part${k + 1}`);
    await runToDirectory({ scenarioPath: SWEEP, outDir: dir, engine, report, force: true, shard: { index: k, count: shards } });
    parts.push(dir);
  }
  const merged = fresh('merged');
  // given in reverse: merge orders by K itself
  await mergeRuns({ dirs: [...parts].reverse(), outDir: merged, force: true, report });
  return { whole, merged };
}

describe('shards merged equal the unsharded run', () => {
  it('refuses a part that would score no shot (7 parts of 5 batches)', async () => {
    await expect(runToDirectory({ scenarioPath: SWEEP, outDir: fresh('empty'), force: true, report: false, shard: { index: 0, count: 7 } }))
      .rejects.toThrow(/--shard: expected a part that scores shots .* found part 1 of 7, which would score none/);
  });

  it.each([
    ['exact', 3, true],
    ['traces', 4, false],
    ['exact', 5, false],
  ] as const)('engine %s, %d shards: every table byte-identical', async (engine, shards, report) => {
    const { whole, merged } = await shardedAndWhole(engine, shards, report);
    const files = tablesOf(whole);
    expect(files).toEqual(expect.arrayContaining(['shots.arrow', 'summary.arrow', 'budget.arrow', 'comparisons.arrow', 'tallies.json']));
    expect(tablesOf(merged)).toEqual(files);
    for (const f of files) {
      const a = readFileSync(join(whole, f)), b = readFileSync(join(merged, f));
      expect(b.equals(a), `${f}: ${b.length} bytes merged vs ${a.length} unsharded`).toBe(true);
    }
    const manifest = JSON.parse(readFileSync(join(merged, 'run.json'), 'utf8')) as { shard: string; engine: string; mergedFrom: string[]; complete: boolean };
    expect(manifest).toMatchObject({ shard: '1/1', engine, complete: true });
    expect(manifest.mergedFrom).toHaveLength(shards);
  }, 120_000);
});
