/**
 * One way in for recorded traces, whatever the format: a file path, optionally followed by
 * `:NAME` naming what inside it holds the records — an HDF5 dataset (`run.h5:/readout/records`),
 * an .npz array (`shots.npz:records`) or a table column (`traces.parquet:trace`). The format is
 * the file's extension. Labels come the same way from another file, or by bare NAME from the
 * records' own file (a column, dataset or array there).
 */
import { extname } from 'node:path';
import { InputError } from '../../errors.ts';
import { readArrowLabels, readArrowRecords } from './arrow.ts';
import { readHdf5Labels, readHdf5Records } from './hdf5.ts';
import { readNpyLabels, readNpyRecords } from './npy.ts';
import { readParquetTable } from './parquet.ts';
import type { LabelSet, RecordSet } from './record-set.ts';
import { tableLabels, tableRecords } from './table.ts';

type Format = 'arrow' | 'parquet' | 'npy' | 'hdf5';

const EXTENSIONS: Record<string, Format> = {
  '.arrow': 'arrow', '.feather': 'arrow', '.ipc': 'arrow',
  '.parquet': 'parquet', '.pq': 'parquet',
  '.npy': 'npy', '.npz': 'npy',
  '.h5': 'hdf5', '.hdf5': 'hdf5', '.hdf': 'hdf5', '.he5': 'hdf5',
};

/** What the readers accept, for messages. */
export const RECORD_FORMATS = 'Arrow IPC (.arrow), Parquet (.parquet), NumPy (.npy, .npz) or HDF5 (.h5:/dataset)';

/** A records argument split into file, format and inner name. */
export interface RecordsLocation {
  path: string;
  format: Format;
  /** The dataset, array or column inside the file; undefined for the file's default. */
  inner: string | undefined;
}

/** Parses `FILE` or `FILE:NAME` (the file must end in a known extension). */
export function locateRecords(spec: string): RecordsLocation {
  const ext = Object.keys(EXTENSIONS).join('|').replace(/\./g, '\\.');
  const m = new RegExp(`^(.*?(?:${ext})):(.+)$`, 'i').exec(spec);
  const path = m ? m[1]! : spec;
  const format = EXTENSIONS[extname(path).toLowerCase()];
  if (!format) throw new InputError(spec, '', `records in ${RECORD_FORMATS}`, extname(path) ? `a file ending in ${extname(path)}` : 'a file without an extension');
  return { path, format, inner: m ? m[2] : undefined };
}

/** Records from `spec`, samples times `scale` (signal units per stored unit); a row with a NaN or infinite sample is refused as it is read. */
export async function openRecords(spec: string, scale = 1): Promise<RecordSet> {
  if (!(Number.isFinite(scale) && scale !== 0)) throw new InputError(spec, 'scale', 'a finite, non-zero number of signal units per stored unit', String(scale));
  return finiteRows(await readRecords(locateRecords(spec), spec, scale));
}

function readRecords(at: RecordsLocation, spec: string, scale: number): RecordSet | Promise<RecordSet> {
  switch (at.format) {
    case 'arrow': return readArrowRecords(at.path, at.inner, scale);
    case 'parquet': return readParquetTable(at.path).then((t) => tableRecords(at.path, t, at.inner, scale));
    case 'npy': return readNpyRecords(at.path, at.inner, scale);
    case 'hdf5': {
      if (at.inner === undefined) throw new InputError(spec, '', 'a dataset path after the file, e.g. FILE.h5:/readout/records', 'no dataset named');
      return readHdf5Records(at.path, at.inner, scale);
    }
  }
}

function finiteRows(set: RecordSet): RecordSet {
  const allFinite = (x: Float64Array) => {
    for (let k = 0; k < set.samples; k++) if (!Number.isFinite(x[k]!)) return false;
    return true;
  };
  return {
    ...set,
    row(r, outI, outQ) {
      set.row(r, outI, outQ);
      if (!allFinite(outI) || (set.complex && outQ && !allFinite(outQ))) throw new InputError(set.source, `row ${r}`, 'finite samples', 'NaN or infinite values');
    },
  };
}

/**
 * Labels from `spec`: a file (with its own `:NAME`), or a bare NAME inside the records file
 * `records` (a column, HDF5 dataset or .npz array). `outcomes` names the two outcomes in index order
 * where the file does not.
 */
export async function openLabels(spec: string, records: string, outcomes: readonly string[] | null): Promise<LabelSet> {
  let at: RecordsLocation;
  try {
    at = locateRecords(spec);
  } catch {
    at = { ...locateRecords(records), inner: spec };
  }
  const named = (set: LabelSet): LabelSet => (outcomes ? { ...set, names: [...outcomes] } : set);
  switch (at.format) {
    case 'arrow': return readArrowLabels(at.path, at.inner ?? 'label', outcomes);
    case 'parquet': return tableLabels(at.path, await readParquetTable(at.path), at.inner ?? 'label', outcomes);
    case 'npy': return named(readNpyLabels(at.path, at.inner));
    case 'hdf5': {
      if (at.inner === undefined) throw new InputError(spec, '', 'a dataset path after the file, e.g. FILE.h5:/readout/labels', 'no dataset named');
      return named(await readHdf5Labels(at.path, at.inner));
    }
  }
}
