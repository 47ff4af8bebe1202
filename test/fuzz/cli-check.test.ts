/**
 * The command line on fuzzed files: `singleshot check FILE` on mutated scenarios (written to
 * disk, some with bytes that are not UTF-8) answers exit 0, or exit 2 with one line
 * "singleshot: FILE: …" on stderr per problem (at most 21 lines, none repeated) — never a stack trace. Most cases call `main` in-process; a
 * few spawn the real CLI to see the exit code and the whole stderr of a separate process.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { stringify } from 'yaml';
import { anyMutation, FUZZ_SEED, mutatedDoc } from './harness.ts';
import { runMain } from '../support/cli.ts';
import { MAX_REPORTED_ERRORS } from '../../src/errors.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const dir = mkdtempSync(join(tmpdir(), 'singleshot-fuzz-cli-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));


/** A verdict on one `check` answer, or null when it is as it should be. */
function checkAnswer(file: string, r: { code: number; out: string; err: string }): string | null {
  if (r.code === 0) {
    if (!r.out.startsWith(`${file}: ok (`)) return `exit 0 without "ok": ${JSON.stringify(r.out)}`;
    const bad = r.err.split('\n').filter((l) => l !== '' && !l.startsWith('warning: '));
    return bad.length ? `stray stderr lines: ${JSON.stringify(bad)}` : null;
  }
  if (r.code !== 2) return `exit ${r.code}`;
  const lines = r.err.split('\n').filter((l) => l !== '');
  if (lines.length < 1 || lines.length > MAX_REPORTED_ERRORS + 1) return `${lines.length} stderr lines: ${JSON.stringify(r.err)}`;
  if (new Set(lines).size !== lines.length) return `a line repeated: ${JSON.stringify(r.err)}`;
  const stray = lines.find((l) => !l.startsWith(`singleshot: ${file}: `));
  if (stray !== undefined) return `stderr does not name the file: ${JSON.stringify(stray)}`;
  if (/\n\s+at /.test(r.err)) return 'stack trace';
  return null;
}

describe('singleshot check on fuzzed files', () => {
  it('exit 0, or exit 2 with one line per problem naming the file (150 cases, in-process)', async () => {
    const samples = fc.sample(fc.tuple(mutatedDoc(anyMutation, 3), fc.boolean(), fc.nat()), { seed: FUZZ_SEED, numRuns: 150 });
    let i = 0;
    for (const [{ doc, labels }, latin1, at] of samples) {
      const file = join(dir, `case-${i++}.yaml`);
      let text: string;
      try {
        text = stringify(doc);
      } catch {
        continue; // a shape YAML cannot write (the document-level tests cover it)
      }
      const bytes = Buffer.from(text, 'utf8');
      // every other case: one byte that is not UTF-8 somewhere
      if (latin1 && bytes.length > 0) bytes[at % bytes.length] = 0xff;
      writeFileSync(file, bytes);
      const problem = checkAnswer(file, await runMain(['check', file]));
      expect(problem, `${labels.join('; ')}${latin1 ? ' + byte 0xff' : ''}`).toBeNull();
    }
  }, 60_000);

  it.each([
    ['a non-UTF-8 byte', Buffer.from('name: caf\xe9\n', 'latin1')],
    ['a record of 10^12 samples', Buffer.from('name: x\ntiming: { sampleRate: 1 THz, recordLength: 1 s }\nstates: [{name: a, level: 0, outcome: 0}, {name: b, level: 1, outcome: 1}]\n')],
  ])('the real CLI answers %s with exit 2 and one line', (_what, bytes) => {
    const file = join(dir, `spawned-${_what.replace(/\W+/g, '-')}.yaml`);
    writeFileSync(file, bytes);
    const r = spawnSync(process.execPath, [join(ROOT, 'bin', 'singleshot.js'), 'check', file], { encoding: 'utf8', timeout: 30_000 });
    expect(checkAnswer(file, { code: r.status ?? -1, out: r.stdout, err: r.stderr }), r.stderr).toBeNull();
    expect(r.status).toBe(2);
  }, 30_000);
});
