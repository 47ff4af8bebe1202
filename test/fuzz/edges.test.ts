/**
 * Scenarios at the edges of every bound `check` applies (fixed seed): each numeric key of the
 * base documents set to the edges of its dimension's bounds (scenario/bounds.ts: the smallest and
 * largest magnitude allowed, just inside and just outside, either sign), to 0, to the extremes of
 * a double, and — for the bounds that join keys (scenario/limits.ts: samples per record, jumps and
 * switches per record, levels after the gain) — pairs of keys set to just inside and just outside
 * them; then random pairs and triples of such edits. Every scenario must be refused by `check`
 * with an InputError, or accepted with a finite estimate; of the accepted ones a subset runs end
 * to end at a small shot count (RUN_SHOTS), and each must finish within its estimate × 3 (CPU
 * time of this thread, so that a loaded machine does not count) with only finite values in every
 * table — or be refused at run with one InputError, which only a calibration that drew no shot of
 * an outcome may cause.
 *
 * EDGES_REPORT=1 prints the counts (inputs tried, refused, accepted, run) for the record.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, expect, it } from 'vitest';
import fc from 'fast-check';
import { BASES, FUZZ_SEED, numericPaths, safeJson } from './harness.ts';
import { parseScenarioText } from '../../src/scenario/parse.ts';
import { parseQuantity, type Dimension } from '../../src/scenario/units.ts';
import { DIMENSION_RANGES, PLAIN_MAX } from '../../src/scenario/bounds.ts';
import { MAX_JUMPS_PER_RECORD, MAX_RECORD_SAMPLES, MAX_SIGNAL, MIN_SIGNAL } from '../../src/scenario/limits.ts';
import { InputError } from '../../src/errors.ts';
import { checkScenarioDocument } from '../../src/app/check.ts';
import { estimateRun } from '../../src/run/estimate.ts';
import { chooseEngine } from '../../src/engine/choose.ts';
import { runToDirectory } from '../../src/app/run-to-directory.ts';
import { openRunFolder } from '../../src/app/run-folder.ts';
import { readRunTables, readPointValues } from '../../src/io/report/read-run.ts';
import type { RunEstimate } from '../../src/run/estimate.ts';

/** At least this many scenarios are tried (the acceptance asks for 10^4). */
const TRIED_AT_LEAST = 10_000;
/** Random combinations of two or three edge edits added to the single ones. */
const COMBINATIONS = 6000;
/** Scenarios run end to end, and their shot counts. */
const RUNS = 120;
const RUN_SHOTS = 512;
/** Runs estimated longer than this are not attempted here (a unit test's budget). */
const RUN_SECONDS = 0.25;
/** Slack added to 3 × the estimate: timer and garbage-collector jitter of a tiny run. */
const SLACK_SECONDS = 0.05;

const ROOT = join(import.meta.dirname, '..', '..');
const tiny = (extra: string) => parseScenarioText(`${readFileSync(join(ROOT, 'test', 'fixtures', 'reliability', 'tiny.yaml'), 'utf8')}${extra}`, 'tiny.yaml');
import { readFileSync } from 'node:fs';

/** The bases: the fuzz suite's, and tiny ones with the features they lack. */
const DOCS: Record<string, unknown> = {
  ...BASES,
  telegraph: tiny('    telegraph: { amplitude: 20 pA, dwellLow: 30 us, dwellHigh: 10 us, injection: amplifier }\n'),
  likelihood: tiny('processing: { classifier: likelihood }\n'),
  optimal: tiny('processing: { weights: optimal, filter: { fir: { taps: 5, cutoff: 2 MHz } }, decimate: 2, ambiguousBand: { fraction: 0.1 } }\npreparationError: { low: { probability: 0.01 } }\nmappingError: { high: { probability: 0.02, dephasing: 0.01 } }\n'),
};

/** SI unit written for a dimension vector (time, current, energy, temperature, angle). */
const SI_UNITS: [Dimension, string][] = [
  [[1, 0, 0, 0, 0], 's'], [[-1, 0, 0, 0, 0], 'Hz'], [[0, 0, 1, 0, 0], 'J'], [[0, 0, 0, 1, 0], 'K'], [[0, 0, 0, 0, 1], 'rad'],
  [[-1, -2, 1, 0, 0], 'Ohm'], [[-1, 0, 1, 0, 0], 'J/s'], [[0, 1, 0, 0, 0], 'A'], [[-1, -1, 1, 0, 0], 'V'],
  [[0.5, 1, 0, 0, 0], 'A/rtHz'], [[-0.5, -1, 1, 0, 0], 'V/rtHz'], [[0.5, 0, 1, 0, 0], 'J/rtHz'],
];
const unitOf = (d: Dimension) => SI_UNITS.find(([x]) => x.every((v, i) => v === d[i]))?.[1] ?? null;

/** Magnitude bounds a value of this unit may meet (signal-like units meet the sensor's narrower ones too). */
function rangesOf(unit: string | null): { min: number; max: number }[] {
  const r = DIMENSION_RANGES;
  switch (unit) {
    case 's': return [r.time];
    case 'Hz': return [r.frequency];
    case 'J': return [r.energy];
    case 'K': return [r.temperature];
    case 'rad': return [r.angle];
    case 'Ohm': return [r.resistance];
    case 'J/s': return [r.sweepRate];
    case 'A': case 'V': return [r.signal, r.bias];
    case 'J/rtHz': return [r.energyDensity];
    case 'A/rtHz': case 'V/rtHz': return [r.signal];
    default: return [{ min: 1, max: PLAIN_MAX }];
  }
}

const EPS = 1e-9;
const EXTREMES = [0, 5e-324, 1e-300, 1, 1e300, Number.MAX_VALUE];

/** The edge values of one key, written like its value (a plain number, or SI with the unit). */
function edgeValues(current: unknown): unknown[] {
  let unit: string | null = null;
  let integer = false;
  if (typeof current === 'string') {
    try {
      const q = parseQuantity(current);
      unit = q.plain ? null : unitOf(q.dim);
    } catch {
      return [];
    }
  } else if (typeof current === 'number') integer = Number.isInteger(current);
  const magnitudes = new Set<number>(EXTREMES);
  for (const r of rangesOf(unit)) for (const x of [r.min, r.max, r.min * (1 - EPS), r.max * (1 + EPS)]) magnitudes.add(x);
  if (integer) for (const x of [2, 63, 64, 65, 1023, 1024, 1025, 2 ** 21, 2 ** 31, 2 ** 32, 2 ** 32 + 1, 2 ** 53 - 1, 2 ** 53]) magnitudes.add(x);
  if (unit === null) for (const x of [1 - EPS, 1 + EPS, 0.5]) magnitudes.add(x);
  const out: unknown[] = [];
  for (const m of magnitudes) {
    for (const v of m === 0 ? [0] : [m, -m]) out.push(unit === null ? v : `${v} ${unit}`);
  }
  return out;
}

type Key = string | number;
function setAt(doc: unknown, path: readonly Key[], value: unknown): void {
  let node = doc as Record<Key, unknown>;
  for (const k of path.slice(0, -1)) node = node[k] as Record<Key, unknown>;
  node[path[path.length - 1]!] = value;
}

/** One edit: a key and the value put there. */
interface Edit {
  path: Key[];
  value: unknown;
}

/** Edits that meet the bounds joining keys (scenario/limits.ts), just inside and just outside. */
function joinedEdges(base: string): Edit[][] {
  const out: Edit[][] = [];
  for (const f of [1 - EPS, 1 + EPS]) {
    // samples per record = record length × sample rate
    out.push([{ path: ['timing', 'sampleRate'], value: '1e9 Hz' }, { path: ['timing', 'recordLength'], value: `${(MAX_RECORD_SAMPLES / 1e9) * f} s` }]);
    if (base === 'starter' || base === 'telegraph' || base === 'likelihood' || base === 'optimal') {
      // expected jumps per record = rate × record length (tiny's record is 2 us)
      const record = base === 'starter' ? 20e-6 : 2e-6;
      out.push([{ path: ['transitions', 0, 'lifetime'], value: `${record / (MAX_JUMPS_PER_RECORD * f)} s` }]);
      out.push([{ path: ['states', 1, 'level'], value: `${MAX_SIGNAL * f} A` }]);
      out.push([{ path: ['states', 1, 'level'], value: `${MIN_SIGNAL / f} A` }]);
    }
    if (base === 'telegraph') {
      out.push([{ path: ['signal', 'noise', 'telegraph', 'dwellLow'], value: `${2e-6 / (1e6 * f)} s` }]);
    }
  }
  return out;
}

/** What is wrong with an accepted scenario's estimate, or null. */
function estimateProblem(e: RunEstimate): string | null {
  for (const [k, v] of Object.entries({ seconds: e.seconds, memory: e.memoryBytes, disk: e.diskBytes })) {
    if (!(Number.isFinite(v) && v >= 0)) return `estimate ${k} = ${v}`;
  }
  return null;
}

const work = mkdtempSync(join(tmpdir(), 'singleshot-edges-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

it(`at least ${TRIED_AT_LEAST} scenarios at the edges of every bound: refused by check, or run within 3 × the estimate with finite tables`, async () => {
  // every single edit, then the joined bounds, then random combinations
  const candidates: { base: string; edits: Edit[] }[] = [];
  const singles: Record<string, Edit[]> = {};
  for (const [base, doc] of Object.entries(DOCS)) {
    singles[base] = numericPaths(doc).flatMap((path) => {
      let v: unknown = doc;
      for (const k of path) v = (v as Record<Key, unknown>)[k];
      return edgeValues(v).map((value) => ({ path: path as Key[], value }));
    });
    for (const e of singles[base]!) candidates.push({ base, edits: [e] });
    for (const edits of joinedEdges(base)) candidates.push({ base, edits });
  }
  const bases = Object.keys(DOCS);
  const combos = fc.sample(fc.constantFrom(...bases).chain((base) => fc.tuple(fc.constant(base), fc.array(fc.constantFrom(...singles[base]!), { minLength: 2, maxLength: 3 }))), { seed: FUZZ_SEED, numRuns: COMBINATIONS });
  for (const [base, edits] of combos) candidates.push({ base, edits });

  const counts = { tried: 0, refused: 0, accepted: 0, run: 0, refusedAtRun: 0, sweepPoints: 0 };
  const failures: string[] = [];
  const runnable: { label: string; doc: unknown; estimate: number }[] = [];
  const runKeys = new Set<string>();
  for (const c of candidates) {
    const doc = structuredClone(DOCS[c.base]);
    for (const e of c.edits) setAt(doc, e.path, e.value);
    const label = `${c.base}: ${c.edits.map((e) => `${e.path.join('.')} = ${safeJson(e.value)}`).join('; ')}`;
    counts.tried++;
    let checked;
    try {
      checked = checkScenarioDocument(doc, 'edge.yaml');
    } catch (e) {
      // every problem of the file, one line each naming the file and the key
      if (e instanceof InputError && e.message.split('\n').every((l) => l.startsWith('edge.yaml: ') && l.includes(': expected '))) counts.refused++;
      else failures.push(`${label}: check threw ${(e as Error).stack?.split('\n').slice(0, 3).join(' | ')}`);
      continue;
    }
    counts.accepted++;
    counts.sweepPoints += checked.points.length;
    const scenarios = checked.points.map((p) => p.scenario);
    let engine: 'exact' | 'traces';
    try {
      engine = chooseEngine(scenarios, 'auto').engine;
    } catch (e) {
      failures.push(`${label}: the engine choice threw ${String(e)}`);
      continue;
    }
    const problem = estimateProblem(estimateRun(scenarios, { engine }));
    if (problem) failures.push(`${label}: ${problem}`);
    // a small run of the same scenario: is it cheap enough to run here?
    const small = structuredClone(doc) as Record<string, unknown>;
    small.shots = Math.min(checked.loaded.scenario.shots, RUN_SHOTS);
    small.calibrationShots = Math.min(checked.loaded.scenario.calibrationShots, RUN_SHOTS);
    let smallPoints;
    try {
      smallPoints = checkScenarioDocument(small, 'edge.yaml').points;
    } catch {
      continue;
    }
    const estimate = estimateRun(smallPoints.map((p) => p.scenario), { engine: chooseEngine(smallPoints.map((p) => p.scenario), 'auto').engine });
    // one run per key and base first, so that every key's edges run
    const key = `${c.base}: ${c.edits.map((e) => e.path.join('.')).join(' + ')}`;
    if (estimate.seconds <= RUN_SECONDS && estimate.memoryBytes < 2 ** 30 && !runKeys.has(key)) {
      runKeys.add(key);
      runnable.push({ label, doc: small, estimate: estimate.seconds });
    }
  }
  expect(failures.slice(0, 20), `${failures.length} failures`).toEqual([]);
  expect(counts.tried).toBeGreaterThanOrEqual(TRIED_AT_LEAST);
  expect(counts.refused, 'edges outside the bounds are refused').toBeGreaterThan(counts.tried / 10);
  expect(counts.accepted, 'edges inside the bounds are accepted').toBeGreaterThan(counts.tried / 10);

  // end to end: a spread of the runnable ones (fixed order)
  const picked = fc.sample(fc.shuffledSubarray(runnable, { minLength: Math.min(RUNS, runnable.length), maxLength: Math.min(RUNS, runnable.length) }), { seed: FUZZ_SEED, numRuns: 1 })[0]!;
  for (const [k, r] of picked.entries()) {
    const scenarioPath = join(work, `edge-${k}.json`);
    writeFileSync(scenarioPath, JSON.stringify(r.doc));
    const outDir = join(work, `out-${k}`);
    let estimated = 0;
    const before = process.cpuUsage();
    try {
      await runToDirectory({
        scenarioPath, outDir, report: false, engine: 'auto', workers: 1, free: { memoryBytes: 2 ** 40, diskBytes: 2 ** 40 },
        onEstimate: (e) => { estimated = e.seconds; },
      });
    } catch (e) {
      if (e instanceof InputError && /calibrationShots|prepare/.test(e.message)) {
        counts.refusedAtRun++;
        continue;
      }
      failures.push(`${r.label}: run threw ${e instanceof InputError ? e.message : (e as Error).stack?.split('\n').slice(0, 4).join(' | ')}`);
      continue;
    }
    const used = process.cpuUsage(before);
    const seconds = (used.user + used.system) / 1e6;
    counts.run++;
    if (seconds > 3 * estimated + SLACK_SECONDS) failures.push(`${r.label}: took ${seconds.toFixed(3)} s of CPU, more than 3 × the estimate ${estimated.toPrecision(3)} s`);
    // every table reads back through the checking readers: finite values, probabilities in [0, 1]
    try {
      await openRunFolder(outDir);
      const t = readRunTables(outDir);
      for (const row of t.summary.filter((x) => x.point === t.summary[0]!.point)) {
        await readPointValues(outDir, row.point, row.pipeline, t.scenario.states.map((s) => s.name));
      }
    } catch (e) {
      failures.push(`${r.label}: its tables do not read back: ${(e as Error).message}`);
    }
    rmSync(outDir, { recursive: true, force: true });
  }
  if (process.env.EDGES_REPORT) console.log(JSON.stringify({ ...counts, runnable: runnable.length }));
  expect(failures.slice(0, 20), `${failures.length} failures`).toEqual([]);
  expect(counts.run, `runs that finished (of ${picked.length})`).toBeGreaterThanOrEqual(Math.min(RUNS, runnable.length) * 0.9);
  expect(counts.refusedAtRun, 'refused at run').toBeLessThan(RUNS / 10);
}, 180_000);
