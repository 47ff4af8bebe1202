/**
 * Writes test/fixtures/golden-hashes.json: the hashes of every file the pinned runs write
 * (test/support/golden-runs.ts). Run it only when a change is meant to change numbers:
 *   node bin/run-ts.js test/support/make-golden-hashes.ts
 */
import { writeFileSync } from 'node:fs';
import { main } from '../../src/cli/main.ts';
import { goldenRuns, runGolden } from './golden-runs.ts';

/** The command line with its terminal output dropped (only the exit code and stderr matter here). */
async function cli(args: string[]): Promise<{ code: number; stderr: string }> {
  let stderr = '';
  const out = process.stdout.write.bind(process.stdout), err = process.stderr.write.bind(process.stderr);
  process.stdout.write = (() => true) as typeof process.stdout.write;
  process.stderr.write = ((s: string | Uint8Array) => { stderr += String(s); return true; }) as typeof process.stderr.write;
  try {
    return { code: await main(['node', 'singleshot', ...args]), stderr };
  } finally {
    process.stdout.write = out;
    process.stderr.write = err;
  }
}

const hashes: Record<string, Record<string, string>> = {};
for (const run of goldenRuns()) {
  const t0 = Date.now();
  hashes[run.id] = await runGolden(run, cli);
  console.log(`${run.id}: ${Object.keys(hashes[run.id]!).length} files, ${((Date.now() - t0) / 1000).toFixed(1)} s`);
}
writeFileSync('test/fixtures/golden-hashes.json', JSON.stringify(hashes, null, 1) + '\n');
