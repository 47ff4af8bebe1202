import { createReadStream, createWriteStream } from 'node:fs';
import { Writable } from 'node:stream';
import { RecordBatchReader, Table as JsTable, tableToIPC } from 'apache-arrow';
import * as pq from 'parquet-wasm';
const src = process.argv[2]!, dst = process.argv[3]!;
const reader = await RecordBatchReader.from(createReadStream(src));
await reader.open();
const schema = reader.schema;
const kv = new Map<string, string>(schema.metadata);
const iter = reader[Symbol.asyncIterator]();
const stream = new ReadableStream({
  async pull(ctrl) {
    const n = await iter.next();
    if (n.done) { ctrl.close(); return; }
    const t = pq.Table.fromIPCStream(tableToIPC(new JsTable([n.value]), 'stream'));
    for (let i = 0; i < t.numBatches; i++) ctrl.enqueue(t.recordBatch(i));
  },
});
const props = new pq.WriterPropertiesBuilder().setCompression(pq.Compression.ZSTD).setKeyValueMetadata(kv).build();
const out = await pq.transformParquetStream(stream, props);
await out.pipeTo(Writable.toWeb(createWriteStream(dst)));
console.log('done');
