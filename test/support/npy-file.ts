/** Writes small NumPy .npy files (format 1.0, C order, little-endian) for tests of the record readers' users. */
import { writeFileSync } from 'node:fs';

/** Writes `values` as an array of `shape`: float64 ('<f8') or int64 ('<i8') elements. */
export function writeNpy(path: string, values: Float64Array | Int32Array, shape: readonly number[]): void {
  const float = values instanceof Float64Array;
  const dims = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
  let header = `{'descr': '${float ? '<f8' : '<i8'}', 'fortran_order': False, 'shape': ${dims}, }`;
  // the magic, version and length take 10 bytes; the header ends in a newline at a multiple of 64
  header = header.padEnd(Math.ceil((10 + header.length + 1) / 64) * 64 - 10 - 1, ' ') + '\n';
  const data = new DataView(new ArrayBuffer(values.length * 8));
  values.forEach((v, i) => (float ? data.setFloat64(i * 8, v, true) : data.setBigInt64(i * 8, BigInt(v), true)));
  const head = new Uint8Array(10 + header.length);
  head.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0, header.length & 0xff, header.length >> 8]);
  head.set(new TextEncoder().encode(header), 10);
  writeFileSync(path, Buffer.concat([head, new Uint8Array(data.buffer)]));
}
