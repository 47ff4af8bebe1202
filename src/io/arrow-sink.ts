/**
 * Streaming Arrow IPC files with bounded memory. apache-arrow's writers queue every message in
 * memory until someone drains them, and they keep references to the batch buffers instead of
 * copying. Handing the writer a sink that writes each message to disk synchronously (the
 * writer accepts any AsyncByteQueue as its sink) fixes both: nothing accumulates, and a batch's
 * buffers may be reused as soon as `write` returns.
 */
import { AsyncByteQueue, RecordBatchFileWriter, type RecordBatch, type Schema } from 'apache-arrow';
import { AtomicFile } from './atomic-file.ts';

class FileSink extends AsyncByteQueue {
  constructor(private readonly file: AtomicFile) {
    super();
  }
  override write(value: ArrayBufferView | ArrayBuffer | string | ArrayLike<number>): void {
    const bytes = value instanceof Uint8Array ? value
      : ArrayBuffer.isView(value) ? new Uint8Array(value.buffer, value.byteOffset, value.byteLength)
      : typeof value === 'string' ? new TextEncoder().encode(value)
      : new Uint8Array(value as ArrayBuffer);
    if (bytes.byteLength > 0) this.file.write(bytes);
  }
}

/** An Arrow IPC file written batch by batch, atomically renamed on `finish`. */
export class ArrowFileStream {
  private readonly file: AtomicFile;
  private readonly writer: RecordBatchFileWriter;
  private open = true;
  rows = 0;

  constructor(path: string, schema: Schema) {
    this.file = new AtomicFile(path);
    this.writer = new RecordBatchFileWriter();
    this.writer.reset(new FileSink(this.file) as unknown as AsyncByteQueue, schema);
  }

  get path(): string {
    return this.file.path;
  }

  write(batch: RecordBatch): void {
    this.writer.write(batch);
    this.rows += batch.numRows;
  }

  /** Writes the footer and renames the file into place. */
  finish(): void {
    if (!this.open) return;
    this.writer.finish();
    this.file.commit();
    this.open = false;
  }

  /** Discards the partial file. */
  abort(): void {
    if (!this.open) return;
    this.open = false;
    this.file.abort();
  }
}
