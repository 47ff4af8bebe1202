/**
 * Every record reader through the one way in (src/io/records/open.ts): the same records as numpy,
 * h5py and pyarrow write them (test/fixtures/make-formats.py) read back as the same numbers, with
 * the labels and the attributes each file carries; and the refusals, one line each naming the file
 * (and dataset, array or column) and what was expected.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../../src/errors.ts';
import { locateRecords, openLabels, openRecords } from '../../../src/io/records/open.ts';
import type { RecordSet } from '../../../src/io/records/record-set.ts';

const DIR = 'test/fixtures/formats';
const at = (name: string) => join(DIR, name);
const want = JSON.parse(readFileSync(at('expected.json'), 'utf8')) as {
  real: number[][]; iq_real: number[][]; iq_imag: number[][]; adc_scaled: number[][]; labels: number[];
  attributes: { sample_rate: number; carrier_frequency: number; window_length: number };
};

function rowsOf(set: RecordSet): { i: number[][]; q: number[][] } {
  const i = new Float64Array(set.samples), q = new Float64Array(set.samples);
  const out = { i: [] as number[][], q: [] as number[][] };
  for (let r = 0; r < set.rows; r++) {
    set.row(r, i, q);
    out.i.push(Array.from(i));
    if (set.complex) out.q.push(Array.from(q));
  }
  set.close();
  return out;
}

async function refusal(p: Promise<unknown>): Promise<string> {
  const e = await p.then(() => null, (x: unknown) => x);
  expect(e).toBeInstanceOf(InputError);
  const text = (e as Error).message;
  expect(text).not.toContain('\n');
  return text;
}

describe('the same records in every format read back alike', () => {
  it.each(['real.npy', 'both.npz', 'both.npz:records', 'records.h5:/readout/records', 'records.parquet', 'records.arrow', 'records.arrow:record'])('%s', async (spec) => {
    const set = await openRecords(at(spec));
    expect([set.rows, set.samples, set.complex]).toEqual([7, 6, false]);
    expect(rowsOf(set).i).toEqual(want.real);
  });

  it.each(['both.npz:iq', 'records.h5:/readout/iq', 'iq.parquet'])('complex records %s', async (spec) => {
    const set = await openRecords(at(spec));
    expect(set.complex).toBe(true);
    const { i, q } = rowsOf(set);
    expect(i).toEqual(want.iq_real);
    expect(q).toEqual(want.iq_imag);
  });

  it('scales integer ADC counts by the dataset\'s scale attribute and the caller\'s', async () => {
    const got = rowsOf(await openRecords(at('records.h5:/readout/adc'), 2)).i;
    got.forEach((row, r) => row.forEach((x, k) => expect(x).toBeCloseTo(2 * want.adc_scaled[r]![k]!, 12)));
  });

  it('carries the attributes the file states (HDF5 group and file attributes; Arrow and Parquet metadata)', async () => {
    const h5 = await openRecords(at('records.h5:/readout/records'));
    expect(h5.attributes).toMatchObject({ sampleRate: 2.5e6, carrierFrequency: 3e5, windowLength: 2.4e-6, unit: 'V' });
    h5.close();
    for (const f of ['records.parquet', 'records.arrow']) expect((await openRecords(at(f))).attributes).toMatchObject({ sampleRate: 2.5e6, carrierFrequency: 3e5 });
  });

  it.each([
    ['labels.npy', 'real.npy'], ['labels', 'both.npz'], ['/readout/labels', 'records.h5:/readout/records'],
    ['label', 'records.parquet'], ['label', 'records.arrow'], ['records.parquet:label', 'real.npy'],
  ])('labels %s beside %s', async (labels, records) => {
    const set = await openLabels(labels.startsWith('/') || !labels.includes('.') ? labels : at(labels), at(records), null);
    expect(Array.from(set.values)).toEqual(want.labels);
  });
});

describe('refusals name the file, the place in it and what was expected', () => {
  it.each([
    ['records.csv', /records\.csv.*Arrow IPC.*Parquet.*NumPy.*HDF5.*ending in \.csv/],
    ['missing.npy', /missing\.npy.*no such file/],
    ['records.h5', /records\.h5.*dataset path.*FILE\.h5:\/readout\/records/],
    ['records.h5:/readout/nothing', /records\.h5.*\/readout\/nothing.*no such dataset/],
    ['records.h5:/readout/cube', /records\.h5.*\/readout\/cube.*2-D dataset.*shape \(2, 2, 2\)/],
    ['both.npz:nothing', /both\.npz.*holds.*records.*no such array/],
    ['records.parquet:nothing', /records\.parquet.*column "nothing".*the table has record, label/],
    ['labels.npy:x', /labels\.npy/],
    ['expected.json', /expected\.json.*ending in \.json/],
  ])('%s', async (spec, pattern) => {
    expect(await refusal(openRecords(at(spec)))).toMatch(pattern);
  });

  it('a file that is not what its name says', async () => {
    for (const [name, format] of [['fake.parquet', 'Parquet'], ['fake.h5', 'HDF5'], ['fake.arrow', 'Arrow']]) {
      const { mkdtempSync, writeFileSync } = await import('node:fs');
      const dir = mkdtempSync(join((await import('node:os')).tmpdir(), 'ss-formats-'));
      writeFileSync(join(dir, name!), 'not a table at all');
      expect(await refusal(openRecords(join(dir, name!) + (format === 'HDF5' ? ':/x' : '')))).toContain(format);
    }
  });

  it.each(['real.npy', 'both.npz', 'records.h5:/readout/records', 'records.parquet', 'records.arrow'])('%s cut short or overwritten reads as one refusal, never a crash or a partial set', async (spec) => {
    const { mkdtempSync, readFileSync: read, writeFileSync } = await import('node:fs');
    const dir = mkdtempSync(join((await import('node:os')).tmpdir(), 'ss-damaged-'));
    const [file, inner] = spec.split(':');
    const bytes = read(at(file!));
    const damaged: [string, Uint8Array][] = [['cut', bytes.subarray(0, Math.floor(bytes.length * 0.6))], ['overwritten', bytes.map((b, k) => (k > bytes.length / 3 ? (b * 7 + k) & 255 : b))]];
    for (const [how, b] of damaged) {
      const path = join(dir, `${how}-${file}`);
      writeFileSync(path, b);
      const outcome: { i: number[][] } | Error = await openRecords(inner ? `${path}:${inner}` : path).then((set) => rowsOf(set), (e: unknown) => e as Error);
      if (outcome instanceof Error) {
        expect(outcome, `${how}: ${outcome.message}`).toBeInstanceOf(InputError);
        expect(outcome.message).toContain(path);
      } else {
        // an overwrite the format cannot notice (raw samples) reads as finite numbers of the right shape
        expect(how).toBe('overwritten');
        expect(outcome.i).toHaveLength(7);
        for (const row of outcome.i) for (const x of row) expect(Number.isFinite(x)).toBe(true);
      }
    }
  });

  it('labels with more than two values, or in a dataset of the wrong shape', async () => {
    expect(await refusal(openLabels('/readout/records', at('records.h5:/readout/records'), null))).toMatch(/\/readout\/records.*1-D dataset of labels/);
  });

  it('locates FILE:NAME only after a known extension (a colon elsewhere stays in the path)', () => {
    expect(locateRecords('/data/run:3/shots.h5:/a/b')).toEqual({ path: '/data/run:3/shots.h5', format: 'hdf5', inner: '/a/b' });
    expect(locateRecords('x.NPZ:records')).toEqual({ path: 'x.NPZ', format: 'npy', inner: 'records' });
  });
});
