/**
 * `npm run bench`: every case in bench/cases/, each beside the numpy baseline measured in the
 * same run, with the ratio. Speed lives here, never in tests.
 *
 * This machine's speed drifts by up to 2× over seconds (shared host), so a case with a baseline
 * runs in ROUNDS paired rounds — baseline, then case, back to back — and the ratio reported is
 * the median of the rounds' ratios (each round compares two measurements a few seconds apart);
 * the rates shown are the medians of each side. `npm run bench -- FILTER [ROUNDS]`.
 */
import { execFileSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { median, type BenchCase } from './harness.ts';

const here = dirname(fileURLToPath(import.meta.url));
const filter = process.argv[2];
const ROUNDS = Number(process.argv[3] ?? 5);

function baseline(name: string): Record<string, number | string> {
  const script = join(here, `${name.replace('numpy-', 'numpy_')}.py`);
  const env = { ...process.env };
  // current numpy is slowed by these (set on some processors for old OpenBLAS builds)
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  const out = execFileSync('python3', [script, '2'], { encoding: 'utf8', env });
  return JSON.parse(out.trim().split('\n').pop()!) as Record<string, number | string>;
}

const fmt = (x: number): string => (x >= 1e6 ? `${(x / 1e6).toFixed(1)} M` : x >= 1e3 ? `${(x / 1e3).toFixed(1)} k` : x.toFixed(1));

const files = readdirSync(join(here, 'cases')).filter((f) => f.endsWith('.ts')).sort();
const cases: BenchCase[] = [];
for (const f of files) {
  const mod = (await import(pathToFileURL(join(here, 'cases', f)).href)) as { cases: BenchCase[] };
  cases.push(...mod.cases);
}
console.log(`singleshot benchmarks — node ${process.version}, ${cases.length} cases; cases with a numpy baseline in ${ROUNDS} paired rounds`);
for (const c of cases) {
  if (filter && !c.name.includes(filter)) continue;
  if (!c.baseline || !c.baselineField) {
    const r = await c.run();
    console.log(`${c.name}: ${fmt(r.rate)} ${c.unit}${r.detail ? `  [${r.detail}]` : ''}`);
    continue;
  }
  const ours: number[] = [], refs: number[] = [], ratios: number[] = [];
  let detail = '', numpy = '';
  for (let k = 0; k < ROUNDS; k++) {
    const b = baseline(c.baseline);
    numpy = String(b.numpy);
    const r = await c.run();
    const ref = Number(b[c.baselineField]);
    ours.push(r.rate); refs.push(ref); ratios.push(r.rate / ref);
    detail = r.detail ?? '';
  }
  console.log(
    `${c.name}: ${fmt(median(ours))} ${c.unit}  (${median(ratios).toFixed(2)}× ${c.baseline}, median of ${ROUNDS} paired rounds: `
    + `${ratios.map((x) => x.toFixed(2)).join(', ')}; numpy ${numpy} ${fmt(median(refs))} ${c.unit})${detail ? `  [last round: ${detail}]` : ''}`,
  );
}
