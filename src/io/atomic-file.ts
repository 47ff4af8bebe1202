/**
 * Files that appear complete or not at all: bytes go to a temporary name in the same folder,
 * which is flushed and renamed over the final name only when the writing has finished.
 */
import { closeSync, fsyncSync, openSync, renameSync, rmSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';

/** Temporary names left behind by an interrupted run share this marker (cleaned on the next run). */
export const TEMP_MARKER = '.partial-';

/** Files being written right now, so a hard exit can still remove their temporary names. */
const openFiles = new Set<AtomicFile>();

/** Removes the temporary files of every AtomicFile still open (for an immediate exit). */
export function abortOpenFiles(): void {
  for (const f of [...openFiles]) f.abort();
}

/** A file being written under a temporary name. */
export class AtomicFile {
  readonly path: string;
  readonly tempPath: string;
  private fd: number | null;
  bytes = 0;

  constructor(path: string) {
    this.path = path;
    this.tempPath = join(dirname(path), `${TEMP_MARKER}${process.pid}-${basename(path)}`);
    this.fd = openSync(this.tempPath, 'w');
    openFiles.add(this);
  }

  write(bytes: Uint8Array): void {
    if (this.fd === null) throw new Error(`${this.path}: write after close`);
    let off = 0;
    while (off < bytes.byteLength) off += writeSync(this.fd, bytes, off, bytes.byteLength - off);
    this.bytes += bytes.byteLength;
  }

  /** Flushes, closes and renames into place. */
  commit(): void {
    if (this.fd === null) return;
    fsyncSync(this.fd);
    closeSync(this.fd);
    this.fd = null;
    openFiles.delete(this);
    renameSync(this.tempPath, this.path);
  }

  /** Closes and removes the temporary file; the final name is untouched. */
  abort(): void {
    if (this.fd !== null) {
      closeSync(this.fd);
      this.fd = null;
    }
    openFiles.delete(this);
    rmSync(this.tempPath, { force: true });
  }
}

/** Writes a whole file atomically. */
export function writeFileAtomic(path: string, data: Uint8Array | string): void {
  const f = new AtomicFile(path);
  try {
    f.write(typeof data === 'string' ? new TextEncoder().encode(data) : data);
    f.commit();
  } catch (e) {
    f.abort();
    throw e;
  }
}

