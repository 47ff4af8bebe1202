/**
 * Every file of the pinned runs (test/support/golden-runs.ts) against the hashes stored before
 * the source tree was reorganised: the same tables, byte for byte, whatever the engine, the
 * worker count, the shards or the folder the code lives in. Split over two test files so that
 * they run side by side.
 */
import { readFileSync } from 'node:fs';
import { expect, it } from 'vitest';
import { runCli } from '../support/cli.ts';
import { goldenRuns, runGolden } from '../support/golden-runs.ts';

const stored = JSON.parse(readFileSync('test/fixtures/golden-hashes.json', 'utf8')) as Record<string, Record<string, string>>;

/** Registers the pinned runs whose index is `part` modulo `parts`. */
export function pinnedRuns(part: number, parts: number): void {
  const runs = goldenRuns().filter((_, i) => i % parts === part);
  it.each(runs.map((r) => [r.id, r] as const))('%s writes the pinned bytes', async (id, run) => {
    const hashes = await runGolden(run, runCli);
    expect(hashes, `${id}: files or bytes differ from test/fixtures/golden-hashes.json`).toEqual(stored[id]);
  }, 60_000);
}
