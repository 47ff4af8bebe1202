/**
 * Same scenario + seed ⇒ byte-identical Arrow files; a different batch size ⇒ identical table
 * contents (only the embedded scenario text, which records the batch size, differs).
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { tableFromIPC } from 'apache-arrow';
import { describe, expect, it } from 'vitest';
import { runToDirectory } from '../../src/app/run-to-directory.ts';

const SCENARIO = 'test/fixtures/scenarios/small.yaml';
const TABLES = ['shots.arrow', 'summary.arrow', 'budget.arrow'];

function fresh(): string {
  return mkdtempSync(join(tmpdir(), 'singleshot-det-'));
}

/** Column values of a table, without any metadata. */
function contents(path: string): Record<string, unknown[]> {
  const t = tableFromIPC(readFileSync(path));
  return Object.fromEntries(t.schema.fields.map((f) => [f.name, t.getChild(f.name)!.toArray() as unknown as unknown[]].map((x, i) => (i === 1 ? Array.from(x as ArrayLike<unknown>) : x))));
}

describe('determinism', () => {
  it('the same scenario and seed give byte-identical tables', async () => {
    const a = fresh(), b = fresh();
    await runToDirectory({ scenarioPath: SCENARIO, outDir: a, report: false });
    await runToDirectory({ scenarioPath: SCENARIO, outDir: b, report: false });
    for (const f of TABLES) expect(readFileSync(join(a, f)).equals(readFileSync(join(b, f))), f).toBe(true);
  }, 60_000);

  it('a different batch size gives identical table contents', async () => {
    const dir = fresh();
    const other = join(dir, 'batch4096.yaml');
    writeFileSync(other, readFileSync(SCENARIO, 'utf8').replace('batchSize: 1024', 'batchSize: 4096'));
    const a = fresh(), b = fresh();
    await runToDirectory({ scenarioPath: SCENARIO, outDir: a, report: false });
    await runToDirectory({ scenarioPath: other, outDir: b, report: false });
    for (const f of TABLES) expect(contents(join(b, f)), f).toEqual(contents(join(a, f)));
  }, 60_000);

  it('a different seed gives different shots', async () => {
    const a = fresh(), b = fresh();
    await runToDirectory({ scenarioPath: SCENARIO, outDir: a, report: false });
    await runToDirectory({ scenarioPath: SCENARIO, outDir: b, seed: 4243, report: false });
    expect(contents(join(b, 'shots.arrow')).value).not.toEqual(contents(join(a, 'shots.arrow')).value);
  }, 60_000);
});
