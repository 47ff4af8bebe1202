/**
 * A Parquet copy of an Arrow table file (`--parquet`), for DuckDB, polars and other Parquet
 * readers: streamed record batch by record batch (parquet-wasm's writer), so a traces table
 * larger than memory converts; zstd-compressed. It carries the same metadata: the Arrow schema
 * with every field's unit (Parquet's ARROW:schema, which pyarrow reads back), the table's
 * `singleshot.*` metadata as Parquet key-value metadata (DuckDB's parquet_kv_metadata, polars'
 * read_parquet_metadata), and `singleshot.units`, a JSON object of column → unit, for readers
 * that drop Arrow field metadata. Written through AtomicFile, so a Parquet file is whole or absent.
 */
import { createReadStream } from 'node:fs';
import { join } from 'node:path';
import { RecordBatchReader, Table, tableToIPC } from 'apache-arrow';
import { AtomicFile } from './atomic-file.ts';
import { META_PREFIX } from './metadata.ts';

/** Writes `arrowPath` (an Arrow IPC file) as Parquet at `parquetPath`. */
export async function writeParquetCopy(arrowPath: string, parquetPath: string): Promise<void> {
  // loaded on first use: its WebAssembly would cost every other command start-up time
  const { Compression, Table: WasmTable, transformParquetStream, WriterPropertiesBuilder } = await import('parquet-wasm');
  const reader = await RecordBatchReader.from(createReadStream(arrowPath));
  await reader.open();
  const schema = reader.schema;
  const metadata = new Map<string, string>(schema.metadata);
  const units = Object.fromEntries(schema.fields.flatMap((f) => (f.metadata.has('unit') ? [[f.name, f.metadata.get('unit')!]] : [])));
  metadata.set(`${META_PREFIX}units`, JSON.stringify(units));
  const batches = reader[Symbol.asyncIterator]();
  let empty = true;
  const stream = new ReadableStream({
    async pull(controller) {
      const next = await batches.next();
      if (next.done) {
        // an empty table still needs its schema: one batch of no rows
        if (empty) controller.enqueue(WasmTable.fromIPCStream(tableToIPC(new Table(schema), 'stream')).recordBatch(0));
        controller.close();
        return;
      }
      empty = false;
      const table = WasmTable.fromIPCStream(tableToIPC(new Table([next.value]), 'stream'));
      for (let i = 0; i < table.numBatches; i++) controller.enqueue(table.recordBatch(i)!);
    },
  });
  const properties = new WriterPropertiesBuilder().setCompression(Compression.ZSTD).setKeyValueMetadata(metadata).build();
  const file = new AtomicFile(parquetPath);
  try {
    const bytes = await transformParquetStream(stream, properties);
    for await (const chunk of bytes as unknown as AsyncIterable<Uint8Array>) file.write(chunk);
    file.commit();
  } catch (e) {
    file.abort();
    throw e;
  }
}

/** Adds a Parquet copy of every Arrow table in `files` (names in `dir`); returns the names with the copies after their tables. */
export async function withParquetCopies(dir: string, files: readonly string[]): Promise<string[]> {
  const out: string[] = [];
  for (const name of files) {
    out.push(name);
    if (!name.endsWith('.arrow')) continue;
    const copy = name.replace(/\.arrow$/, '.parquet');
    await writeParquetCopy(join(dir, name), join(dir, copy));
    out.push(copy);
  }
  return out;
}
