/**
 * The library's defaults are the command line's: the CLI's options show the values of
 * `DEFAULTS` (so a default is declared once), a library run with no options writes what the
 * command writes, and the command files load no heavy package before a command runs.
 */
import { readFileSync, readdirSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEFAULTS } from '../../src/index.ts';
import { makeRunCommand } from '../../src/cli/commands/run.ts';
import { makeFitCommand } from '../../src/cli/commands/fit.ts';
import { makeMergeCommand } from '../../src/cli/commands/merge.ts';
import { makeAnalyzeCommand } from '../../src/cli/commands/analyze.ts';
import type { Command } from 'commander';

function option(c: Command, flag: string) {
  const o = c.options.find((x) => x.long === flag);
  if (!o) throw new Error(`${c.name()} has no ${flag}`);
  return o;
}

describe('the library defaults are the CLI defaults', () => {
  const run = makeRunCommand(), fit = makeFitCommand(), merge = makeMergeCommand(), analyze = makeAnalyzeCommand();

  it.each([
    ['run --engine', () => option(run, '--engine').defaultValue, DEFAULTS.engine],
    ['run --no-report (report written)', () => run.getOptionValue('report'), DEFAULTS.report],
    ['run --no-shots-table (shots table written)', () => run.getOptionValue('shotsTable'), DEFAULTS.shotsTable],
    ['merge --no-report (report written)', () => merge.getOptionValue('report'), DEFAULTS.report],
    ['fit --no-report (report written)', () => fit.getOptionValue('report'), DEFAULTS.report],
    ['run --force off', () => option(run, '--force').defaultValue ?? false, DEFAULTS.force],
    ['run --parquet off', () => option(run, '--parquet').defaultValue ?? false, DEFAULTS.parquet],
    ['analyze --parquet off', () => option(analyze, '--parquet').defaultValue ?? false, DEFAULTS.parquet],
  ])('%s', (_what, cli, library) => expect(cli()).toBe(library));

  it.each([
    ['run --refine-points', () => option(run, '--refine-points').description, `(default ${DEFAULTS.refinePoints})`],
    ['fit --resamples', () => option(fit, '--resamples').description, `(default ${DEFAULTS.resamples})`],
    ['fit --seed', () => option(fit, '--seed').description, `(default ${DEFAULTS.bootstrapSeed})`],
  ])('%s: the help text shows the library default', (_what, text, shown) => expect(text()).toContain(shown));

  it('the values the CLI had before (engine auto, refine 6, 30 resamples, seed 1)', () => {
    // common practice, no source: the documented defaults of the commands
    expect(DEFAULTS).toMatchObject({ engine: 'auto', report: true, shotsTable: true, refinePoints: 6, resamples: 30, bootstrapSeed: 1, force: false, parquet: false });
  });
});

/** Packages a command must not load before it runs (each is seconds of start-up or megabytes). */
const HEAVY = ['apache-arrow', 'vega', 'vega-lite', 'h5wasm', 'parquet-wasm'];

/** The packages a file loads at once: its static, non-type imports, followed through the project's files. */
function eagerPackages(start: string): Map<string, string> {
  const seen = new Set<string>(), found = new Map<string, string>();
  const visit = (file: string) => {
    if (seen.has(file)) return;
    seen.add(file);
    const text = readFileSync(file, 'utf8');
    for (const m of text.matchAll(/^(?:import|export)\s+(?!type\b)([^;]*?)\s+from\s+'([^']+)'/gms)) {
      const names = m[1]!.trim();
      if (/^\{[^}]*\}$/s.test(names) && names.slice(1, -1).split(',').every((n) => n.trim() === '' || n.trim().startsWith('type '))) continue;
      const spec = m[2]!;
      if (spec.startsWith('.')) visit(resolve(dirname(file), spec));
      else if (!spec.startsWith('node:') && !found.has(spec)) found.set(spec, file);
    }
  };
  visit(resolve(start));
  return found;
}

describe('command files load the library on first use', () => {
  const DIR = 'src/cli/commands';
  it.each(readdirSync(DIR).filter((f) => f.endsWith('.ts')))('%s loads no heavy package at start-up', (file) => {
    const packages = eagerPackages(join(DIR, file));
    const heavy = [...packages].filter(([p]) => HEAVY.includes(p)).map(([p, via]) => `${p} (via ${via})`);
    expect(heavy).toEqual([]);
    expect(packages.has('commander')).toBe(true);
  });

  it('the walk sees a heavy package where one is loaded (the library itself loads apache-arrow)', () => {
    expect([...eagerPackages('src/library/run.ts').keys()]).toContain('apache-arrow');
  });
});
