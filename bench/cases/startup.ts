/**
 * Start-up, as a user meets it: whole processes of `singleshot --version` and
 * `singleshot check scenarios/demo.yaml` through bin/singleshot.js (the built package), each as
 * a ratio to a bare Node start (`node -e 0`) measured in the same rounds — the part of a command's
 * time that is the tool's own. Rounds alternate the three commands so that load on the machine
 * hits all alike; the figure is the median of the rounds' ratios.
 *
 * `BENCH_STARTUP_BEFORE=/path/to/an/older/checkout` adds the same commands of that checkout (its
 * own bin/singleshot.js and node_modules), to set the start-up before a change beside after.
 * Target (issue 17): `check` within 4× of a bare Node start.
 */
import { execFileSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { median, type BenchCase } from '../harness.ts';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const ROUNDS = 15;

/** Wall-clock seconds of one process. */
function wall(args: readonly string[], cwd: string): number {
  const t0 = performance.now();
  execFileSync(process.execPath, args, { cwd, stdio: 'ignore' });
  return (performance.now() - t0) / 1000;
}


function startupCase(name: string, tree: string, command: readonly string[]): BenchCase {
  return {
    name,
    unit: '× a bare Node start',
    async run() {
      const ratios: number[] = [], ours: number[] = [], bare: number[] = [];
      wall(['bin/singleshot.js', ...command], tree); // warm the file cache
      for (let k = 0; k < ROUNDS; k++) {
        const b = wall(['-e', '0'], tree);
        const t = wall(['bin/singleshot.js', ...command], tree);
        ratios.push(t / b); ours.push(t); bare.push(b);
      }
      return { rate: median(ratios), detail: `median of ${ROUNDS}: ${(1000 * median(ours)).toFixed(0)} ms, node -e 0 ${(1000 * median(bare)).toFixed(0)} ms` };
    },
  };
}

const trees: [string, string][] = [['', root]];
const before = process.env.BENCH_STARTUP_BEFORE;
if (before) trees.push([' (before)', before]);

export const cases: BenchCase[] = trees.flatMap(([label, tree]) => [
  startupCase(`start-up: singleshot --version${label}`, tree, ['--version']),
  startupCase(`start-up: singleshot check scenarios/demo.yaml${label}`, tree, ['check', 'scenarios/demo.yaml']),
]);
