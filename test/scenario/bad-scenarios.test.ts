import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { checkScenarioFile } from '../../src/app/check.ts';
import { loadScenarioFile } from '../../src/scenario/load.ts';
import { InputError } from '../../src/errors.ts';

// Each fixture's first line is "# expect: <key path>", or "# expect: (whole file)" when the
// problem is the file itself (empty, not YAML, several documents, too many aliases).
const DIR = join(import.meta.dirname, '..', 'fixtures', 'bad-scenarios');
const WHOLE_FILE = '(whole file)';

const cases = readdirSync(DIR)
  .filter((f) => f.endsWith('.yaml'))
  .sort()
  .map((f) => {
    const first = readFileSync(join(DIR, f), 'utf8').split('\n')[0]!;
    const m = /^# expect: (.+)$/.exec(first);
    if (!m) throw new Error(`${f}: first line must be "# expect: <key path>", found ${JSON.stringify(first)}`);
    return { file: f, path: m[1]!.trim() === WHOLE_FILE ? '' : m[1]!.trim() };
  });

describe('malformed scenarios are refused with a one-line message naming the key', () => {
  it('has the fixtures', () => {
    expect(cases.length).toBeGreaterThanOrEqual(12);
  });

  it.each(cases)('$file → $path', async ({ file, path }) => {
    const full = join(DIR, file);
    // what `check` validates: the document and every point of its sweep
    const error = await checkScenarioFile(full).then(
      () => undefined,
      (e: unknown) => e,
    );
    expect(error, `${file} was accepted`).toBeInstanceOf(InputError);
    const err = error as InputError;
    expect(err.message, 'one line').not.toMatch(/[\r\n]/);
    expect(err.file).toBe(full);
    expect(err.path, err.message).toBe(path);
    const prefix = path ? `${full}: ${path}: expected ` : `${full}: expected `;
    expect(err.message.startsWith(prefix), `${err.message} should start with ${prefix}`).toBe(true);
    expect(err.message).toContain(', found ');
  });

  it('a missing file is an InputError', async () => {
    await expect(loadScenarioFile(join(DIR, 'no-such-file.yaml'))).rejects.toThrow(/no-such-file\.yaml: expected a scenario file, found no such file/);
  });

  it('a folder is an InputError', async () => {
    await expect(loadScenarioFile(DIR)).rejects.toBeInstanceOf(InputError);
  });
});
