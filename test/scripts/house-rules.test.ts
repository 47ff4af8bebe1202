/**
 * The house rules (`npm run check:house`) on small made-up trees, not on src/: a tree that
 * keeps every rule passes, and a tree with one breach of each rule fails with exactly those
 * breaches, so no rule is silently off (e.g. if the checker stopped reading .ts files) and none
 * fires on an allowed import. Plus: the checker reads every .ts file of the real src/.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { findInlineImportTypes } from '../../scripts/house-imports.ts';
import { checkHouse, countLines, formatTable, isGenerated } from '../../scripts/house-lines.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const CRUISER = join(ROOT, 'node_modules', 'dependency-cruiser', 'bin', 'dependency-cruise.mjs');
const CONFIG = join(ROOT, '.dependency-cruiser.cjs');
const base = mkdtempSync(join(tmpdir(), 'singleshot-house-'));
afterAll(() => rmSync(base, { recursive: true, force: true }));
let n = 0;

/** A tree under a fresh folder, with the repository's node_modules for package imports. */
function tree(files: Record<string, string>): string {
  const root = join(base, `tree-${n++}`);
  for (const [path, text] of Object.entries(files)) {
    mkdirSync(dirname(join(root, path)), { recursive: true });
    writeFileSync(join(root, path), text);
  }
  symlinkSync(join(ROOT, 'node_modules'), join(root, 'node_modules'), 'dir');
  return root;
}

const lines = (k: number, first = '// code') => `${first}\n${'const x = 1;\n'.repeat(k - 1)}`;

/** Every layer, importing only what it may: stages from stages, io from stages, and so on. */
const GOOD: Record<string, string> = {
  'src/errors.ts': 'export class InputError extends Error {}\n',
  'src/index.ts': "export { useCase } from './app/use-case.ts';\n",
  'src/random/stream.ts': "import { InputError } from '../errors.ts';\nexport const stream = () => new InputError('x');\n",
  'src/physics/level.ts':
    "import { stream } from '../random/stream.ts';\nimport type { Scenario } from '../scenario/types.ts';\n"
    + 'export const level = (s: Scenario) => s.x + String(stream());\n',
  'src/signal/trace.ts': "import { level } from '../physics/level.ts';\nexport const trace = level;\n",
  'src/dsp/filter.ts': "import { trace } from '../signal/trace.ts';\nexport const filter = trace;\n",
  'src/classify/score.ts': "import { filter } from '../dsp/filter.ts';\nexport const score = filter;\n",
  'src/analysis/tally.ts':
    "import erfc from '@stdlib/math-base-special-erfc';\nimport { score } from '../classify/score.ts';\n"
    + 'export const tally = [score, erfc];\n',
  'src/scenario/types.ts': 'export interface Scenario { x: number }\n',
  'src/scenario/load.ts':
    "import { readFileSync } from 'node:fs';\nimport { InputError } from '../errors.ts';\n"
    + "import type { Scenario } from './types.ts';\n"
    + 'export const load = (p: string): Scenario => { if (!p) throw new InputError(p); return JSON.parse(readFileSync(p, "utf8")); };\n',
  'src/engine/batch.ts':
    "import { tally } from '../analysis/tally.ts';\nimport { load } from '../scenario/load.ts';\nexport const batch = [tally, load];\n",
  'src/run/points.ts':
    "import { Worker } from 'node:worker_threads';\nimport { batch } from '../engine/batch.ts';\nexport const points = [batch, Worker];\n",
  'src/io/table.ts':
    "import { writeFileSync } from 'node:fs';\nimport { tally } from '../analysis/tally.ts';\n"
    + "import type { Scenario } from '../scenario/types.ts';\nimport { load } from '../scenario/load.ts';\n"
    + 'export const table = (s: Scenario) => [writeFileSync, tally, load, s];\n',
  'src/app/use-case.ts':
    "import { points } from '../run/points.ts';\nimport { table } from '../io/table.ts';\n"
    + "export const useCase = async () => [points, table, await import('yaml')];\n",
  'src/library/api.ts': "import { useCase } from '../app/use-case.ts';\nexport const api = useCase;\n",
  'src/cli/main.ts': "import { useCase } from '../app/use-case.ts';\nimport { api } from '../library/api.ts';\nexport const main = [useCase, api];\n",
  'test/support/helper.ts': 'export const helper = 1;\n',
};

/**
 * One breach of each rule: [file, its text, the rule, what it imports ('' for a module rule)].
 * A cycle is reported once, at one of its files: cycle-b.ts has no rule of its own.
 */
const BREACHES: [string, string, string, string][] = [
  ['src/analysis/cycle-a.ts', "import { b } from './cycle-b.ts';\nexport const a = () => b;\n", 'no-circular', 'src/analysis/cycle-b.ts'],
  ['src/analysis/cycle-b.ts', "import { a } from './cycle-a.ts';\nexport const b = () => a;\n", '', ''],
  ['src/dsp/type-only.ts', "import type { load } from '../scenario/load.ts';\nexport type L = typeof load;\n", 'stages-import-only-stages', 'src/scenario/load.ts'],
  ['src/classify/engine.ts', "import type { batch } from '../engine/batch.ts';\nexport type B = typeof batch;\n", 'stages-import-only-stages', 'src/engine/batch.ts'],
  ['src/random/top.ts', "export type { Scenario } from '../scenario/types.ts';\nexport * from '../index.ts';\n", 'stages-import-only-stages', 'src/index.ts'],
  ['src/physics/io.ts', "export { table } from '../io/table.ts';\n", 'stages-import-only-stages', 'src/io/table.ts'],
  ['src/signal/files.ts', "import { readFileSync } from 'node:fs';\nexport const r = readFileSync;\n", 'stages-no-node-builtins', 'fs'],
  ['src/analysis/os.ts', "import os from 'os';\nexport const cpus = os.cpus;\n", 'stages-no-node-builtins', 'os'],
  ['src/scenario/io.ts', "import type { table } from '../io/table.ts';\nexport type T = typeof table;\n", 'scenario-not-downstream', 'src/io/table.ts'],
  ['src/engine/run.ts', "import { points } from '../run/points.ts';\nexport const p = points;\n", 'engine-not-downstream', 'src/run/points.ts'],
  ['src/run/io.ts', "import { table } from '../io/table.ts';\nexport const t = table;\n", 'run-not-downstream', 'src/io/table.ts'],
  ['src/io/app.ts', "export type { useCase } from '../app/use-case.ts';\n", 'io-bytes-only', 'src/app/use-case.ts'],
  ['src/io/engine.ts', "import { batch } from '../engine/batch.ts';\nexport const b = batch;\n", 'io-bytes-only', 'src/engine/batch.ts'],
  ['src/app/cli.ts', "import { main } from '../cli/main.ts';\nexport const m = main;\n", 'app-not-cli', 'src/cli/main.ts'],
  ['src/app/library.ts', "import type { api } from '../library/api.ts';\nexport type A = typeof api;\n", 'app-not-cli', 'src/library/api.ts'],
  ['src/library/cli.ts', "import { main } from '../cli/main.ts';\nexport const m = main;\n", 'library-not-cli', 'src/cli/main.ts'],
  ['src/dev.ts', "import { helper } from '../test/support/helper.ts';\nexport const h = helper;\n", 'src-not-dev-folders', 'test/support/helper.ts'],
  ['src/missing.ts', "import { nothing } from './nowhere.ts';\nexport const y = nothing;\n", 'no-unresolvable', './nowhere.ts'],
  ['src/classify/orphan.ts', 'export const lonely = 1;\n', 'no-orphans', ''],
];

interface Violation { from: string; to: string; rule: { name: string } }

function cruise(root: string): Violation[] {
  const run = spawnSync(process.execPath, [CRUISER, '--config', CONFIG, '--output-type', 'json', 'src'], { cwd: root, encoding: 'utf8' });
  expect(run.stderr).toBe('');
  return (JSON.parse(run.stdout) as { summary: { violations: Violation[] } }).summary.violations;
}

function checkHouseCli(root: string, ...flags: string[]): { status: number | null; out: string } {
  const run = spawnSync(process.execPath, [join(ROOT, 'bin', 'run-ts.js'), join(ROOT, 'scripts', 'check-house.ts'), '--root', root, ...flags], { encoding: 'utf8' });
  return { status: run.status, out: run.stdout + run.stderr };
}

describe('dependency rules (.dependency-cruiser.cjs)', () => {
  it('pass a tree whose every layer imports only what it may', () => {
    const r = checkHouseCli(tree(GOOD));
    expect(r.out).toContain('no dependency violations found');
    expect(r.out).toContain('no size violations');
    expect(r.status).toBe(0);
  }, 30_000);

  it('report one breach of each rule, type-only imports included, and nothing else', () => {
    const files = { ...GOOD, ...Object.fromEntries(BREACHES.map(([file, text]) => [file, text])) };
    const found = cruise(tree(files));
    const cycle = found.filter((v) => v.rule.name === 'no-circular');
    expect(cycle).toHaveLength(1);
    expect([cycle[0]!.from, cycle[0]!.to].sort()).toEqual(['src/analysis/cycle-a.ts', 'src/analysis/cycle-b.ts']);
    for (const [file, , rule, to] of BREACHES) {
      if (rule === '') continue;
      const hit = found.some((v) => v.rule.name === rule && v.from === file && (to === '' || v.to === to));
      expect(hit, `${rule}: ${file} → ${to}`).toBe(true);
    }
    const breachFiles = new Set(BREACHES.map(([file]) => file));
    expect(found.filter((v) => !breachFiles.has(v.from))).toEqual([]);
    // every rule in the configuration is exercised here
    expect(new Set(found.map((v) => v.rule.name))).toEqual(new Set(BREACHES.map(([, , rule]) => rule).filter((r) => r !== '')));
  }, 30_000);

  it('see every .ts file of the real src/', () => {
    const run = spawnSync(process.execPath, [CRUISER, '--config', CONFIG, '--output-type', 'json', 'src'], { cwd: ROOT, encoding: 'utf8' });
    const modules = (JSON.parse(run.stdout) as { modules: { source: string; dependencies: unknown[] }[] }).modules;
    const seen = new Set(modules.map((m) => m.source));
    const sources = (readdirSync(join(ROOT, 'src'), { recursive: true }) as string[])
      .filter((f) => f.endsWith('.ts')).map((f) => `src/${f.split('\\').join('/')}`);
    expect(sources.length).toBeGreaterThan(50);
    expect(sources.filter((f) => !seen.has(f))).toEqual([]);
    expect(modules.find((m) => m.source === 'src/index.ts')!.dependencies.length).toBeGreaterThan(0);
  }, 30_000);
});

describe('inline import types (house-imports.ts)', () => {
  it("finds a type written as import('…') and leaves a dynamic import of code alone", () => {
    const root = tree({
      'src/physics/query.ts': "import { x } from './x.ts';\nexport const y = x;\nexport type W = import('../run/pool.ts').Pool;\n",
      'src/physics/x.ts': 'export const x = 1;\n',
      'src/app/load.ts': "export const vega = async () => (await import('vega')).version;\n",
    });
    expect(findInlineImportTypes(root)).toEqual([
      "src/physics/query.ts:3: import('../run/pool.ts') used as a type; write `import type` so that the dependency rules see it",
    ]);
  });
});

describe('size rules (house-lines.ts)', () => {
  it('counts lines as wc -l does, plus an unterminated last line', () => {
    expect(countLines('')).toBe(0);
    expect(countLines('a\nb\n')).toBe(2);
    expect(countLines('a\nb')).toBe(2);
    expect(isGenerated('// Generated by `npm run build:wasm` from k.wat; do not edit.\nconst A = 1;\n')).toBe(true);
    expect(isGenerated('// ordinary\n// Generated by a script\n')).toBe(false);
  });

  it('allow 400 lines per file and 2,500 per folder, and flag one more of either', () => {
    const root = tree({
      'src/a/ok.ts': lines(400),
      'src/a/long.ts': lines(401),
      'src/a/long.wat': lines(500, ';; text'),
      'src/a/notes.md': lines(900),
      'src/a/made.ts': lines(900, '// Generated by a script; do not edit.'),
      ...Object.fromEntries(Array.from({ length: 7 }, (_, i) => [`src/fat/f${i}.ts`, lines(i === 0 ? 101 : 400)])),
      'src/fat/sub/deep.ts': lines(300),
      'src/lean/f0.ts': lines(100),
      ...Object.fromEntries(Array.from({ length: 6 }, (_, i) => [`src/lean/f${i + 1}.ts`, lines(400)])),
    });
    const report = checkHouse(root);
    expect(report.violations).toEqual([
      'src/a/long.ts: 401 lines (limit 400 per file)',
      'src/a/long.wat: 500 lines (limit 400 per file)',
      'src/fat/: 2501 lines in its own files (limit 2500 per folder)',
    ]);
    const a = report.folders.find((f) => f.folder === 'src/a')!;
    expect([a.files, a.lines, a.generatedLines, a.largest?.path]).toEqual([4, 1301, 900, 'src/a/long.wat']);
    expect(report.folders.find((f) => f.folder === 'src/lean')!.lines).toBe(2500);
    expect(report.folders.find((f) => f.folder === 'src/fat/sub')!.lines).toBe(300);
    expect(formatTable(report.folders)).toMatch(/^total\s+19\s+6602\s+900$/m);

    const r = checkHouseCli(root, '--lines-only');
    expect(r.status).toBe(1);
    expect(r.out).toContain('  error src/a/long.ts: 401 lines (limit 400 per file)');
    expect(r.out).toContain('x 3 size violations');
  }, 30_000);
});
