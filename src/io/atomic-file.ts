/**
 * Files that appear complete or not at all: bytes go to a temporary name in the same folder,
 * which is flushed and renamed over the final name only when the writing has finished.
 */
import { closeSync, fsyncSync, linkSync, openSync, renameSync, rmSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { InputError } from '../errors.ts';
import { fileSystemError } from './fs-errors.ts';
import { hostTag } from './folder-lock.ts';

/**
 * Temporary names share this marker, followed by the writer's host and PID
 * (`.partial-HOST-PID-NAME`), so that only a dead writer's leftovers are ever removed.
 */
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
    this.tempPath = join(dirname(path), `${TEMP_MARKER}${hostTag()}-${process.pid}-${basename(path)}`);
    try {
      this.fd = openSync(this.tempPath, 'w');
    } catch (e) {
      throw fileSystemError(e, path, 'writing');
    }
    openFiles.add(this);
  }

  write(bytes: Uint8Array): void {
    if (this.fd === null) throw new Error(`${this.path}: write after close`);
    let off = 0;
    try {
      while (off < bytes.byteLength) off += writeSync(this.fd, bytes, off, bytes.byteLength - off);
    } catch (e) {
      throw fileSystemError(e, this.path, 'writing');
    }
    this.bytes += bytes.byteLength;
  }

  /** Flushes, closes and renames into place. */
  commit(replace = true): void {
    if (this.fd === null) return;
    try {
      fsyncSync(this.fd);
      closeSync(this.fd);
      this.fd = null;
      if (replace) renameSync(this.tempPath, this.path);
      else placeWithoutReplacing(this.tempPath, this.path);
    } catch (e) {
      this.abort();
      throw fileSystemError(e, this.path, 'writing');
    }
    openFiles.delete(this);
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

/** An existing name refused (the caller said not to replace files). */
function nameInUse(path: string): InputError {
  return new InputError(path, '', 'a file name not in use (add --force to replace it)', 'an existing file');
}

/**
 * Puts the finished temporary file at `path` unless something is there: a hard link, which
 * fails when the name is taken (a plain rename where the file system has no hard links).
 */
function placeWithoutReplacing(temp: string, path: string): void {
  try {
    linkSync(temp, path);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'EEXIST') throw nameInUse(path);
    if (code !== 'EPERM' && code !== 'ENOTSUP' && code !== 'EOPNOTSUPP' && code !== 'EXDEV') throw e;
    renameSync(temp, path);
    return;
  }
  unlinkSync(temp);
}

/**
 * Writes a whole file atomically. With `replace: false` an existing file is never replaced (an
 * InputError says so), not even one that appears while the file is written.
 */
export function writeFileAtomic(path: string, data: Uint8Array | string, o: { replace?: boolean } = {}): void {
  const f = new AtomicFile(path);
  try {
    f.write(typeof data === 'string' ? new TextEncoder().encode(data) : data);
    f.commit(o.replace ?? true);
  } catch (e) {
    f.abort();
    throw e;
  }
}

