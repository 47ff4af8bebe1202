/**
 * `singleshot init [FILE]`: write a commented starter scenario.
 */
import { Command } from 'commander';
import { randomBytes } from 'node:crypto';
import { link, rename, stat, unlink, writeFile } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { InputError } from '../../errors.ts';
import { starterScenario } from '../../scenario/starter.ts';

/**
 * Writes `text` to `path` through a temporary file in the same folder, so a reader never sees
 * half a file. Without `force` an existing file is never replaced (the final step is a hard
 * link, which fails if the name is taken).
 */
export async function writeFileSafely(path: string, text: string, force: boolean): Promise<void> {
  if (!force && (await exists(path))) {
    throw new InputError(path, '', 'a file name not in use (add --force to replace it)', 'an existing file');
  }
  const temp = join(dirname(path), `.${basename(path)}.${randomBytes(6).toString('hex')}.tmp`);
  try {
    await writeFile(temp, text, { flag: 'wx' });
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new InputError(path, '', 'a path in an existing folder', 'no such folder');
    if (code === 'EACCES' || code === 'EPERM') throw new InputError(path, '', 'a folder we may write in', 'no permission');
    throw e;
  }
  try {
    if (force) {
      await rename(temp, path);
      return;
    }
    try {
      await link(temp, path);
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      if (code === 'EEXIST') {
        throw new InputError(path, '', 'a file name not in use (add --force to replace it)', 'an existing file');
      }
      if (code !== 'EPERM' && code !== 'ENOTSUP' && code !== 'EXDEV') throw e;
      // No hard links on this file system: fall back to a plain rename.
      await rename(temp, path);
    }
  } finally {
    await unlink(temp).catch(() => undefined);
  }
}

async function exists(path: string): Promise<boolean> {
  try {
    await stat(path);
    return true;
  } catch {
    return false;
  }
}

/** Makes the `init` command: the starter scenario to FILE (never overwriting unless --force) or stdout. */
export function makeInitCommand(): Command {
  return new Command('init')
    .description('write a commented starter scenario to FILE, or to standard output')
    .argument('[file]', 'where to write the scenario (default: standard output)')
    .option('--force', 'replace FILE if it already exists', false)
    .action(async (file: string | undefined, options: { force: boolean }) => {
      if (file === undefined) {
        process.stdout.write(starterScenario());
        return;
      }
      await writeFileSafely(file, starterScenario(), options.force);
      process.stderr.write(`${file}: written; check it with: singleshot check ${file}\n`);
    });
}
