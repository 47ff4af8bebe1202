/**
 * The Arrow tables read back with apache-arrow: row counts, column names and types, units in
 * field metadata, the scenario / seed / version in the schema metadata.
 */
import { mkdtempSync, readFileSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { tableFromIPC } from 'apache-arrow';
import { beforeAll, describe, expect, it } from 'vitest';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { readManifest } from '../../src/io/manifest.ts';
import { TOOL_VERSION } from '../../src/io/metadata.ts';

let dir = '';
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'singleshot-tables-'));
  await runToDirectory({ scenarioPath: 'test/fixtures/scenarios/small.yaml', outDir: dir, report: false });
}, 60_000);

const read = (f: string) => tableFromIPC(readFileSync(join(dir, f)));

describe('output tables', () => {
  it('shots.arrow has one row per scored shot and the truth columns', () => {
    const t = read('shots.arrow');
    expect(t.numRows).toBe(6144);
    expect(t.schema.fields.map((f) => f.name)).toEqual([
      'point', 'shot', 'pipeline', 'prepared', 'after_preparation', 'at_record_start', 'at_window_start',
      'at_window_end', 'first_jump_s', 'in_phase', 'quadrature', 'value', 'outcome', 'correct', 'cause',
    ]);
    expect(t.schema.fields.find((f) => f.name === 'value')!.metadata.get('unit')).toBe('A');
    expect(t.schema.fields.find((f) => f.name === 'first_jump_s')!.metadata.get('unit')).toBe('s');
    const shot = t.getChild('shot')!.toArray() as Uint32Array;
    expect(Array.from(shot.slice(0, 3))).toEqual([0, 1, 2]);
    expect(shot[6143]).toBe(6143);
    const causes = new Set(t.getChild('cause')!.toArray() as unknown as string[]);
    for (const c of causes) expect(['none', 'noise', 'relaxation', 'preparation', 'mapping']).toContain(c);
    // a correct shot has cause none, a wrong one never does
    const correct = t.getChild('correct')!.toArray() as unknown as boolean[];
    const cause = t.getChild('cause')!;
    for (let i = 0; i < t.numRows; i++) expect(cause.get(i) === 'none').toBe(Boolean(correct[i]));
  });

  it('metadata carries the scenario, seed and version', () => {
    for (const f of ['shots.arrow', 'summary.arrow', 'budget.arrow']) {
      const meta = read(f).schema.metadata;
      expect(meta.get('singleshot.seed'), f).toBe('4242');
      expect(meta.get('singleshot.version'), f).toBe(TOOL_VERSION);
      expect(JSON.parse(meta.get('singleshot.scenario')!).name, f).toBe('small test readout');
      expect(meta.get('singleshot.engine'), f).toBe('traces');
    }
  });

  it('summary.arrow has one row per point with errors and intervals, budget.arrow one per cause', () => {
    const s = read('summary.arrow');
    expect(s.numRows).toBe(1);
    const row = s.get(0)!.toJSON() as Record<string, number>;
    expect(row.mean_error_low).toBeLessThanOrEqual(row.mean_error!);
    expect(row.mean_error_high).toBeGreaterThanOrEqual(row.mean_error!);
    expect(row.error_low! + row.error_high!).toBeGreaterThan(0);
    expect(s.schema.fields.find((f) => f.name === 'threshold')!.metadata.get('unit')).toBe('A');
    const b = read('budget.arrow');
    const causes = b.getChild('cause')!.toArray() as unknown as string[];
    expect(new Set(causes)).toEqual(new Set(['noise', 'relaxation', 'excitation', 'leakage', 'preparation', 'mapping', 'total']));
    expect(b.numRows).toBe(3 * 7); // states low, high, all × 6 causes + total
  });

  it('leaves no temporary files and a complete run.json', () => {
    expect(readdirSync(dir).sort()).toEqual(['budget.arrow', 'run.json', 'shots.arrow', 'summary.arrow', 'tallies.json']);
    expect(readManifest(dir).complete).toBe(true);
  });
});
