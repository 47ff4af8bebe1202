/**
 * `singleshot analyze` on malformed input, through the real command line (`main`): a missing
 * column, a wrong type, ragged lists, no sample rate, bad labels, a bad pipeline file — each
 * exits with code 2 and one line on stderr that names the file and the column or key.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import {
  Field, FixedSizeList, Float32, Float64, Int32, List, RecordBatch, Schema, Table, Utf8, tableToIPC, vectorFromArray, type Vector,
} from 'apache-arrow';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { main } from '../../src/cli/main.ts';

const dir = mkdtempSync(join(tmpdir(), 'singleshot-analyze-input-'));

async function runCli(args: string[]): Promise<{ code: number; stderr: string; stdout: string }> {
  let stderr = '', stdout = '';
  vi.spyOn(process.stderr, 'write').mockImplementation((s: string | Uint8Array) => { stderr += String(s); return true; });
  vi.spyOn(process.stdout, 'write').mockImplementation((s: string | Uint8Array) => { stdout += String(s); return true; });
  const code = await main(['node', 'singleshot', ...args]);
  vi.restoreAllMocks();
  return { code, stderr, stdout };
}

afterEach(() => vi.restoreAllMocks());

/** Writes an Arrow file of the given columns with schema metadata; returns its path. */
function table(name: string, columns: Record<string, Vector>, metadata: Record<string, string> = { 'singleshot.sample_rate': '10000000' }): string {
  const t = new Table(columns);
  const schema = new Schema(t.schema.fields, new Map(Object.entries(metadata)));
  const path = join(dir, `${name}.arrow`);
  writeFileSync(path, tableToIPC(new Table(schema, t.batches.map((b) => new RecordBatch(schema, b.data))), 'file'));
  return path;
}

const rows = (n: number, length: number) => Array.from({ length: n }, (_, i) => Array.from({ length }, (_, k) => ((i * 7 + k * 3) % 11) / 11 + (i % 2)));
const fixedList = (data: number[][]) => vectorFromArray(data, new FixedSizeList(data[0]!.length, new Field('sample', new Float32(), false)));
const labels = (n: number) => vectorFromArray(Array.from({ length: n }, (_, i) => i % 2), new Int32());

const pipeline = (name: string, text: string) => {
  const path = join(dir, `${name}.yaml`);
  writeFileSync(path, text);
  return path;
};
const FIXED = pipeline('fixed', 'referencePhase: 0 deg\nthreshold: { fixed: 1 }\n');

describe('analyze refuses malformed tables with exit 2 and a message naming the column', () => {
  it.each([
    {
      what: 'missing sample column',
      file: () => table('missing', { samples: fixedList(rows(4, 8)) }),
      expect: /column "record": expected a column of sample lists \(the table has samples\), found no such column/,
    },
    {
      what: 'wrong type (plain numbers)',
      file: () => table('scalar', { record: vectorFromArray([1, 2, 3], new Float64()) }),
      expect: /column "record": expected a fixed-size list or list of Float32 or Float64 samples, found Float64/,
    },
    {
      what: 'wrong type (lists of strings)',
      file: () => table('strings', { record: vectorFromArray([['a'], ['b']], new List(new Field('item', new Utf8(), true))) }),
      expect: /column "record": expected a fixed-size list or list of Float32 or Float64 samples, found List<Utf8>/,
    },
    {
      what: 'ragged lists',
      file: () => table('ragged', { record: vectorFromArray([[1, 2, 3, 4], [1, 2, 3, 4], [1, 2, 3]], new List(new Field('item', new Float64(), true))) }),
      expect: /column "record": expected records of one length \(row 0 has 4 samples\), found ragged lists: row 2 has 3/,
    },
    {
      what: 'no sample rate',
      file: () => table('no-rate', { record: fixedList(rows(4, 8)) }, {}),
      expect: /no-rate\.arrow: sample rate: expected a sample rate: --sample-rate, sampleRate in a pipeline file, or the file's own .*, found none of them/,
    },
    {
      what: 'a NaN sample',
      file: () => table('nan', { record: fixedList(rows(4, 8).map((r, i) => (i === 2 ? r.map((x, k) => (k === 5 ? NaN : x)) : r))) }),
      expect: /column "record": expected finite samples of magnitude at most 1e\+100, found NaN in row 2/,
    },
    {
      what: 'an infinite sample',
      file: () => table('inf', { record: fixedList(rows(4, 8).map((r, i) => (i === 1 ? r.map((x, k) => (k === 0 ? -Infinity : x)) : r))) }),
      expect: /column "record": expected finite samples of magnitude at most 1e\+100, found -Infinity in row 1/,
    },
    {
      what: 'not an Arrow file',
      file: () => { const p = join(dir, 'text.arrow'); writeFileSync(p, 'hello'); return p; },
      expect: /text\.arrow: expected an Arrow IPC file/,
    },
  ])('$what', async (c) => {
    const path = c.file();
    const { code, stderr } = await runCli(['analyze', path, '--pipeline', FIXED, '--out', join(dir, `out-${c.what.replace(/\W+/g, '-')}`)]);
    expect(code, stderr).toBe(2);
    expect(stderr.trim().split('\n'), 'one line').toHaveLength(1);
    expect(stderr).toContain(path);
    expect(stderr).toMatch(c.expect);
  });

  it.each([
    { what: 'a missing label column', args: ['--labels', 'truth'], expect: /column "truth": expected a label column \(the table has record, label\), found no such column/ },
    { what: 'a label column of strings without outcomes', args: ['--labels', 'name'], expect: /column "name": expected integer 0\/1 or boolean labels/ },
    { what: 'a label outside 0/1', args: ['--labels', 'bad'], expect: /column "bad": expected labels 0 or 1, found 7 in row 3/ },
  ])('$what', async (c) => {
    const n = 6;
    const path = table(`labels-${c.args[1]}`, {
      record: fixedList(rows(n, 8)),
      label: labels(n),
      ...(c.args[1] === 'name' ? { name: vectorFromArray(['a', 'b', 'a', 'b', 'a', 'b'], new Utf8()) } : {}),
      ...(c.args[1] === 'bad' ? { bad: vectorFromArray([0, 1, 0, 7, 1, 0], new Int32()) } : {}),
    });
    const { code, stderr } = await runCli(['analyze', path, '--pipeline', FIXED, '--out', join(dir, `out-l-${c.args[1]}`), ...c.args]);
    expect(code, stderr).toBe(2);
    expect(stderr).toMatch(c.expect);
  });

  it.each([
    { what: 'an unknown key', text: 'threshold: { fixed: 1 }\nreferencePhase: 0 deg\nfiltre: none\n', expect: /bad-key\.yaml: filtre: expected a known key/ },
    { what: 'the likelihood classifier without labels to learn from', text: 'classifier: likelihood\n', expect: /likelihood\.yaml: calibration: expected a calibration for classifier: likelihood: labels/ },
    { what: 'no calibration for an optimal threshold', text: 'threshold: optimal\n', expect: /no-calibration\.yaml: calibration: expected a calibration/ },
    { what: 'a stored calibration the table does not have', text: 'threshold: optimal\ncalibration: stored\n', expect: /metadata singleshot\.calibration: expected a stored calibration/ },
  ])('a pipeline file with $what', async (c) => {
    const name = { 'an unknown key': 'bad-key', 'the likelihood classifier without labels to learn from': 'likelihood', 'no calibration for an optimal threshold': 'no-calibration', 'a stored calibration the table does not have': 'no-stored' }[c.what]!;
    const path = table(`ok-${name}`, { record: fixedList(rows(6, 8)), label: labels(6) });
    const { code, stderr } = await runCli(['analyze', path, '--pipeline', pipeline(name, c.text), '--out', join(dir, `out-p-${name}`)]);
    expect(code, stderr).toBe(2);
    expect(stderr).toMatch(c.expect);
  });

  it('a well-formed table of List<Float64> records with labels is analysed (exit 0)', async () => {
    const n = 40;
    const data = rows(n, 16);
    const path = table('good', { record: vectorFromArray(data, new List(new Field('item', new Float64(), true))), label: labels(n) });
    const out = join(dir, 'out-good');
    const { code, stdout, stderr } = await runCli(['analyze', path, '--pipeline', pipeline('good', 'threshold: midpoint\ncalibration: { labels: label, fraction: 0.5 }\n'), '--out', out, '--labels', 'label', '--json']);
    expect(code, stderr).toBe(0);
    const j = JSON.parse(stdout) as { rows: number; calibrationRows: number; scoredRows: number; meanError: { rate: number } };
    expect(j.rows).toBe(n);
    expect(j.calibrationRows).toBe(20);
    expect(j.scoredRows).toBe(20);
    // rows of label 1 are the rows of label 0 plus one: perfectly separable
    expect(j.meanError.rate).toBe(0);
  });
});
