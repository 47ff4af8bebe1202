/**
 * A folder belongs to one process at a time: every command that writes a folder first creates
 * its lock file, `.singleshot-lock`, exclusively (the final step is a hard link, which fails when
 * the name is taken, so a lock is never seen half-written). The lock holds the holder's PID, the
 * host name, the process's start time as the kernel counts it (so a PID reused by another process
 * is not mistaken for the holder) and the command.
 *
 * A lock is stale only when its holder is gone: same host, and no process with that PID and start
 * time. A lock from another host cannot be checked from here and is never broken. Breaking a stale
 * lock renames it aside first and checks that the renamed file is still the stale one, so two
 * processes that find the same stale lock cannot both take the folder.
 *
 * Leftovers (temporary files and staging folders) carry their writer's host and PID in their name,
 * so only those of a dead writer are ever removed (`leftoverOwner`, `isDeadHere`).
 */
import { closeSync, fsyncSync, linkSync, openSync, readFileSync, renameSync, unlinkSync, writeSync } from 'node:fs';
import { hostname } from 'node:os';
import { join } from 'node:path';
import { InputError } from '../errors.ts';
import { fileSystemError } from './fs-errors.ts';

/** Name of the lock file inside a folder. */
export const LOCK_FILE = '.singleshot-lock';

/** What a lock file says about its holder. */
export interface LockHolder {
  tool: 'singleshot';
  pid: number;
  host: string;
  /** The process's start time in clock ticks since boot (/proc/PID/stat field 22), or null where unknown. */
  started: number | null;
  /** The command that holds it ("run", "merge", …). */
  command: string;
}

/** This machine's name as it appears in lock files and leftover names (letters, digits, '.' and '_'; no '-'). */
export function hostTag(): string {
  return hostname().replace(/[^A-Za-z0-9.]/g, '_').slice(0, 64) || 'host';
}

/** Start time of process `pid` in clock ticks since boot, or null where the system does not say. */
export function processStart(pid: number): number | null {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    // the command name (field 2) may hold spaces and parentheses: fields after the last ')'
    const rest = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    const ticks = Number(rest[19]);
    return Number.isFinite(ticks) ? ticks : null;
  } catch {
    return null;
  }
}

/** Whether a process with this PID exists on this host (EPERM: it exists but is not ours). */
function pidExists(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/** Whether the holder described (on this host) is gone: no such PID, or a PID reused by a later process. */
export function isDeadHere(pid: number, started: number | null): boolean {
  if (pid === process.pid) return started !== null && started !== processStart(pid);
  if (!pidExists(pid)) return true;
  if (started === null) return false;
  const now = processStart(pid);
  return now !== null && now !== started;
}

function parseHolder(text: string): LockHolder | null {
  try {
    const h = JSON.parse(text) as Partial<LockHolder>;
    if (h.tool !== 'singleshot' || !Number.isSafeInteger(h.pid) || typeof h.host !== 'string' || typeof h.command !== 'string') return null;
    if (h.started !== null && !Number.isFinite(h.started)) return null;
    return h as LockHolder;
  } catch {
    return null;
  }
}

function readHolder(path: string): { text: string; holder: LockHolder | null } | null {
  try {
    const text = readFileSync(path, 'utf8');
    return { text, holder: parseHolder(text) };
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT') return null;
    throw fileSystemError(e, path, 'reading the lock');
  }
}

/** Locks held by this process, so that an immediate exit can still release them. */
const held = new Set<FolderLock>();

/** Releases every lock this process holds (for an immediate exit). */
export function releaseAllLocks(): void {
  for (const l of [...held]) l.release();
}

/** A lock this process holds on a folder; `release()` removes it. */
export class FolderLock {
  private released = false;

  private constructor(readonly dir: string, readonly path: string, private readonly text: string) {
    held.add(this);
  }

  /**
   * Takes the lock of `dir` (which must exist) for `command`, or throws an InputError naming the
   * holder. A lock left by a holder that is gone is broken and taken.
   */
  static take(dir: string, command: string): FolderLock {
    const path = join(dir, LOCK_FILE);
    const me: LockHolder = { tool: 'singleshot', pid: process.pid, host: hostTag(), started: processStart(process.pid), command };
    const text = JSON.stringify(me) + '\n';
    for (let attempt = 0; attempt < 5; attempt++) {
      if (createExclusive(dir, path, text)) return new FolderLock(dir, path, text);
      const found = readHolder(path);
      if (found === null) continue; // released meanwhile: try again
      const h = found.holder;
      if (h === null) {
        throw new InputError(path, '', 'a folder no other singleshot process is writing', 'a lock file it cannot read (remove it if no singleshot command is writing this folder)');
      }
      if (h.host !== me.host) {
        throw new InputError(dir, '', 'a folder no other singleshot process is writing',
          `in use by process ${h.pid} on host ${h.host} (singleshot ${h.command}), which cannot be checked from here; remove ${path} if that process is gone`);
      }
      if (!isDeadHere(h.pid, h.started)) {
        throw new InputError(dir, '', 'a folder no other singleshot process is writing', `in use by process ${h.pid} (singleshot ${h.command}); wait for it to finish`);
      }
      breakStale(path, found.text);
    }
    throw new InputError(dir, '', 'a folder no other singleshot process is writing', 'a lock that keeps changing hands');
  }

  /** Removes the lock if it is still this process's own. */
  release(): void {
    if (this.released) return;
    this.released = true;
    held.delete(this);
    try {
      if (readFileSync(this.path, 'utf8') === this.text) unlinkSync(this.path);
    } catch {
      // already gone, or the folder with it: nothing to release
    }
  }
}

/** Creates the lock file with its whole text, failing (false) when the name is taken. */
function createExclusive(dir: string, path: string, text: string): boolean {
  const temp = join(dir, `${LOCK_FILE}.${hostTag()}-${process.pid}.new`);
  let fd: number;
  try {
    fd = openSync(temp, 'w');
  } catch (e) {
    throw fileSystemError(e, dir, 'creating the folder lock');
  }
  try {
    writeSync(fd, text);
    fsyncSync(fd);
  } catch (e) {
    closeSync(fd);
    unlinkQuietly(temp);
    throw fileSystemError(e, dir, 'creating the folder lock');
  }
  closeSync(fd);
  try {
    linkSync(temp, path);
    return true;
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'EEXIST') return false;
    if (code !== 'EPERM' && code !== 'ENOTSUP' && code !== 'EOPNOTSUPP' && code !== 'EXDEV') throw fileSystemError(e, dir, 'creating the folder lock');
    // no hard links here: an exclusive create instead (a reader may see it empty for a moment)
    return createWithoutLinks(path, text);
  } finally {
    unlinkQuietly(temp);
  }
}

function createWithoutLinks(path: string, text: string): boolean {
  let fd: number;
  try {
    fd = openSync(path, 'wx');
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'EEXIST') return false;
    throw fileSystemError(e, path, 'creating the folder lock');
  }
  try {
    writeSync(fd, text);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
  return true;
}

/** Moves a stale lock aside and removes it, unless someone replaced it meanwhile (then puts it back). */
function breakStale(path: string, staleText: string): void {
  const aside = `${path}.stale-${hostTag()}-${process.pid}`;
  try {
    renameSync(path, aside);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT') return;
    throw fileSystemError(e, path, 'removing a stale lock');
  }
  let moved = '';
  try {
    moved = readFileSync(aside, 'utf8');
  } catch {
    return;
  }
  if (moved === staleText) {
    unlinkQuietly(aside);
    return;
  }
  // a live holder's fresh lock was moved: give it back (if nobody took the name meanwhile)
  try {
    linkSync(aside, path);
  } catch {
    // the name is taken again: that holder will find its lock changed and the next taker refused
  }
  unlinkQuietly(aside);
}

function unlinkQuietly(path: string): void {
  try {
    unlinkSync(path);
  } catch {
    // already gone
  }
}

/**
 * The writer a leftover name belongs to (`.partial-HOST-PID-…`, `.singleshot-new-HOST-PID`), or
 * null when the name carries none.
 */
export function leftoverOwner(name: string): { host: string; pid: number } | null {
  const m = /^\.(?:partial|singleshot-new)-([A-Za-z0-9._]+)-(\d+)(?:-|$)/.exec(name);
  if (!m) return null;
  return { host: m[1]!, pid: Number(m[2]) };
}
