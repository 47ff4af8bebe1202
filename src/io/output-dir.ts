/**
 * The output folder of a run: created if missing; refused if it holds anything unless the user
 * said --force (then files are replaced one by one, each atomically).
 */
import { mkdirSync, readdirSync, rmSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../errors.ts';
import { TEMP_MARKER } from './atomic-file.ts';

export function prepareOutputDir(dir: string, force: boolean): void {
  let exists = false;
  try {
    const st = statSync(dir);
    if (!st.isDirectory()) throw new InputError(dir, '', 'is not a folder; --out needs a folder');
    exists = true;
  } catch (e) {
    if (e instanceof InputError) throw e;
  }
  if (!exists) {
    mkdirSync(dir, { recursive: true });
    return;
  }
  const entries = readdirSync(dir);
  // leftovers of an interrupted run are never results: clear them
  for (const e of entries.filter((n) => n.startsWith(TEMP_MARKER))) rmSync(join(dir, e), { force: true });
  const real = entries.filter((n) => !n.startsWith(TEMP_MARKER));
  if (real.length > 0 && !force) {
    throw new InputError(dir, '', `is not empty (${real.length} entries); choose another --out or add --force to replace its files`);
  }
}
