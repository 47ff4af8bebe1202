/**
 * `npm run check:house`: the house rules. First the dependency rules (dependency-cruiser with
 * .dependency-cruiser.cjs: which folder may import which, no cycles, no Node built-ins in the
 * pure stages) and the one form of import they cannot see (house-imports.ts), then the size
 * rules of house-lines.ts (lines per file and per folder). Prints
 * one line per violation and the lines-per-folder table; exits 1 if either part found a
 * violation, 2 if a part could not run.
 *
 *   node bin/run-ts.js scripts/check-house.ts [--root DIR] [--lines-only]
 *
 * --root checks another copy of the tree (default: this repository); --lines-only skips the
 * import rules.
 */
import { spawnSync } from 'node:child_process';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { findInlineImportTypes } from './house-imports.ts';
import { checkHouse, FILE_LIMIT, FOLDER_LIMIT, formatTable } from './house-lines.ts';

const repo = join(dirname(fileURLToPath(import.meta.url)), '..');
const args = process.argv.slice(2);
let root = repo;
let linesOnly = false;
for (let i = 0; i < args.length; i++) {
  const arg = args[i];
  if (arg === '--root' && args[i + 1] !== undefined) root = resolve(args[++i]!);
  else if (arg === '--lines-only') linesOnly = true;
  else {
    console.error(`check-house: unknown argument ${arg}\nusage: check-house.ts [--root DIR] [--lines-only]`);
    process.exit(2);
  }
}

let failed = false;

if (!linesOnly) {
  console.log('-- dependency rules (.dependency-cruiser.cjs)');
  const started = performance.now();
  const cruiser = spawnSync(
    process.execPath,
    [join(repo, 'node_modules/dependency-cruiser/bin/dependency-cruise.mjs'),
      '--config', join(repo, '.dependency-cruiser.cjs'), '--output-type', 'err', 'src'],
    { cwd: root, stdio: 'inherit' },
  );
  const seconds = (performance.now() - started) / 1000;
  if (cruiser.error || cruiser.status === null) {
    console.error(`check-house: dependency-cruiser did not run: ${cruiser.error?.message ?? cruiser.signal}`);
    process.exit(2);
  }
  console.log(`(dependency rules: ${seconds.toFixed(1)} s)`);
  if (cruiser.status !== 0) failed = true;

  console.log("-- no inline import('…') types (the dependency rules cannot see them)");
  const inline = findInlineImportTypes(root);
  for (const line of inline) console.log(`  error ${line}`);
  console.log(inline.length === 0 ? 'none' : `x ${inline.length} inline import type${inline.length === 1 ? '' : 's'}`);
  if (inline.length > 0) failed = true;
}

console.log(`-- size rules (at most ${FILE_LIMIT} lines per file, ${FOLDER_LIMIT} per folder's own files)`);
const started = performance.now();
const report = checkHouse(root);
const seconds = (performance.now() - started) / 1000;
console.log(formatTable(report.folders));
for (const violation of report.violations) console.log(`  error ${violation}`);
console.log(report.violations.length === 0
  ? `no size violations (${seconds.toFixed(2)} s)`
  : `x ${report.violations.length} size violation${report.violations.length === 1 ? '' : 's'} (${seconds.toFixed(2)} s)`);
if (report.violations.length > 0) failed = true;

process.exit(failed ? 1 : 0);
