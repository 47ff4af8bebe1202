/**
 * Records in an HDF5 file (h5wasm): a 2-D dataset named by its path inside the file
 * (`file.h5:/readout/records`), one record per row, floats or integers (scaled), or complex as
 * h5py writes it (a compound of r and i); labels from a 1-D dataset; attributes from the
 * dataset's attributes, else its group's, else the file's (sample_rate, carrier_frequency,
 * carrier_phase, window_start, window_length, scale, unit). Rows are read in slices, so a
 * dataset larger than memory streams.
 */
import { closeSync, existsSync, openSync, readSync } from 'node:fs';
import type h5wasmModule from 'h5wasm/node';
import { InputError } from '../../errors.ts';
import { outcomeIndices, type LabelSet, type RecordAttributes, type RecordSet } from './record-set.ts';

type H5File = InstanceType<typeof h5wasmModule.File>;
type H5Dataset = { shape: number[] | null; dtype: unknown; attrs: Record<string, { value: unknown }>; slice(ranges: [number, number][]): unknown };

/** Rows read at once. */
const SLICE_ROWS = 4096;

/** HDF5's signature, found at byte 0, 512, 1024, 2048, … (a user block may come first). */
const SIGNATURE = Buffer.from([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a]);

function hasSignature(path: string): boolean {
  const fd = openSync(path, 'r');
  try {
    const probe = Buffer.alloc(8);
    for (let at = 0; at < 1 << 30; at = at === 0 ? 512 : at * 2) {
      if (readSync(fd, probe, 0, 8, at) < 8) return false;
      if (probe.equals(SIGNATURE)) return true;
    }
    return false;
  } finally {
    closeSync(fd);
  }
}

/**
 * The library, loaded on first use (its WebAssembly costs start-up time every other command would
 * pay), with HDF5's errors thrown (and caught here) instead of printed to stderr.
 */
let library: Promise<typeof h5wasmModule> | null = null;
function loadLibrary(): Promise<typeof h5wasmModule> {
  library ??= import('h5wasm/node').then(async ({ default: h5wasm }) => {
    const module = await h5wasm.ready;
    module.activate_throwing_error_handler();
    return h5wasm;
  });
  return library;
}

async function open(path: string): Promise<H5File> {
  const h5wasm = await loadLibrary();
  if (!existsSync(path)) throw new InputError(path, '', 'an HDF5 file', 'no such file');
  // checked here, since the library prints its own diagnostics on a file it cannot open
  let signed: boolean;
  try {
    signed = hasSignature(path);
  } catch (e) {
    throw new InputError(path, '', 'an HDF5 file', `an unreadable file (${(e as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  if (!signed) throw new InputError(path, '', 'an HDF5 file', 'a file without the HDF5 signature');
  try {
    return new h5wasm.File(path, 'r');
  } catch {
    throw new InputError(path, '', 'an HDF5 file', 'something HDF5 cannot open');
  }
}

function dataset(file: H5File, path: string, name: string, what: string): H5Dataset {
  let d: unknown;
  try {
    d = file.get(name);
  } catch {
    d = null;
  }
  if (!d || typeof d !== 'object' || !('shape' in d)) {
    const top = file.keys().join(', ');
    file.close();
    throw new InputError(path, name, `${what} (the file's top level holds ${top || 'nothing'})`, 'no such dataset');
  }
  return d as H5Dataset;
}

/** A slice of `d`; InputError where the library cannot read it (a damaged file). */
function read(d: H5Dataset, ranges: [number, number][], path: string, name: string): unknown {
  try {
    return d.slice(ranges);
  } catch {
    throw new InputError(path, name, `elements ${ranges.map(([a, b]) => `${a}–${b - 1}`).join(' × ')} readable`, 'a damaged dataset');
  }
}

/** Numbers of a slice (complex compounds: real and imaginary parts). */
function numbers(value: unknown): { re: ArrayLike<number>; im: ArrayLike<number> | null } {
  if (ArrayBuffer.isView(value)) return { re: value as unknown as ArrayLike<number>, im: null };
  if (Array.isArray(value) && value.length > 0 && Array.isArray(value[0])) {
    const pairs = value as [number, number][];
    return { re: pairs.map((p) => p[0]), im: pairs.map((p) => p[1]) };
  }
  if (Array.isArray(value)) return { re: (value as unknown[]).map(Number), im: null };
  return { re: [], im: null };
}

function attributes(file: H5File, d: H5Dataset, name: string): RecordAttributes {
  const parent = name.replace(/\/[^/]*$/, '') || '/';
  const sources = [d.attrs, (file.get(parent) as { attrs?: Record<string, { value: unknown }> } | null)?.attrs ?? {}, file.attrs];
  const pick = (key: string): unknown => {
    for (const a of sources) if (a && key in a) return a[key]!.value;
    return undefined;
  };
  const at: RecordAttributes = {};
  const number = (k: keyof RecordAttributes, key: string) => {
    const v = pick(key);
    const x = typeof v === 'number' ? v : ArrayBuffer.isView(v) ? Number((v as unknown as ArrayLike<number>)[0]) : typeof v === 'bigint' ? Number(v) : NaN;
    if (Number.isFinite(x)) (at as Record<string, number>)[k] = x;
  };
  number('sampleRate', 'sample_rate');
  number('carrierFrequency', 'carrier_frequency');
  number('carrierPhase', 'carrier_phase');
  number('windowStart', 'window_start');
  number('windowLength', 'window_length');
  number('scale', 'scale');
  const unit = pick('unit');
  if (typeof unit === 'string') at.unit = unit;
  return at;
}

/** The records of dataset `name` of the HDF5 file `path`, scaled by `scale` (times the file's own `scale` attribute, if any). */
export async function readHdf5Records(path: string, name: string, scale: number): Promise<RecordSet> {
  const file = await open(path);
  const d = dataset(file, path, name, 'a 2-D dataset of records');
  const shape = d.shape ?? [];
  if (shape.length !== 1 && shape.length !== 2) {
    file.close();
    throw new InputError(path, name, 'a 2-D dataset of records (one record per row)', `a dataset of shape (${shape.join(', ')})`);
  }
  const rows = shape.length === 1 ? 1 : shape[0]!, samples = shape.length === 1 ? shape[0]! : shape[1]!;
  const attrs = attributes(file, d, name);
  const factor = scale * (attrs.scale ?? 1);
  let probe: ReturnType<typeof numbers>;
  try {
    probe = numbers(read(d, shape.length === 1 ? [[0, Math.min(1, samples)]] : [[0, Math.min(1, rows)], [0, samples]], path, name));
  } catch (e) {
    file.close();
    throw e;
  }
  if (probe.re.length === 0 || typeof probe.re[0] !== 'number') {
    file.close();
    throw new InputError(path, name, 'records of numbers (floats, integers or complex)', `elements of type ${JSON.stringify(d.dtype)}`);
  }
  const complex = probe.im !== null;
  let first = -1, count = 0, block = numbers([]);
  return {
    source: `${path}:${name}`, rows, samples, complex, attributes: attrs, metadata: new Map(), column: () => null,
    row(r, outI, outQ) {
      if (!(r >= first && r < first + count)) {
        first = r;
        count = Math.min(SLICE_ROWS, rows - r);
        block = numbers(read(d, shape.length === 1 ? [[0, samples]] : [[r, r + count], [0, samples]], path, name));
      }
      const base = (r - first) * samples;
      for (let k = 0; k < samples; k++) {
        outI[k] = factor * Number(block.re[base + k]);
        if (complex && outQ) outQ[k] = factor * Number(block.im![base + k]);
      }
    },
    close() { file.close(); },
  };
}

/** The labels in dataset `name` of `path`: one per record, at most two distinct values. */
export async function readHdf5Labels(path: string, name: string): Promise<LabelSet> {
  const file = await open(path);
  const d = dataset(file, path, name, 'a 1-D dataset of labels');
  const shape = d.shape ?? [];
  let raw: ArrayLike<number>;
  try {
    raw = numbers(read(d, [[0, shape[0] ?? 0]], path, name)).re;
  } finally {
    file.close();
  }
  if (shape.length !== 1) throw new InputError(path, name, 'a 1-D dataset of labels', `a dataset of shape (${shape.join(', ')})`);
  const mapped = outcomeIndices(Array.from(raw, Number));
  if (!mapped) throw new InputError(path, name, 'labels with at most two distinct values (the two outcomes)', 'more');
  return { source: `${path}:${name}`, ...mapped };
}
