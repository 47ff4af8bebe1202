/**
 * Every output says which engine ran and why: the terminal text, --json, run.json, and every
 * table's schema metadata (singleshot.engine, singleshot.engine_reason); `--engine exact` on a
 * scenario it does not suit is refused with exit code 2 and the reason.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { tableFromIPC } from 'apache-arrow';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { runCli } from '../support/cli.ts';

const SMALL = 'test/fixtures/scenarios/small.yaml';


afterEach(() => vi.restoreAllMocks());

describe('outputs name the engine', () => {
  it.each([
    ['auto', 'exact', /^auto: every pipeline is a linear functional/],
    ['traces', 'traces', /^requested \(--engine traces\)/],
    ['exact', 'exact', /^requested \(--engine exact\)/],
  ])('--engine %s → %s, said everywhere', async (request, engine, why) => {
    const dir = mkdtempSync(join(tmpdir(), 'singleshot-engine-'));
    const json = await runCli(['run', SMALL, '--out', dir, '--engine', request, '--workers', '1', '--quiet', '--no-report', '--json']);
    expect(json.code, json.stderr).toBe(0);
    const parsed = JSON.parse(json.stdout) as { engine: string; engineReason: string };
    expect(parsed.engine).toBe(engine);
    expect(parsed.engineReason).toMatch(why);
    const manifest = JSON.parse(readFileSync(join(dir, 'run.json'), 'utf8')) as { engine: string; engineReason: string };
    expect(manifest.engine).toBe(engine);
    expect(manifest.engineReason).toBe(parsed.engineReason);
    for (const f of ['shots.arrow', 'summary.arrow', 'budget.arrow']) {
      const meta = tableFromIPC(readFileSync(join(dir, f))).schema.metadata;
      expect(meta.get('singleshot.engine'), f).toBe(engine);
      expect(meta.get('singleshot.engine_reason'), f).toBe(parsed.engineReason);
    }
    const text = await runCli(['run', SMALL, '--out', dir, '--force', '--engine', request, '--workers', '1', '--quiet', '--no-report']);
    expect(text.stdout).toContain(`engine: ${engine} (${parsed.engineReason})`);
  }, 60_000);

  it('--engine exact where it does not apply: exit 2 and the reason', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'singleshot-engine-'));
    const file = join(dir, 'clipped.yaml');
    writeFileSync(file, readFileSync(SMALL, 'utf8').replace('  noise:\n', '  digitizer: { low: -100 pA, high: 100 pA, bits: 8 }\n  noise:\n'));
    const r = await runCli(['run', file, '--out', join(dir, 'out'), '--engine', 'exact', '--quiet', '--no-report']);
    expect(r.code, r.stderr).toBe(2);
    expect(r.stderr).toMatch(/^singleshot: --engine exact: the exact engine does not apply: signal\.digitizer: clipping and quantisation are not linear/);
  });
});
