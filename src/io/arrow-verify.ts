/**
 * A structural check of Arrow IPC bytes before apache-arrow reads them. apache-arrow trusts the
 * flatbuffer metadata: a damaged vector length (one flipped bit) makes its decoders loop billions
 * of times, and a damaged row count makes every reader of the column run "forever". This check
 * walks the same metadata with bounds on everything — every table, vector, string and struct
 * inside its buffer, every block and buffer inside the file, counts no larger than the bytes can
 * hold — and refuses the file (one InputError naming it) at the first violation. It reads only
 * the metadata: the footer and each message's header, never the bodies.
 *
 * Layouts (Arrow columnar format, File.fbs / Schema.fbs / Message.fbs): a file is "ARROW1",
 * padding, a stream of messages, the Footer flatbuffer, its int32 length and "ARROW1"; a message
 * is an optional 0xFFFFFFFF marker, an int32 metadata length, the Message flatbuffer and its body.
 */
import { InputError } from '../errors.ts';

/** Random access to the bytes of the file. */
export type ReadAt = (offset: number, length: number) => Uint8Array;

/** Most rows a record batch may claim; more than any table the tool reads or writes. */
export const MAX_BATCH_ROWS = 2 ** 31 - 1;
/** Deepest nesting of fields (lists of structs of …). */
const MAX_FIELD_DEPTH = 32;

class Damage extends Error {}

/** The little-endian int32 at the start of `bytes` (a view of any buffer, Node's pooled ones too). */
function int32At(bytes: Uint8Array): number {
  return new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength).getInt32(0, true);
}

/** A bounds-checked reader of one flatbuffer (the bytes of one metadata block). */
class Flat {
  private readonly view: DataView;
  constructor(readonly bytes: Uint8Array) {
    this.view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  }

  private need(pos: number, size: number, what: string): void {
    if (!(Number.isInteger(pos) && pos >= 0 && pos + size <= this.bytes.length)) throw new Damage(`${what} outside its metadata`);
  }
  u8(pos: number): number { this.need(pos, 1, 'a byte'); return this.view.getUint8(pos); }
  u16(pos: number): number { this.need(pos, 2, 'a field offset'); return this.view.getUint16(pos, true); }
  i32(pos: number): number { this.need(pos, 4, 'an offset'); return this.view.getInt32(pos, true); }
  u32(pos: number): number { this.need(pos, 4, 'an offset'); return this.view.getUint32(pos, true); }
  i64(pos: number): number {
    this.need(pos, 8, 'a number');
    const v = this.view.getBigInt64(pos, true);
    if (v < 0n || v > BigInt(Number.MAX_SAFE_INTEGER)) throw new Damage(`a length or offset of ${v}`);
    return Number(v);
  }

  /** The table at `pos`, checked: its vtable inside the buffer. */
  table(pos: number): number {
    const vt = pos - this.i32(pos);
    const size = this.u16(vt);
    if (size < 4 || size % 2 !== 0) throw new Damage('a table without a proper vtable');
    this.need(vt, size, 'a vtable');
    this.need(pos, this.u16(vt + 2), 'a table');
    return pos;
  }
  /** Absolute position of field `id` of the table at `tab`, or 0 when absent. */
  field(tab: number, id: number): number {
    const vt = tab - this.i32(tab);
    const slot = 4 + 2 * id;
    if (slot >= this.u16(vt)) return 0;
    const off = this.u16(vt + slot);
    return off === 0 ? 0 : tab + off;
  }
  /** The table a field points at (0 when absent). */
  child(tab: number, id: number): number {
    const f = this.field(tab, id);
    return f === 0 ? 0 : this.table(f + this.u32(f));
  }
  /** The vector a field points at: its first element and length, all elements inside the buffer. */
  vector(tab: number, id: number, elementSize: number): { start: number; length: number } {
    const f = this.field(tab, id);
    if (f === 0) return { start: 0, length: 0 };
    const at = f + this.u32(f);
    const length = this.u32(at);
    this.need(at + 4, length * elementSize, 'a vector');
    return { start: at + 4, length };
  }
  /** Checks a string field (inside the buffer). */
  string(tab: number, id: number): void {
    this.vector(tab, id, 1);
  }
  /** The table a vector element (an offset) points at. */
  element(start: number, i: number): number {
    const at = start + 4 * i;
    return this.table(at + this.u32(at));
  }
}

/** Checks a [KeyValue] vector (custom metadata). */
function checkMetadata(fb: Flat, tab: number, id: number): void {
  const v = fb.vector(tab, id, 4);
  for (let i = 0; i < v.length; i++) {
    const kv = fb.element(v.start, i);
    fb.string(kv, 0);
    fb.string(kv, 1);
  }
}

/** Checks a Field and its children; returns the number of fields counted (itself and descendants). */
function checkField(fb: Flat, tab: number, depth: number): number {
  if (depth > MAX_FIELD_DEPTH) throw new Damage(`fields nested deeper than ${MAX_FIELD_DEPTH}`);
  fb.string(tab, 0);
  fb.child(tab, 3);
  const dictionary = fb.child(tab, 4);
  if (dictionary !== 0) fb.child(dictionary, 1);
  checkMetadata(fb, tab, 6);
  const children = fb.vector(tab, 5, 4);
  let count = 1;
  for (let i = 0; i < children.length; i++) count += checkField(fb, fb.element(children.start, i), depth + 1);
  return count;
}

/** Checks a Schema table; returns the number of fields (all levels). */
function checkSchema(fb: Flat, tab: number): number {
  const fields = fb.vector(tab, 1, 4);
  let count = 0;
  for (let i = 0; i < fields.length; i++) count += checkField(fb, fb.element(fields.start, i), 1);
  checkMetadata(fb, tab, 2);
  fb.vector(tab, 3, 8);
  return count;
}

/** Checks a RecordBatch table against the body length it comes with. */
function checkRecordBatch(fb: Flat, tab: number, bodyLength: number): void {
  const rows = fb.field(tab, 0) === 0 ? 0 : fb.i64(fb.field(tab, 0));
  const limit = Math.min(MAX_BATCH_ROWS, 8 * bodyLength + 65536);
  if (rows > limit) throw new Damage(`a record batch of ${rows} rows in a body of ${bodyLength} bytes`);
  const nodes = fb.vector(tab, 1, 16);
  for (let i = 0; i < nodes.length; i++) {
    if (fb.i64(nodes.start + 16 * i) > limit) throw new Damage(`a column of ${fb.i64(nodes.start + 16 * i)} values in a body of ${bodyLength} bytes`);
    fb.i64(nodes.start + 16 * i + 8);
  }
  const buffers = fb.vector(tab, 2, 16);
  for (let i = 0; i < buffers.length; i++) {
    const offset = fb.i64(buffers.start + 16 * i), length = fb.i64(buffers.start + 16 * i + 8);
    if (offset + length > bodyLength) throw new Damage(`a buffer at [${offset}, ${offset + length}) of a ${bodyLength}-byte body`);
  }
  fb.child(tab, 3);
  fb.vector(tab, 4, 8);
}

/** Message header types (MessageHeader union). */
const SCHEMA = 1, DICTIONARY_BATCH = 2, RECORD_BATCH = 3;

/** Checks one Message flatbuffer; returns its header type and body length. */
function checkMessage(bytes: Uint8Array): { type: number; bodyLength: number } {
  const fb = new Flat(bytes);
  const root = fb.table(fb.u32(0));
  const typeAt = fb.field(root, 1);
  const type = typeAt === 0 ? 0 : fb.u8(typeAt);
  const header = fb.child(root, 2);
  const bodyLength = fb.field(root, 3) === 0 ? 0 : fb.i64(fb.field(root, 3));
  checkMetadata(fb, root, 4);
  if (header === 0) throw new Damage('a message without a header');
  if (type === SCHEMA) checkSchema(fb, header);
  else if (type === RECORD_BATCH) checkRecordBatch(fb, header, bodyLength);
  else if (type === DICTIONARY_BATCH) {
    const data = fb.child(header, 1);
    if (data !== 0) checkRecordBatch(fb, data, bodyLength);
  } else throw new Damage(`a message of unknown kind ${type}`);
  return { type, bodyLength };
}

/** The metadata of the message at `offset` (after its 0xFFFFFFFF marker and length), its length and prefix size. */
function messageAt(read: ReadAt, offset: number, end: number): { meta: Uint8Array; prefix: number; length: number } | null {
  if (offset + 4 > end) throw new Damage('a message cut short');
  let prefix = 4;
  let length = int32At(read(offset, 4));
  if (length === -1) {
    if (offset + 8 > end) throw new Damage('a message cut short');
    length = int32At(read(offset + 4, 4));
    prefix = 8;
  }
  if (length === 0) return null;
  if (length < 0 || offset + prefix + length > end) throw new Damage(`message metadata of ${length} bytes beyond the end`);
  return { meta: read(offset + prefix, length), prefix, length };
}

/**
 * Where the Footer flatbuffer of an Arrow IPC file of `size` (≥ 18) bytes lies, as its trailer
 * (the footer's int32 length before the closing "ARROW1") says; `fits` when that span lies between
 * the opening magic and the trailer. The footer holds the file's schema with its metadata (the
 * only copy: apache-arrow's file writer puts no schema message at the head).
 */
export function footerSpan(read: ReadAt, size: number): { start: number; length: number; fits: boolean } {
  const length = int32At(read(size - 10, 4));
  const start = size - 10 - length;
  return { start, length, fits: length > 0 && start >= 8 };
}

/** Checks an Arrow IPC file of `size` bytes (magic already checked at both ends). */
function checkFile(read: ReadAt, size: number): void {
  const { start: footerStart, length: footerLength, fits } = footerSpan(read, size);
  if (!fits) throw new Damage(`a footer of ${footerLength} bytes`);
  const fb = new Flat(read(footerStart, footerLength));
  const footer = fb.table(fb.u32(0));
  const schema = fb.child(footer, 1);
  if (schema === 0) throw new Damage('a footer without a schema');
  checkSchema(fb, schema);
  checkMetadata(fb, footer, 4);
  for (const [id, wanted] of [[2, DICTIONARY_BATCH], [3, RECORD_BATCH]] as const) {
    const blocks = fb.vector(footer, id, 24);
    for (let i = 0; i < blocks.length; i++) {
      const at = blocks.start + 24 * i;
      const offset = fb.i64(at), metaLength = fb.i32(at + 8), bodyLength = fb.i64(at + 16);
      if (!(offset >= 8 && metaLength > 0 && offset + metaLength + bodyLength <= footerStart)) {
        throw new Damage(`a block at [${offset}, ${offset + metaLength + bodyLength}) outside the ${footerStart} bytes of messages`);
      }
      const m = messageAt(read, offset, offset + metaLength);
      if (m === null) throw new Damage('an empty message in a block');
      const message = checkMessage(m.meta);
      if (message.type !== wanted) throw new Damage(`a block of the wrong kind (${message.type})`);
      if (message.bodyLength > bodyLength) throw new Damage(`a body of ${message.bodyLength} bytes in a block of ${bodyLength}`);
    }
  }
}

/** Checks an Arrow IPC stream of `size` bytes: a schema message, then messages and their bodies. */
function checkStream(read: ReadAt, size: number): void {
  let offset = 0;
  let first = true;
  while (offset < size) {
    const m = messageAt(read, offset, size);
    if (m === null) return;
    const message = checkMessage(m.meta);
    if (first && message.type !== SCHEMA) throw new Damage('a stream that does not start with its schema');
    first = false;
    offset += m.prefix + m.length + message.bodyLength;
    if (offset > size) throw new Damage('a message body beyond the end');
  }
}

/**
 * Checks the structure of Arrow IPC bytes (a file, or a stream when `stream`); throws an
 * InputError naming `path` at the first violation (see the file comment).
 */
export function verifyArrowStructure(path: string, read: ReadAt, size: number, stream = false): void {
  try {
    if (stream) checkStream(read, size);
    else checkFile(read, size);
  } catch (e) {
    if (e instanceof Damage) throw new InputError(path, '', 'a readable Arrow table file', `a damaged file (${e.message})`);
    if (e instanceof RangeError) throw new InputError(path, '', 'a readable Arrow table file', 'a damaged file (its metadata points outside it)');
    throw e;
  }
}

/** `verifyArrowStructure` over bytes in memory. */
export function verifyArrowBytes(path: string, bytes: Uint8Array, stream = false): void {
  verifyArrowStructure(path, (offset, length) => bytes.subarray(offset, offset + length), bytes.length, stream);
}
