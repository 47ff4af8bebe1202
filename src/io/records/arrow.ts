/**
 * Records in an Arrow IPC file (what `run --keep-traces` writes, or pyarrow's `ipc.new_file`):
 * read whole, then laid out as table.ts describes.
 */
import { readArrowTable } from '../record-table.ts';
import type { LabelSet, RecordSet } from './record-set.ts';
import { tableLabels, tableRecords } from './table.ts';

/** The records of column `column` (default: `record`, else `in_phase`/`quadrature`) of the Arrow file `path`. */
export function readArrowRecords(path: string, column: string | undefined, scale: number): RecordSet {
  return tableRecords(path, readArrowTable(path), column, scale);
}

/** The labels in column `column` of the Arrow file `path`. */
export function readArrowLabels(path: string, column: string, outcomes: readonly string[] | null): LabelSet {
  return tableLabels(path, readArrowTable(path), column, outcomes);
}
