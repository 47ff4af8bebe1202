/**
 * File-system failures as one line for the user: a Node system error (ENOENT, ENOTDIR, EACCES,
 * EROFS, ENOSPC, ELOOP, …) becomes an InputError naming the path and what went wrong, so that
 * an empty --out, a path under a file, a dangling or looping link, a read-only or full file
 * system end with `singleshot: PATH: …` and exit 2, never a stack trace.
 */
import { openSync, readFileSync, statSync } from 'node:fs';
import { InputError } from '../errors.ts';

/** What each error code means, in words a user can act on. */
const MEANINGS: Readonly<Record<string, string>> = {
  ENOENT: 'no such file or folder (or a link to nothing)',
  ENOTDIR: 'a path that goes through a file as if it were a folder',
  EISDIR: 'a folder where a file was expected',
  EACCES: 'no permission',
  EPERM: 'an operation the file system does not permit',
  EROFS: 'a read-only file system',
  ENOSPC: 'no space left on the device',
  EDQUOT: 'the disk quota is used up',
  ELOOP: 'a loop of symbolic links',
  ENAMETOOLONG: 'a name too long for the file system',
  EEXIST: 'something already there',
  ENOTEMPTY: 'a folder that is not empty',
  EMFILE: 'too many open files',
  ENFILE: 'too many open files on the system',
  EBUSY: 'a file or folder in use',
  EIO: 'an input/output error of the device',
  EXDEV: 'a move across file systems',
  EFBIG: 'a file too large for the file system',
  EINVAL: 'a name or operation the file system does not accept',
};

/** Whether `e` is a Node system error (it has a string `code` such as "ENOSPC"). */
export function isSystemError(e: unknown): e is NodeJS.ErrnoException & { code: string } {
  return e instanceof Error && typeof (e as NodeJS.ErrnoException).code === 'string' && /^E[A-Z0-9]+$/.test((e as NodeJS.ErrnoException).code!);
}

/**
 * The InputError for a system error met while `doing` something with `path` (the error's own
 * path when it names one). Anything that is not a system error is returned unchanged.
 */
export function fileSystemError(e: unknown, path?: string, doing?: string): unknown {
  if (e instanceof InputError || !isSystemError(e)) return e;
  const where = path ?? e.path ?? (e as { dest?: string }).dest ?? '(file system)';
  const meaning = MEANINGS[e.code] ?? `the file system said ${e.code}`;
  const what = doing ? `${doing}: ` : '';
  return new InputError(where, '', `${what}${meaning} (${e.code})`);
}

/** Runs `f`, turning a system error into the one-line InputError of `fileSystemError`. */
export function withFileErrors<T>(path: string, doing: string, f: () => T): T {
  try {
    return f();
  } catch (e) {
    throw fileSystemError(e, path, doing);
  }
}

/** The one-line refusal of an input file that cannot be opened: what the command `expected` there, and why not. */
function inputFileError(e: unknown, path: string, expected: string): unknown {
  if (e instanceof InputError || !isSystemError(e)) return e;
  const found = e.code === 'ENOENT' ? 'no such file' : e.code === 'EISDIR' ? 'a folder' : e.code === 'EACCES' || e.code === 'EPERM' ? 'no permission to read it'
    : `${MEANINGS[e.code] ?? 'a file that cannot be read'} (${e.code})`;
  return new InputError(path, '', expected, found);
}

/** Opens input file `path` for reading (a file descriptor); a missing, unreadable file or a folder is one line saying what was `expected`. */
export function openInputFile(path: string, expected: string): number {
  try {
    if (statSync(path).isDirectory()) throw new InputError(path, '', expected, 'a folder');
    return openSync(path, 'r');
  } catch (e) {
    throw inputFileError(e, path, expected);
  }
}

/** The bytes of input file `path`, refused as openInputFile refuses. */
export function readInputFile(path: string, expected: string): Buffer {
  try {
    if (statSync(path).isDirectory()) throw new InputError(path, '', expected, 'a folder');
    return readFileSync(path);
  } catch (e) {
    throw inputFileError(e, path, expected);
  }
}
