/**
 * SHA-256 of the files a run writes: run.json records one per file, and every command that
 * reads a run folder checks them first, so a damaged or changed file is refused with one line
 * before anything is made of its bytes.
 */
import { createHash } from 'node:crypto';
import { closeSync, openSync, readSync } from 'node:fs';
import { fileSystemError } from './fs-errors.ts';

/** Hex SHA-256 of bytes. */
export function sha256(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/** Hex SHA-256 of the file at `path`, read in chunks (files of any size). */
export function sha256File(path: string): string {
  let fd: number;
  try {
    fd = openSync(path, 'r');
  } catch (e) {
    throw fileSystemError(e, path, 'reading');
  }
  try {
    const hash = createHash('sha256');
    const buffer = Buffer.alloc(1 << 20);
    for (let at = 0; ;) {
      const n = readSync(fd, buffer, 0, buffer.length, at);
      if (n === 0) break;
      hash.update(buffer.subarray(0, n));
      at += n;
    }
    return hash.digest('hex');
  } catch (e) {
    throw fileSystemError(e, path, 'reading');
  } finally {
    closeSync(fd);
  }
}
