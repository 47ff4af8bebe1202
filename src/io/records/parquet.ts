/**
 * Records in a Parquet file (parquet-wasm: the file read into an Arrow table), laid out as in an
 * Arrow file (table.ts): a column of sample lists, labels in a column, attributes in the
 * key-value metadata. The whole file is read at once.
 */
import { readInputFile } from '../fs-errors.ts';
import { tableFromIPC, type Table } from 'apache-arrow';
import { InputError } from '../../errors.ts';

/** A Parquet file as an Arrow table; InputError when missing or not Parquet. */
export async function readParquetTable(path: string): Promise<Table> {
  const bytes = readInputFile(path, 'a Parquet file');
  // loaded on first use: its WebAssembly would cost every other command start-up time
  const { readParquet } = await import('parquet-wasm');
  try {
    return tableFromIPC(readParquet(bytes).intoIPCStream());
  } catch {
    throw new InputError(path, '', 'a Parquet file with a column of sample lists', 'something Parquet cannot read');
  }
}
