/**
 * The folder lock and the staged output folder (io/folder-lock.ts, io/output-dir.ts), and what
 * the commands make of them: a lock is broken only when its holder is gone; only a dead writer's
 * leftovers are removed; `--force` replaces singleshot's own files and keeps every other file;
 * report and rerun never replace a file without `--force` and never the folder they read.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FolderLock, hostTag, leftoverOwner, LOCK_FILE, processStart } from '../../src/io/folder-lock.ts';
import { isOwnFile, KNOWN_FILES, OutputFolder, STAGING_PREFIX } from '../../src/io/output-dir.ts';
import { InputError } from '../../src/errors.ts';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { runMain } from '../support/cli.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const TINY = join(ROOT, 'test', 'fixtures', 'reliability', 'tiny.yaml');
const FREE = { memoryBytes: 2 ** 40, diskBytes: 2 ** 40 };
const base = mkdtempSync(join(tmpdir(), 'singleshot-folder-'));
let n = 0;
const fresh = () => {
  const d = join(base, `d${n++}`);
  mkdirSync(d);
  return d;
};
afterAll(() => rmSync(base, { recursive: true, force: true }));

/** The PID of a process that has ended (a node that exits at once). */
function deadPid(): number {
  const r = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
  return Number(r.stdout);
}

const lockText = (h: Record<string, unknown>) => `${JSON.stringify({ tool: 'singleshot', host: hostTag(), started: null, command: 'run', ...h })}\n`;

describe('the folder lock', () => {
  it('is exclusive: a second take in a live holder\'s folder names the holder', () => {
    const d = fresh();
    const lock = FolderLock.take(d, 'run');
    expect(JSON.parse(readFileSync(join(d, LOCK_FILE), 'utf8'))).toMatchObject({ tool: 'singleshot', pid: process.pid, host: hostTag(), command: 'run' });
    expect(() => FolderLock.take(d, 'merge')).toThrow(new RegExp(`in use by process ${process.pid} \\(singleshot run\\); wait for it to finish`));
    lock.release();
    expect(existsSync(join(d, LOCK_FILE))).toBe(false);
    FolderLock.take(d, 'merge').release();
  });

  it('is broken and taken when its holder is gone (no such process)', () => {
    const d = fresh();
    writeFileSync(join(d, LOCK_FILE), lockText({ pid: deadPid() }));
    const lock = FolderLock.take(d, 'run');
    expect(JSON.parse(readFileSync(join(d, LOCK_FILE), 'utf8')).pid).toBe(process.pid);
    lock.release();
    expect(readdirSync(d)).toEqual([]);
  });

  it.skipIf(processStart(process.pid) === null)('is broken when its PID now belongs to a later process (start time differs)', () => {
    const d = fresh();
    writeFileSync(join(d, LOCK_FILE), lockText({ pid: process.ppid, started: (processStart(process.ppid) ?? 0) + 1 }));
    FolderLock.take(d, 'run').release();
  });

  it('is kept while its holder lives, and one from another host is never broken', () => {
    const d = fresh();
    writeFileSync(join(d, LOCK_FILE), lockText({ pid: process.ppid, started: processStart(process.ppid) }));
    expect(() => FolderLock.take(d, 'run')).toThrow(new RegExp(`in use by process ${process.ppid}`));
    writeFileSync(join(d, LOCK_FILE), lockText({ pid: deadPid(), host: 'elsewhere.example' }));
    expect(() => FolderLock.take(d, 'run')).toThrow(/on host elsewhere\.example .* cannot be checked from here; remove .*\.singleshot-lock if that process is gone/);
    writeFileSync(join(d, LOCK_FILE), 'not a lock');
    expect(() => FolderLock.take(d, 'run')).toThrow(InputError);
  });

  it('reads the writer of a leftover from its name', () => {
    expect(leftoverOwner(`.partial-${hostTag()}-1234-summary.arrow`)).toEqual({ host: hostTag(), pid: 1234 });
    expect(leftoverOwner(`${STAGING_PREFIX}node_7.lab-99`)).toEqual({ host: 'node_7.lab', pid: 99 });
    expect(leftoverOwner('summary.arrow')).toBeNull();
  });
});

describe('the output folder', () => {
  it('removes a dead writer\'s leftovers, keeps a live one\'s and another host\'s', () => {
    const d = fresh();
    const dead = deadPid();
    const deadStaging = join(d, `${STAGING_PREFIX}${hostTag()}-${dead}`);
    mkdirSync(deadStaging);
    writeFileSync(join(deadStaging, 'shots.arrow'), 'half');
    writeFileSync(join(d, `.partial-${hostTag()}-${dead}-summary.arrow`), 'half');
    const live = `.partial-${hostTag()}-${process.ppid}-summary.arrow`;
    const foreignHost = `${STAGING_PREFIX}elsewhere-${dead}`;
    writeFileSync(join(d, live), 'being written');
    mkdirSync(join(d, foreignHost));
    const out = OutputFolder.open(d, { force: false, command: 'run' });
    out.discard();
    expect(readdirSync(d).sort()).toEqual([live, foreignHost].sort());
  });

  it('refuses a non-empty folder without force, and releases its lock', () => {
    const d = fresh();
    writeFileSync(join(d, 'notes.txt'), 'mine');
    expect(() => OutputFolder.open(d, { force: false, command: 'run' })).toThrow(/is not empty \(1 entry\); .*add --force to replace singleshot's files there \(other files are kept\)/);
    expect(readdirSync(d)).toEqual(['notes.txt']);
  });

  it.each([
    ['an empty path', '', /--out: expected a folder path, found an empty string/],
    ['a path under a file', 'FILE/sub', /a path that goes through a file as if it were a folder \(ENOTDIR\)/],
    ['a file', 'FILE', /expected a folder for --out, found a file/],
    ['a dangling link', 'DANGLING', /found a symbolic link to nothing/],
    ['a loop of links', 'LOOP', /a loop of symbolic links \(ELOOP\)/],
  ])('%s is one clear line', (_what, spec, message) => {
    const d = fresh();
    writeFileSync(join(d, 'file'), 'x');
    symlinkSync(join(d, 'nothing'), join(d, 'dangling'));
    symlinkSync(join(d, 'loop-b'), join(d, 'loop-a'));
    symlinkSync(join(d, 'loop-a'), join(d, 'loop-b'));
    const path = spec.replace('FILE', join(d, 'file')).replace('DANGLING', join(d, 'dangling')).replace('LOOP', join(d, 'loop-a'));
    expect(() => OutputFolder.open(path, { force: true, command: 'run' })).toThrow(message);
  });
});

describe('--force and the commands', () => {
  let runDir: string;
  beforeAll(async () => {
    runDir = join(base, 'run');
    await runToDirectory({ scenarioPath: TINY, outDir: runDir, report: false, free: FREE });
  });

  it('a forced run replaces every file of the previous run (no shots.arrow of the old seed stays) and keeps foreign files', async () => {
    const d = join(base, 'forced');
    await runToDirectory({ scenarioPath: TINY, outDir: d, report: false, free: FREE });
    writeFileSync(join(d, 'notes.txt'), 'keep me');
    expect(readdirSync(d)).toContain('shots.arrow');
    await runToDirectory({ scenarioPath: TINY, outDir: d, force: true, report: false, free: FREE, shotsTable: false, seed: 5 });
    expect(readdirSync(d).sort()).toEqual(['budget.arrow', 'notes.txt', 'run.json', 'summary.arrow', 'tallies.json']);
    expect(readFileSync(join(d, 'notes.txt'), 'utf8')).toBe('keep me');
    expect(JSON.parse(readFileSync(join(d, 'run.json'), 'utf8')).seed).toBe(5);
  });

  it('a forced run refuses to replace a foreign file that has one of singleshot\'s names', async () => {
    const d = fresh();
    writeFileSync(join(d, 'summary.arrow'), 'my own table, not singleshot\'s');
    const r = await runMain(['run', TINY, '--out', d, '--force', '--quiet', '--no-report']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/summary\.arrow: expected a file singleshot wrote \(--force replaces only those\), found another file under that name/);
    expect(readdirSync(d)).toEqual(['summary.arrow']);
  });

  it('a forced run replaces a sweep\'s shots.arrow over 1 MiB, whose schema with its marks sits only in the footer', async () => {
    const d = fresh();
    const sweep = 'test/fixtures/scenarios/shard-sweep.yaml';
    await runToDirectory({ scenarioPath: sweep, outDir: d, report: false, free: FREE });
    const shots = readFileSync(join(d, 'shots.arrow'));
    expect(shots.length).toBeGreaterThan(1 << 20);
    // apache-arrow's file writer puts no schema at the head: the schema and its marks are in the footer
    expect(shots.subarray(0, 1 << 20).includes('singleshot.table')).toBe(false);
    expect(isOwnFile(join(d, 'shots.arrow'))).toBe(true);
    await runToDirectory({ scenarioPath: sweep, outDir: d, force: true, report: false, free: FREE, seed: 9 });
    expect(JSON.parse(readFileSync(join(d, 'run.json'), 'utf8')).seed).toBe(9);
  });

  it('a file whose mark is not in an Arrow footer is not taken for singleshot\'s', () => {
    const d = fresh();
    const file = join(d, 'shots.arrow');
    const filler = Buffer.alloc(3 << 20);
    Buffer.from('singleshot.table').copy(filler, 3 << 19);
    writeFileSync(file, filler);
    expect(isOwnFile(file)).toBe(false);
    // the mark at the head of a file with no Arrow trailer
    writeFileSync(file, Buffer.concat([Buffer.from('ARROW1\0\0singleshot.table'), Buffer.alloc(64)]));
    expect(isOwnFile(file)).toBe(false);
  });

  it('knows its own files by their bytes', () => {
    expect([...KNOWN_FILES]).toContain('report.html');
  });

  it('report never replaces a file without --force, nor the run\'s own tables even with it', async () => {
    const page = join(base, 'page.html');
    writeFileSync(page, 'keep me');
    const refused = await runMain(['report', runDir, '--out', page]);
    expect(refused.code).toBe(2);
    expect(refused.err).toMatch(/page\.html: expected a file name not in use \(add --force to replace it\)/);
    expect(readFileSync(page, 'utf8')).toBe('keep me');
    const forced = await runMain(['report', runDir, '--out', page, '--force']);
    expect(forced.code, forced.err).toBe(0);
    expect(readFileSync(page, 'utf8')).toMatch(/singleshot report<\/title>/);
    for (const table of ['summary.arrow', 'run.json', 'tallies.json']) {
      const r = await runMain(['report', runDir, '--out', join(runDir, table), '--force']);
      expect(r.code, table).toBe(2);
      expect(r.err).toMatch(/not one of the run's own files/);
    }
    const first = await runMain(['report', runDir]);
    expect(first.code, first.err).toBe(0);
    const again = await runMain(['report', runDir]);
    expect(again.code).toBe(2);
    expect(again.err).toMatch(/report\.html: expected a file name not in use/);
    rmSync(join(runDir, 'report.html'));
  });

  it('rerun --out refuses the folder it checks, even with --force; merge and analyze refuse their inputs\' folders', async () => {
    const before = readdirSync(runDir).sort();
    const r = await runMain(['rerun', runDir, '--out', runDir, '--force']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/expected a folder other than the one the command reads/);
    const m = await runMain(['merge', runDir, '--out', runDir, '--force', '--no-report']);
    expect(m.code).toBe(2);
    expect(m.err).toMatch(/expected a folder other than the one the command reads/);
    expect(readdirSync(runDir).sort()).toEqual(before);
  });
});

describe('full and read-only file systems (a small tmpfs in a user namespace)', () => {
  // mounting needs a user namespace (`unshare -rm`); where the system allows none, say so and skip
  const probe = spawnSync('unshare', ['-rm', 'sh', '-c', `mount -t tmpfs -o size=64k tmpfs ${fresh()} && echo ok`], { encoding: 'utf8' });
  const can = probe.status === 0 && probe.stdout.includes('ok');
  const cli = join(ROOT, 'bin', 'singleshot.js');

  /** Runs `script` in a fresh mount namespace with a 64 kB tmpfs on `mnt`; returns its output. */
  function inTmpfs(script: string): { out: string; err: string } {
    const mnt = fresh();
    const r = spawnSync('unshare', ['-rm', 'sh', '-c', `mount -t tmpfs -o size=64k tmpfs ${mnt} && ${script.split('MNT').join(mnt)}`], { encoding: 'utf8', timeout: 60_000 });
    return { out: r.stdout, err: r.stderr };
  }

  it.skipIf(!can)('a full disk mid-write: one line naming the file, exit 2, nothing left in the folder', () => {
    const r = inTmpfs(`node ${cli} run ${TINY} --out MNT/out --force --no-report --quiet --engine traces; echo "exit $?"; ls -A MNT/out`);
    expect(r.out, r.err).toMatch(/^exit 2\n$/);
    const lines = r.err.split('\n').filter((l) => l !== '');
    expect(lines, r.err).toHaveLength(1);
    expect(lines[0]).toMatch(/^singleshot: .*\/out\/shots\.arrow: writing: no space left on the device \(ENOSPC\)$/);
  }, 60_000);

  it.skipIf(!can)('a full disk found by the estimate before anything is written (report.html counted)', () => {
    const r = inTmpfs(`node ${cli} run ${TINY} --out MNT/out --quiet; echo "exit $?"; ls -A MNT`);
    expect(r.out, r.err).toMatch(/^exit 2\n$/);
    expect(r.err).toMatch(/^singleshot: .*tiny\.yaml: expected a run that fits in the free disk space .*report/);
  }, 60_000);

  it.skipIf(!can)('a read-only file system: one line naming the folder, exit 2', () => {
    const r = inTmpfs(`mkdir MNT/existing && mount -o remount,ro MNT && node ${cli} run ${TINY} --out MNT/existing --force --no-report --quiet; echo "exit $?"; node ${cli} run ${TINY} --out MNT/new --force --no-report --quiet; echo "exit $?"`);
    expect(r.out, r.err).toBe('exit 2\nexit 2\n');
    const lines = r.err.split('\n').filter((l) => l !== '');
    expect(lines, r.err).toHaveLength(2);
    expect(lines[0]).toMatch(/^singleshot: .*\/existing: creating the folder lock: a read-only file system \(EROFS\)$/);
    expect(lines[1]).toMatch(/^singleshot: .*\/new: creating the folder for --out: a read-only file system \(EROFS\)$/);
  }, 60_000);
});
