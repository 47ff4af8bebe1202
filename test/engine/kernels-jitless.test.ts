/**
 * End to end, the WebAssembly kernels change no number: the same run in a child process under
 * `node --jitless` (no WebAssembly, so the TypeScript loops run: engine/wasm/memory.ts
 * kernelsAvailable) writes byte-identical tables — the trace engine with its shots table, and
 * the exact engine's fused path (--no-shots-table), whose point here (relaxation only, no
 * response) runs the WebAssembly exact kernel normally — and the trace engine on a baseband I and
 * Q record, whose values add each channel's dot products. Exactness: common practice, no source.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const SCENARIO = 'test/fixtures/scenarios/small.yaml';
const IQ = 'test/fixtures/scenarios/iq.yaml';

/** Runs `args` (the scenario first when it names one, else SCENARIO) with node `flags`; returns the folder. */
function run(flags: string[], args: readonly string[]): string {
  const out = mkdtempSync(join(tmpdir(), 'singleshot-jitless-'));
  const [scenario, rest] = args[0]!.endsWith('.yaml') ? [args[0]!, args.slice(1)] : [SCENARIO, args];
  execFileSync('node', [...flags, 'bin/singleshot.js', 'run', scenario, '--out', out, '--force', '--quiet', '--no-report', ...rest], { stdio: 'pipe' });
  return out;
}

describe('WebAssembly kernels against the TypeScript loops, whole runs', () => {
  it.each([
    ['trace engine, shots table', ['--engine', 'traces'], ['shots.arrow', 'summary.arrow', 'budget.arrow', 'tallies.json']],
    ['exact engine, fused path', ['--engine', 'exact', '--no-shots-table'], ['summary.arrow', 'budget.arrow', 'tallies.json']],
    ['trace engine on baseband I and Q (two channels per record)', [IQ, '--engine', 'traces', '--shots', '1024'], ['shots.arrow', 'summary.arrow', 'budget.arrow', 'tallies.json']],
  ])('%s: the same bytes with and without WebAssembly', (_name, args, files) => {
    const wasm = run([], args), ts = run(['--jitless', '--no-warnings'], args);
    for (const f of files) {
      expect(readFileSync(join(ts, f)).equals(readFileSync(join(wasm, f))), f).toBe(true);
    }
  }, 120_000);
});
