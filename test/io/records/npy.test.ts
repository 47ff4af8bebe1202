/**
 * The .npy/.npz reader (src/io/records/npy.ts) against numpy's own files of every accepted element
 * type and layout (test/fixtures/make-npy.py writes them and what numpy reads back), and the
 * refusals: each one line naming the file and what was expected.
 */
import { readFileSync, writeFileSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readNpyLabels, readNpyRecords } from '../../../src/io/records/npy.ts';
import { InputError } from '../../../src/errors.ts';

const DIR = 'test/fixtures/npy';
const expected = JSON.parse(readFileSync(join(DIR, 'expected.json'), 'utf8')) as Record<string, { descr: string; real: number[][] | number[]; imag: number[][] | null }>;

describe('records written by numpy read back as numpy reads them', () => {
  it.each(Object.entries(expected))('%s', (name, want) => {
    const set = readNpyRecords(join(DIR, `${name}.npy`), undefined, 1);
    const real = (Array.isArray(want.real[0]) ? want.real : [want.real]) as number[][];
    expect([set.rows, set.samples]).toEqual([real.length, real[0]!.length]);
    expect(set.complex).toBe(want.imag !== null);
    const i = new Float64Array(set.samples), q = new Float64Array(set.samples);
    for (let r = 0; r < set.rows; r++) {
      set.row(r, i, q);
      expect(Array.from(i), `${name} row ${r}`).toEqual(real[r]);
      if (want.imag) expect(Array.from(q)).toEqual(want.imag[r]);
    }
    set.close();
  });

  it('applies the scale (signal units per stored unit, e.g. volts per ADC count)', () => {
    const set = readNpyRecords(join(DIR, 'records-i1.npy'), undefined, 0.5);
    const row = new Float64Array(5);
    set.row(1, row, null);
    expect(Array.from(row)).toEqual([2.5, -3, 3.5, 4, 4.5]);
  });

  it('reads the records and the labels of an .npz, compressed or not', () => {
    const set = readNpyRecords(join(DIR, 'archive.npz'), undefined, 1);
    expect([set.rows, set.samples, set.source]).toEqual([3, 5, `${join(DIR, 'archive.npz')}:records`]);
    const labels = readNpyLabels(join(DIR, 'archive.npz'), undefined);
    expect(Array.from(labels.values)).toEqual([0, 1, 1]);
    const only = readNpyRecords(join(DIR, 'archive-compressed.npz'), undefined, 1);
    const row = new Float64Array(5);
    only.row(2, row, null);
    expect(Array.from(row)).toEqual([10, 11, -12, 13, 127]);
  });

  it('reads labels as booleans or integers', () => {
    expect(Array.from(readNpyLabels(join(DIR, 'labels-bool.npy'), undefined).values)).toEqual([1, 0, 1]);
    expect(Array.from(readNpyLabels(join(DIR, 'labels-int.npy'), undefined).values)).toEqual([1, 0, 1]);
  });

  it('streams a file larger than one chunk in rows (each row as numpy has it)', () => {
    const dir = mkdtempSync(join(tmpdir(), 'singleshot-npy-'));
    const rows = 3000, samples = 700; // 8.4 MB of f4: more than two 4 MiB chunks
    const header = `{'descr': '<f4', 'fortran_order': False, 'shape': (${rows}, ${samples}), }`;
    const padded = header + ' '.repeat(64 - ((10 + header.length + 1) % 64)) + '\n';
    const head = new Uint8Array(10 + padded.length);
    head.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]);
    new DataView(head.buffer).setUint16(8, padded.length, true);
    head.set(new TextEncoder().encode(padded), 10);
    const data = Float32Array.from({ length: rows * samples }, (_, k) => (k % 9973) * 0.25);
    const file = join(dir, 'big.npy');
    writeFileSync(file, Buffer.concat([head, Buffer.from(data.buffer)]));
    const set = readNpyRecords(file, undefined, 1);
    const row = new Float64Array(samples);
    for (const r of [0, 1499, 2999, 7]) {
      set.row(r, row, null);
      expect(row[13]).toBe(((r * samples + 13) % 9973) * 0.25);
    }
    set.close();
  });
});

describe('refusals: one line naming the file and what was expected', () => {
  it.each([
    ['records-3d.npy', /records-3d\.npy: expected a 2-D array of records \(one record per row\), found an array of shape \(2, 2, 2\)/],
    ['records-f2.npy', /records-f2\.npy: expected a NumPy \.npy array, found element type '<f2'/],
    ['labels-bool.npy', /labels-bool\.npy: expected records of numbers, found booleans/],
    ['expected.json', /expected\.json: expected a NumPy \.npy array, found no \.npy magic at the start/],
    ['missing.npy', /missing\.npy: expected a NumPy \.npy array, found no such file/],
  ])('%s', (name, message) => {
    expect(() => readNpyRecords(join(DIR, name), undefined, 1)).toThrow(InputError);
    expect(() => readNpyRecords(join(DIR, name), undefined, 1)).toThrow(message);
  });

  it('labels with three values, an array the archive lacks, a file cut short', () => {
    expect(() => readNpyLabels(join(DIR, 'labels-three.npy'), undefined)).toThrow(/at most two distinct values/);
    expect(() => readNpyRecords(join(DIR, 'archive.npz'), 'nothing', 1)).toThrow(/archive\.npz: nothing: expected an array of records \(the archive holds records, labels/);
    const dir = mkdtempSync(join(tmpdir(), 'singleshot-npy-'));
    const cut = join(dir, 'cut.npy');
    writeFileSync(cut, readFileSync(join(DIR, 'records-le-f8.npy')).subarray(0, 150));
    expect(() => readNpyRecords(cut, undefined, 1)).toThrow(/cut\.npy: expected 3 × 5 elements of '<f8' after the header, found .* a file cut short/);
  });
});
