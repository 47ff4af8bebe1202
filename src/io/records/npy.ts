/**
 * NumPy's .npy and .npz files (the NPY format, versions 1.0, 2.0 and 3.0: the magic "\x93NUMPY",
 * a header that is a Python dict literal with 'descr', 'fortran_order' and 'shape', then the
 * data; an .npz is a zip of .npy files, one per array). Records are the rows of a 2-D array
 * (a 1-D array is one record); accepted element types: floats (f2 is not), signed and unsigned
 * integers of 1–8 bytes (ADC counts, scaled by the caller's scale), complex (c8, c16: I and Q),
 * and booleans for labels; either byte order. A C-ordered .npy streams from the file in chunks;
 * a Fortran-ordered one, or any array inside an .npz, is read whole.
 */
import { closeSync, fstatSync, readSync } from 'node:fs';
import { openInputFile, readInputFile } from '../fs-errors.ts';
import { unzipSync } from 'fflate';
import { InputError } from '../../errors.ts';
import { outcomeIndices, type LabelSet, type RecordSet } from './record-set.ts';

/** An element type a record array may have. */
interface Element {
  kind: 'f' | 'i' | 'u' | 'c' | 'b';
  bytes: number;
  little: boolean;
}

/** A parsed .npy header. */
export interface NpyHeader {
  element: Element;
  descr: string;
  fortran: boolean;
  shape: number[];
  /** Byte offset of the data. */
  dataOffset: number;
}

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];

/** Parses the header at the start of `bytes` (at least the header's length); InputError naming `source` when it is not one. */
export function parseNpyHeader(bytes: Uint8Array, source: string): NpyHeader {
  const bad = (what: string): never => { throw new InputError(source, '', 'a NumPy .npy array', what); };
  if (bytes.length < 10 || MAGIC.some((m, i) => bytes[i] !== m)) bad('no .npy magic at the start');
  const major = bytes[6]!;
  if (major < 1 || major > 3) bad(`.npy format version ${major}`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const lengthBytes = major === 1 ? 2 : 4;
  const headerLength = major === 1 ? view.getUint16(8, true) : view.getUint32(8, true);
  const start = 8 + lengthBytes;
  if (bytes.length < start + headerLength) bad('a header cut short');
  const text = new TextDecoder(major === 3 ? 'utf-8' : 'latin1').decode(bytes.subarray(start, start + headerLength));
  const descr = /'descr'\s*:\s*'([^']*)'/.exec(text)?.[1];
  const fortran = /'fortran_order'\s*:\s*(True|False)/.exec(text)?.[1];
  const shapeText = /'shape'\s*:\s*\(([^)]*)\)/.exec(text)?.[1];
  if (descr === undefined || fortran === undefined || shapeText === undefined) bad('a header without descr, fortran_order and shape');
  const shape = shapeText!.split(',').map((s) => s.trim()).filter((s) => s !== '').map(Number);
  if (shape.some((n) => !Number.isSafeInteger(n) || n < 0)) bad(`a shape of (${shapeText})`);
  const m = /^([<>|=])([fiucb])(\d+)$/.exec(descr!);
  if (!m) bad(`element type '${descr}' (expected floats, integers, complex or booleans)`);
  const kind = m![2] as Element['kind'];
  const bytesPer = Number(m![3]);
  const sizes: Record<Element['kind'], number[]> = { f: [4, 8], i: [1, 2, 4, 8], u: [1, 2, 4, 8], c: [8, 16], b: [1] };
  if (!sizes[kind].includes(bytesPer)) bad(`element type '${descr}' (floats of 4 or 8 bytes, integers of 1–8, complex of 8 or 16)`);
  return { element: { kind, bytes: bytesPer, little: m![1] !== '>' }, descr: descr!, fortran: fortran === 'True', shape, dataOffset: start + headerLength };
}

/** Reads element `i` of `view` (real part, or imaginary with `imag`) as a number. */
function readElement(view: DataView, at: number, e: Element, imag: boolean): number {
  const le = e.little;
  switch (e.kind) {
    case 'f': return e.bytes === 4 ? view.getFloat32(at, le) : view.getFloat64(at, le);
    case 'c': return e.bytes === 8 ? view.getFloat32(at + (imag ? 4 : 0), le) : view.getFloat64(at + (imag ? 8 : 0), le);
    case 'b': return view.getUint8(at);
    case 'i':
      return e.bytes === 1 ? view.getInt8(at) : e.bytes === 2 ? view.getInt16(at, le) : e.bytes === 4 ? view.getInt32(at, le) : Number(view.getBigInt64(at, le));
    case 'u':
      return e.bytes === 1 ? view.getUint8(at) : e.bytes === 2 ? view.getUint16(at, le) : e.bytes === 4 ? view.getUint32(at, le) : Number(view.getBigUint64(at, le));
  }
}

/** Rows and samples of a records array; InputError for other shapes. */
function recordShape(h: NpyHeader, source: string): [number, number] {
  if (h.shape.length === 1) return [1, h.shape[0]!];
  if (h.shape.length === 2) return [h.shape[0]!, h.shape[1]!];
  throw new InputError(source, '', 'a 2-D array of records (one record per row)', `an array of shape (${h.shape.join(', ')})`);
}

/** The records of an .npy array held in memory (an .npz member, or a Fortran-ordered file). */
function recordsInMemory(bytes: Uint8Array, source: string, scale: number): RecordSet {
  const h = parseNpyHeader(bytes, source);
  if (h.element.kind === 'b') throw new InputError(source, '', 'records of numbers', 'booleans');
  const [rows, samples] = recordShape(h, source);
  const size = h.element.bytes;
  if (bytes.length < h.dataOffset + rows * samples * size) throw new InputError(source, '', `${rows} × ${samples} elements of '${h.descr}'`, 'a file cut short');
  const view = new DataView(bytes.buffer, bytes.byteOffset + h.dataOffset);
  const complex = h.element.kind === 'c';
  const at = (r: number, k: number) => (h.fortran ? k * rows + r : r * samples + k) * size;
  return {
    source, rows, samples, complex, attributes: {}, metadata: new Map(), column: () => null,
    row(r, outI, outQ) {
      for (let k = 0; k < samples; k++) {
        outI[k] = scale * readElement(view, at(r, k), h.element, false);
        if (complex && outQ) outQ[k] = scale * readElement(view, at(r, k), h.element, true);
      }
    },
    close() {},
  };
}

/** Rows read from the file at once when streaming (about 4 MiB). */
const CHUNK_BYTES = 4 * 1024 * 1024;

/** The records of a C-ordered .npy file, read from disk in chunks of rows. */
function recordsStreamed(path: string, scale: number): RecordSet {
  const fd = openInputFile(path, 'a NumPy .npy array');
  try {
    const head = new Uint8Array(Math.min(65536 + 12, fstatSync(fd).size));
    readSync(fd, head, 0, head.length, 0);
    const h = parseNpyHeader(head, path);
    if (h.fortran) {
      closeSync(fd);
      return recordsInMemory(readInputFile(path, 'a NumPy .npy array'), path, scale);
    }
    if (h.element.kind === 'b') throw new InputError(path, '', 'records of numbers', 'booleans');
    const [rows, samples] = recordShape(h, path);
    const rowBytes = samples * h.element.bytes;
    const size = fstatSync(fd).size;
    if (size < h.dataOffset + rows * rowBytes) throw new InputError(path, '', `${rows} × ${samples} elements of '${h.descr}' after the header`, `${size} bytes in all: a file cut short`);
    const chunkRows = Math.max(1, Math.floor(CHUNK_BYTES / Math.max(1, rowBytes)));
    const buffer = new Uint8Array(chunkRows * rowBytes);
    const view = new DataView(buffer.buffer);
    let first = -1, count = 0;
    const complex = h.element.kind === 'c';
    const descriptor = fd;
    return {
      source: path, rows, samples, complex, attributes: {}, metadata: new Map(), column: () => null,
      row(r, outI, outQ) {
        if (!(r >= first && r < first + count)) {
          first = r;
          count = Math.min(chunkRows, rows - r);
          readSync(descriptor, buffer, 0, count * rowBytes, h.dataOffset + r * rowBytes);
        }
        const base = (r - first) * rowBytes;
        for (let k = 0; k < samples; k++) {
          outI[k] = scale * readElement(view, base + k * h.element.bytes, h.element, false);
          if (complex && outQ) outQ[k] = scale * readElement(view, base + k * h.element.bytes, h.element, true);
        }
      },
      close() { closeSync(descriptor); },
    };
  } catch (e) {
    try { closeSync(fd); } catch { /* already closed */ }
    throw e;
  }
}

/** The members of an .npz file (name without .npy → its bytes); InputError when it is no zip of arrays. */
export function npzMembers(path: string): Map<string, Uint8Array> {
  const bytes = readInputFile(path, 'a NumPy .npz archive');
  let files: Record<string, Uint8Array>;
  try {
    files = unzipSync(bytes);
  } catch {
    throw new InputError(path, '', 'a NumPy .npz archive (a zip of .npy arrays)', 'something that does not unzip');
  }
  return new Map(Object.entries(files).filter(([n]) => n.endsWith('.npy')).map(([n, b]) => [n.slice(0, -4), b]));
}

/**
 * The records of `path` (.npy), or of array `member` of an .npz (default: its only array, or
 * 'records'), scaled by `scale` (signal units per stored unit).
 */
export function readNpyRecords(path: string, member: string | undefined, scale: number): RecordSet {
  if (!path.toLowerCase().endsWith('.npz')) {
    if (member !== undefined) throw new InputError(path, member, 'nothing after the file name (an .npy file holds one array; arrays are named only in an .npz)', `":${member}"`);
    return recordsStreamed(path, scale);
  }
  const members = npzMembers(path);
  const names = [...members.keys()];
  const name = member ?? (names.length === 1 ? names[0]! : names.includes('records') ? 'records' : undefined);
  if (name === undefined || !members.has(name)) {
    throw new InputError(path, member ?? '', `an array of records (the archive holds ${names.join(', ') || 'no arrays'}; name one as FILE.npz:NAME)`, member ? 'no such array' : 'no array called records');
  }
  return recordsInMemory(members.get(name)!, `${path}:${name}`, scale);
}

/** A label array (.npy, or a member of an .npz): one label per record, at most two distinct values. */
export function readNpyLabels(path: string, member: string | undefined): LabelSet {
  const source = member ? `${path}:${member}` : path;
  if (member !== undefined && !path.toLowerCase().endsWith('.npz')) throw new InputError(path, member, 'nothing after the file name (an .npy file holds one array; arrays are named only in an .npz)', `":${member}"`);
  let bytes: Uint8Array;
  if (path.toLowerCase().endsWith('.npz')) {
    const members = npzMembers(path);
    const name = member ?? 'labels';
    const b = members.get(name);
    if (!b) throw new InputError(path, name, `an array of labels (the archive holds ${[...members.keys()].join(', ')})`, 'no such array');
    bytes = b;
  } else bytes = readInputFile(path, 'a NumPy .npy array of labels');
  const h = parseNpyHeader(bytes, source);
  if (h.shape.length !== 1) throw new InputError(source, '', 'a 1-D array of labels', `an array of shape (${h.shape.join(', ')})`);
  if (h.element.kind === 'c') throw new InputError(source, '', 'labels of integers or booleans', 'complex numbers');
  const n = h.shape[0]!;
  if (bytes.length < h.dataOffset + n * h.element.bytes) throw new InputError(source, '', `${n} labels`, 'a file cut short');
  const view = new DataView(bytes.buffer, bytes.byteOffset + h.dataOffset);
  const raw = Array.from({ length: n }, (_, i) => readElement(view, i * h.element.bytes, h.element, false));
  if (raw.some((v) => !Number.isFinite(v))) throw new InputError(source, '', 'finite labels', 'NaN or infinite values');
  const mapped = outcomeIndices(raw);
  if (!mapped) throw new InputError(source, '', 'labels with at most two distinct values (the two outcomes)', `${new Set(raw).size} distinct values`);
  return { source, ...mapped };
}
