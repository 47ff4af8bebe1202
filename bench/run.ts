/**
 * `npm run bench`: every case in bench/cases/, each beside the numpy baseline measured in the
 * same run, with the ratio. Speed lives here, never in tests.
 */
import { execFileSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { BenchCase } from './harness.ts';

const here = dirname(fileURLToPath(import.meta.url));
const filter = process.argv[2];

function baseline(name: string): Record<string, number | string> {
  const script = join(here, `${name.replace('numpy-', 'numpy_')}.py`);
  const env = { ...process.env };
  // current numpy is slowed by these (set on some processors for old OpenBLAS builds)
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  const out = execFileSync('python3', [script, '4'], { encoding: 'utf8', env });
  return JSON.parse(out.trim().split('\n').pop()!) as Record<string, number | string>;
}

const fmt = (x: number): string => (x >= 1e6 ? `${(x / 1e6).toFixed(1)} M` : x >= 1e3 ? `${(x / 1e3).toFixed(1)} k` : x.toFixed(1));

const files = readdirSync(join(here, 'cases')).filter((f) => f.endsWith('.ts')).sort();
const cases: BenchCase[] = [];
for (const f of files) {
  const mod = (await import(pathToFileURL(join(here, 'cases', f)).href)) as { cases: BenchCase[] };
  cases.push(...mod.cases);
}
const baselines = new Map<string, Record<string, number | string>>();
console.log(`singleshot benchmarks — node ${process.version}, ${cases.length} cases`);
for (const c of cases) {
  if (filter && !c.name.includes(filter)) continue;
  if (c.baseline && !baselines.has(c.baseline)) {
    const b = baseline(c.baseline);
    baselines.set(c.baseline, b);
    console.log(`baseline ${c.baseline} (numpy ${b.numpy}): ${fmt(Number(b.samples_per_s ?? 0))} samples/s, ${fmt(Number(b.shots_per_s))} shots/s`);
  }
  const r = await c.run();
  let line = `${c.name}: ${fmt(r.rate)} ${c.unit}`;
  if (c.baseline && c.baselineField) {
    const ref = Number(baselines.get(c.baseline)![c.baselineField]);
    line += `  (${(r.rate / ref).toFixed(2)}× ${c.baseline})`;
  }
  if (r.detail) line += `  [${r.detail}]`;
  console.log(line);
}
