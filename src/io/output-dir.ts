/**
 * The output folder of a command that writes a folder (run, merge, analyze, rerun --out): locked
 * for the whole command, written in a hidden staging folder inside it, and published at the end.
 *
 * - `OutputFolder.open` refuses an empty path, a path that is a file, a link to nothing, and a
 *   folder that holds one of the command's inputs; creates the folder if missing; takes its lock
 *   (folder-lock.ts); removes the leftovers of dead writers only; and refuses a folder that holds
 *   anything unless `force`.
 * - The command writes every file into `file(name)`, i.e. the staging folder
 *   `.singleshot-new-HOST-PID`, each one atomically.
 * - `publish()` removes run.json, then the tool's own files left by an earlier command (known
 *   names whose bytes say they are singleshot's — never another file), moves the new files in and
 *   run.json last. `discard()` removes the staging folder. Both release the lock.
 *
 * So an interrupted or failed command leaves the folder as it was, and a published one holds the
 * new files and no file of the previous run; a kill during the moves leaves no run.json (the folder
 * reads as no run, and its files are whole).
 */
import { accessSync, closeSync, constants, existsSync, fstatSync, fsyncSync, lstatSync, mkdirSync, openSync, readdirSync, readSync, realpathSync, renameSync, rmSync, statSync, unlinkSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { InputError } from '../errors.ts';
import { fileSystemError, withFileErrors } from './fs-errors.ts';
import { footerSpan, type ReadAt } from './arrow-verify.ts';
import { FolderLock, hostTag, isDeadHere, leftoverOwner, LOCK_FILE } from './folder-lock.ts';

/** The files singleshot writes into a folder; `--force` replaces these (when their bytes are singleshot's) and nothing else. */
export const KNOWN_FILES = [
  'run.json', 'tallies.json', 'summary.arrow', 'budget.arrow', 'comparisons.arrow', 'shots.arrow', 'traces.arrow', 'noise.arrow', 'report.html',
] as const;

/** Prefix of the staging folder. */
export const STAGING_PREFIX = '.singleshot-new-';

/**
 * What marks a known file as singleshot's own, by extension: text searched in its first bytes, or,
 * for an Arrow file, in its footer (where its schema and metadata are; see footerSpan).
 */
const OWN_MARKERS: Record<string, { marks: string[]; where: 'head' | 'footer' }> = {
  '.arrow': { marks: ['singleshot.table'], where: 'footer' },
  '.json': { marks: ['"tool":"singleshot"', '"tool": "singleshot"'], where: 'head' },
  '.html': { marks: ['singleshot report</title>'], where: 'head' },
};

/** Bytes read from the head of a known JSON or HTML file to recognise it as singleshot's. */
const MARKER_BYTES = 1 << 20;
/**
 * Largest Arrow footer read to recognise a table: the footer carries the canonical scenario (a
 * scenario file may hold 4 MiB, MAX_SCENARIO_BYTES) and, in traces.arrow, the calibrations.
 */
const MAX_FOOTER_BYTES = 64 << 20;

/** Whether the file at `path` (a known name) holds singleshot's bytes. */
export function isOwnFile(path: string): boolean {
  const ext = Object.keys(OWN_MARKERS).find((e) => path.endsWith(e));
  if (!ext) return false;
  const { marks, where } = OWN_MARKERS[ext]!;
  let fd: number;
  try {
    if (!statSync(path).isFile()) return false;
    fd = openSync(path, 'r');
  } catch {
    return false;
  }
  try {
    const read: ReadAt = (offset, length) => {
      const buf = Buffer.alloc(length);
      return buf.subarray(0, readSync(fd, buf, 0, length, offset));
    };
    let span = { start: 0, length: MARKER_BYTES };
    if (where === 'footer') {
      const size = fstatSync(fd).size;
      if (size < 18) return false;
      const footer = footerSpan(read, size);
      if (!footer.fits || footer.length > MAX_FOOTER_BYTES) return false;
      span = footer;
    }
    const text = Buffer.from(read(span.start, span.length)).toString('latin1');
    return marks.some((m) => text.includes(m));
  } catch {
    return false;
  } finally {
    closeSync(fd);
  }
}

/** Whether a folder entry is the lock's own or a leftover of some writer (never a result). */
function isHousekeeping(name: string): boolean {
  return name === LOCK_FILE || name.startsWith(`${LOCK_FILE}.`) || leftoverOwner(name) !== null;
}

/** Removes the leftovers (temporary files, staging folders) of writers on this host that are gone. */
export function removeDeadLeftovers(dir: string): void {
  for (const name of readdirSync(dir)) {
    const owner = leftoverOwner(name);
    if (!owner || owner.host !== hostTag() || !isDeadHere(owner.pid, null)) continue;
    rmSync(join(dir, name), { recursive: true, force: true });
  }
}

/** A file or folder the command reads, which its output folder must not hold. */
export interface CommandInput {
  path: string;
  /** 'folder': the output folder must not be it; 'file': the output folder must not contain it. */
  kind: 'folder' | 'file';
}

export interface OutputFolderOptions {
  force: boolean;
  /** The command, recorded in the lock ("run", "merge", …). */
  command: string;
  /** What the command reads. */
  inputs?: readonly CommandInput[];
  /** Name of the option that gave the folder, for messages (default --out). */
  option?: string;
}

function realpathOrNull(path: string): string | null {
  try {
    return realpathSync(path);
  } catch {
    return null;
  }
}

/** Creates `dir` (and its parents) when missing; one clear line for every way that can fail. */
function ensureFolder(dir: string, option: string): void {
  if (dir.trim() === '') throw new InputError(option, '', 'a folder path', 'an empty string');
  let st;
  try {
    st = statSync(dir);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') {
      let link = false;
      try {
        link = lstatSync(dir).isSymbolicLink();
      } catch {
        link = false;
      }
      if (link) throw new InputError(dir, '', `a folder for ${option}`, 'a symbolic link to nothing');
      try {
        mkdirSync(dir, { recursive: true });
      } catch (made) {
        // a recursive mkdir on a read-only file system says ENOENT: ask the nearest existing folder why
        throw fileSystemError(whyNotWritable(dir) ?? made, dir, `creating the folder for ${option}`);
      }
      return;
    }
    throw fileSystemError(e, dir, `the folder for ${option}`);
  }
  if (!st.isDirectory()) throw new InputError(dir, '', `a folder for ${option}`, 'a file');
}

/** Output folders open right now, so that an immediate exit can still remove their staging folders. */
const openFolders = new Set<OutputFolder>();

/** Discards every output folder still open (for an immediate exit). */
export function discardAllOutputs(): void {
  for (const f of [...openFolders]) f.discard();
}

/** Why the nearest existing folder above `path` cannot be written in (its access error), or null. */
function whyNotWritable(path: string): unknown {
  for (let at = dirname(resolve(path)); ; at = dirname(at)) {
    if (existsSync(at)) {
      try {
        accessSync(at, constants.W_OK);
        return null;
      } catch (e) {
        return e;
      }
    }
    if (dirname(at) === at) return null;
  }
}

/** A locked output folder being written through its staging folder. */
export class OutputFolder {
  readonly dir: string;
  /** The staging folder, where every file goes until `publish`. */
  readonly work: string;
  private readonly lock: FolderLock;
  private readonly force: boolean;
  private done = false;

  private constructor(dir: string, work: string, lock: FolderLock, force: boolean) {
    this.dir = dir;
    this.work = work;
    this.lock = lock;
    this.force = force;
    openFolders.add(this);
  }

  /** Opens `dir` for writing (see the file comment); throws an InputError when it may not be. */
  static open(dir: string, o: OutputFolderOptions): OutputFolder {
    const option = o.option ?? '--out';
    ensureFolder(dir, option);
    const real = realpathOrNull(dir) ?? resolve(dir);
    for (const input of o.inputs ?? []) {
      const inputReal = realpathOrNull(input.path);
      if (inputReal === null) continue;
      if (input.kind === 'folder' && inputReal === real) {
        throw new InputError(dir, '', `a folder other than the one the command reads (${option} must not be ${input.path})`, 'the same folder');
      }
      if (input.kind === 'file' && realpathOrNull(dirname(inputReal)) === real && (KNOWN_FILES as readonly string[]).includes(basename(inputReal))) {
        throw new InputError(dir, '', `a folder that does not hold the command's input ${input.path}`, 'the folder that holds it');
      }
    }
    const lock = FolderLock.take(dir, o.command);
    try {
      withFileErrors(dir, 'removing leftovers of an earlier command', () => removeDeadLeftovers(dir));
      const entries = readdirSync(dir).filter((n) => !isHousekeeping(n));
      if (entries.length > 0 && !o.force) {
        throw new InputError(dir, '', `is not empty (${entries.length} ${entries.length === 1 ? 'entry' : 'entries'}); choose another ${option} or add --force to replace singleshot's files there (other files are kept)`);
      }
      // --force replaces singleshot's own files only: a foreign file under one of their names stays, so the command cannot run
      const foreign = KNOWN_FILES.find((n) => entries.includes(n) && !isOwnFile(join(dir, n)));
      if (foreign) {
        throw new InputError(join(dir, foreign), '', 'a file singleshot wrote (--force replaces only those)', 'another file under that name; move it away first');
      }
      const work = join(dir, `${STAGING_PREFIX}${hostTag()}-${process.pid}`);
      withFileErrors(dir, 'creating the staging folder', () => {
        rmSync(work, { recursive: true, force: true });
        mkdirSync(work);
      });
      return new OutputFolder(dir, work, lock, o.force);
    } catch (e) {
      lock.release();
      throw e;
    }
  }

  /**
   * `e` with the staging folder's paths in its message written as the folder's own (a message
   * names the file the user will look for).
   */
  userError(e: unknown): unknown {
    if (!(e instanceof InputError) || !e.message.includes(this.work)) return e;
    const renamed = new InputError(e.file.split(this.work).join(this.dir), e.path, 'x');
    renamed.message = e.message.split(this.work).join(this.dir);
    return renamed;
  }

  /** Where the command writes `name` (inside the staging folder). */
  file(name: string): string {
    return join(this.work, name);
  }

  /**
   * Moves the staged files into the folder (run.json last) after removing run.json and the tool's
   * own files of an earlier command; returns the names moved. Releases the lock.
   */
  publish(): string[] {
    if (this.done) throw new Error(`${this.dir}: output published twice`);
    try {
      return withFileErrors(this.dir, 'moving the new files into place', () => {
        const staged = readdirSync(this.work);
        const runJson = staged.includes('run.json') ? ['run.json'] : [];
        if (this.force) {
          const old = KNOWN_FILES.filter((n) => isOwnFile(join(this.dir, n)));
          // run.json first: from here until the end the folder reads as no run
          for (const n of [...old.filter((n) => n === 'run.json'), ...old.filter((n) => n !== 'run.json')]) unlinkSync(join(this.dir, n));
        }
        const order = [...staged.filter((n) => n !== 'run.json'), ...runJson];
        for (const n of order) renameSync(join(this.work, n), join(this.dir, n));
        syncFolder(this.dir);
        return order;
      });
    } finally {
      this.discard();
    }
  }

  /** Removes the staging folder (whatever is in it) and releases the lock. */
  discard(): void {
    if (this.done) return;
    this.done = true;
    openFolders.delete(this);
    try {
      rmSync(this.work, { recursive: true, force: true });
    } finally {
      this.lock.release();
    }
  }
}

/** Flushes a folder's entries (the renames) to disk where the system allows it. */
function syncFolder(dir: string): void {
  let fd: number | null = null;
  try {
    fd = openSync(dir, 'r');
    fsyncSync(fd);
  } catch {
    // not every system can fsync a folder; the renames stand
  } finally {
    if (fd !== null) closeSync(fd);
  }
}
