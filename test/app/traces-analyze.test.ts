/**
 * Training data out and recorded traces in: `run --keep-traces raw|baseband` streams
 * traces.arrow (Float32 records with the truth columns, one record batch per scored batch),
 * keeping traces changes no number of the run, and `analyze` with the same pipeline and the
 * stored calibration reproduces the run's outcomes shot for shot. Also the comparisons table
 * and the --json comparisons of a run with several pipelines.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { tableFromIPC, type Table } from 'apache-arrow';
import { beforeAll, describe, expect, it } from 'vitest';
import { runToDirectory, type RunToDirectoryResult } from '../../src/app/run-to-directory.ts';
import { analyzeToDirectory } from '../../src/app/recorded/analyze.ts';
import { resultToJson } from '../../src/app/result-json.ts';
import { makeReference } from '../../src/dsp/demodulate.ts';

const SCENARIO = 'test/fixtures/scenarios/pipelines.yaml';
const SHOTS = 2048, SAMPLES = 80, BATCH = 1024;
let raw = '', plain = '', base = '', work = '';
let plainRun: RunToDirectoryResult;

beforeAll(async () => {
  work = mkdtempSync(join(tmpdir(), 'singleshot-traces-'));
  raw = join(work, 'raw');
  plain = join(work, 'plain');
  base = join(work, 'baseband');
  await runToDirectory({ scenarioPath: SCENARIO, outDir: raw, keepTraces: 'raw' });
  plainRun = await runToDirectory({ scenarioPath: SCENARIO, outDir: plain });
  await runToDirectory({ scenarioPath: SCENARIO, outDir: base, keepTraces: 'baseband', shots: BATCH });
}, 60_000);

const read = (dir: string, f: string): Table => tableFromIPC(readFileSync(join(dir, f)));

/** Rows of pipeline `name` in a run's shots.arrow, in shot order. */
function runShots(dir: string, name: string): { outcome: string[]; cause: string[]; value: number[] } {
  const t = read(dir, 'shots.arrow');
  const pipeline = t.getChild('pipeline')!, outcome = t.getChild('outcome')!, cause = t.getChild('cause')!, value = t.getChild('value')!;
  const out = { outcome: [] as string[], cause: [] as string[], value: [] as number[] };
  for (let i = 0; i < t.numRows; i++) {
    if (pipeline.get(i) !== name) continue;
    out.outcome.push(outcome.get(i) as string);
    out.cause.push(cause.get(i) as string);
    out.value.push(value.get(i) as number);
  }
  return out;
}

describe('traces.arrow', () => {
  it('holds every scored record as a Float32 fixed-size list with the truth columns, one batch per scored batch', () => {
    const t = read(raw, 'traces.arrow');
    expect(t.batches.length).toBe(SHOTS / BATCH);
    expect(t.numRows).toBe(SHOTS);
    const record = t.getChild('record')!;
    expect(String(record.type)).toBe(`FixedSizeList[${SAMPLES}]<Float32>`);
    expect(t.schema.fields.map((f) => f.name)).toEqual([
      'point', 'shot', 'prepared', 'after_preparation', 'at_record_start', 'at_window_start', 'at_window_end',
      'intended_outcome', 'first_jump_s', 'cause', 'record',
    ]);
    expect(t.schema.metadata.get('singleshot.sample_rate')).toBe('20000000');
    expect(t.schema.metadata.get('singleshot.trace_kind')).toBe('raw');
    // the truth columns agree with shots.arrow (its first pipeline's rows)
    const shots = read(raw, 'shots.arrow');
    const rowOf = new Map<number, number>();
    for (let r = 0; r < shots.numRows; r++) if (shots.getChild('pipeline')!.get(r) === 'boxcar') rowOf.set(shots.getChild('shot')!.get(r) as number, r);
    let mismatches = 0;
    for (let i = 0; i < SHOTS; i++) {
      expect(t.getChild('shot')!.get(i)).toBe(i);
      for (const c of ['prepared', 'at_window_start', 'at_window_end']) if (t.getChild(c)!.get(i) !== shots.getChild(c)!.get(rowOf.get(i)!)) mismatches++;
    }
    expect(mismatches, 'truth values that differ from shots.arrow').toBe(0);
    // a record is noise around the level times the carrier: its samples are not all equal
    const first = record.get(0)!.toArray() as Float32Array;
    expect(first.length).toBe(SAMPLES);
    expect(new Set(first).size).toBeGreaterThan(SAMPLES / 2);
  });

  it('keeping traces changes no number of the run', () => {
    for (const name of ['boxcar', 'matched', 'banded']) {
      const a = runShots(raw, name), b = runShots(plain, name);
      expect(a.value, name).toEqual(b.value);
      expect(a.outcome, name).toEqual(b.outcome);
    }
  });

  it('baseband traces are the raw records times the demodulation reference', () => {
    const t = read(base, 'traces.arrow');
    expect(t.numRows).toBe(BATCH);
    expect(t.schema.fields.slice(-2).map((f) => f.name)).toEqual(['in_phase', 'quadrature']);
    const rawTable = read(raw, 'traces.arrow');
    const phase = Number(t.schema.metadata.get('singleshot.reference_phase'));
    const ref = makeReference(SAMPLES, 20e6, 2e6, phase)!;
    for (const shot of [0, 5, BATCH - 1]) {
      const x = rawTable.getChild('record')!.get(shot)!.toArray() as Float32Array;
      const i = t.getChild('in_phase')!.get(shot)!.toArray() as Float32Array;
      const q = t.getChild('quadrature')!.get(shot)!.toArray() as Float32Array;
      for (const k of [0, 13, SAMPLES - 1]) {
        // both sides rounded to Float32 once: agreement to a few Float32 ulps
        expect(Math.abs(i[k]! - x[k]! * ref.inPhase[k]!), `I of shot ${shot}, sample ${k}`).toBeLessThan(4e-7 * Math.abs(x[k]!) + 1e-30);
        expect(Math.abs(q[k]! - x[k]! * ref.quadrature[k]!)).toBeLessThan(4e-7 * Math.abs(x[k]!) + 1e-30);
      }
    }
  });
});

describe('analyze reproduces the run shot for shot (stored calibration)', () => {
  const pipelines: [string, string][] = [
    ['boxcar', 'name: boxcar\nthreshold: optimal\ncalibration: stored\n'],
    ['matched', 'name: matched\nfilter: { butterworth: { order: 4, cutoff: 3 MHz } }\ndecimate: 5\nweights: matched\nthreshold: optimal\ncalibration: stored\n'],
    ['banded', 'name: banded\nthreshold: optimal\nambiguousBand: { fraction: 0.2 }\ncalibration: stored\n'],
    // no calibration at all: fixed phase and threshold, the same numbers as the scenario's
    ['fixed', 'referencePhase: 20 deg\nthreshold: { fixed: 40 pA }\n'],
  ];
  it.each(pipelines)('%s', async (name, text) => {
    const file = join(work, `${name}.yaml`);
    writeFileSync(file, text);
    const out = join(work, `analyzed-${name}`);
    const r = await analyzeToDirectory({ records: join(raw, 'traces.arrow'), pipelinePath: file, outDir: out, labels: 'intended_outcome' });
    const run = runShots(raw, name);
    expect(r.rows).toBe(SHOTS);
    const outcomes = ['0', '1'];
    // traces.arrow holds Float32 records: a shot whose value lies within Float32 rounding of
    // the threshold may land on the other side in analyze; any other difference is a defect
    const scale = Math.max(...run.value.map(Math.abs));
    const threshold = r.calibration.rule.threshold;
    let differ = 0, discardDiffer = 0, discarded = 0;
    for (let i = 0; i < SHOTS; i++) {
      const onEdge = Math.abs(run.value[i]! - threshold) < 1e-6 * scale;
      if (outcomes[r.outcome[i]!] !== run.outcome[i] && !onEdge) differ++;
      if ((r.discarded[i] === 1) !== (run.cause[i] === 'discarded')) discardDiffer++;
      discarded += r.discarded[i]!;
    }
    expect(differ, `${name}: outcomes that differ from the run (away from the threshold)`).toBe(0);
    expect(run.value.filter((v) => Math.abs(v - threshold) < 1e-6 * scale).length, `${name}: shots within Float32 reach of the threshold`).toBeLessThan(SHOTS / 100);
    expect(discardDiffer, `${name}: discards that differ from the run`).toBe(0);
    if (name === 'banded') expect(discarded).toBeGreaterThan(0);
    // the tables: one shots row per record, a summary row with the same error as the run's
    const shots = read(out, 'shots.arrow');
    expect(shots.numRows).toBe(SHOTS);
    const summary = read(plain, 'summary.arrow');
    const row = Array.from({ length: summary.numRows }, (_, k) => k).find((k) => summary.getChild('pipeline')!.get(k) === name)!;
    expect(r.summary!.meanError.rate).toBeCloseTo(summary.getChild('mean_error')!.get(row) as number, 12);
    expect(read(out, 'summary.arrow').getChild('mean_error')!.get(0)).toBeCloseTo(r.summary!.meanError.rate, 12);
  }, 30_000);

  it('calibrating on a labelled fraction leaves those rows unscored', async () => {
    const file = join(work, 'fraction.yaml');
    writeFileSync(file, 'weights: matched\ndecimate: 4\nthreshold: optimal\ncalibration: { labels: intended_outcome, fraction: 0.25 }\n');
    const r = await analyzeToDirectory({ records: join(raw, 'traces.arrow'), pipelinePath: file, outDir: join(work, 'fraction'), labels: 'intended_outcome' });
    expect(r.calibrationRows).toBe(SHOTS / 4);
    expect(r.summary!.shots).toBe(SHOTS - SHOTS / 4);
    // same kind of pipeline as the run's matched one: an error of the same size (≈0.18 ± 0.01)
    expect(r.summary!.meanError.rate).toBeGreaterThan(0.1);
    expect(r.summary!.meanError.rate).toBeLessThan(0.3);
    // every record has its row; the calibration rows are flagged (and decided, in-sample)
    const shots = read(join(work, 'fraction'), 'shots.arrow');
    expect(shots.numRows).toBe(SHOTS);
    const calibration = Array.from(shots.getChild('calibration')!, Boolean);
    expect(calibration.filter(Boolean)).toHaveLength(SHOTS / 4);
    expect(calibration.slice(0, SHOTS / 4).every(Boolean)).toBe(true);
  });
});

describe('comparisons of the pipelines on the same shots', () => {
  it('comparisons.arrow has one row per pair with the paired counts, interval and exact McNemar p', () => {
    const t = read(plain, 'comparisons.arrow');
    expect(t.numRows).toBe(6); // 4 pipelines
    const a = t.getChild('pipeline_a')!, b = t.getChild('pipeline_b')!;
    expect([a.get(0), b.get(0)]).toEqual(['boxcar', 'matched']);
    for (let i = 0; i < t.numRows; i++) {
      const d = t.getChild('difference')!.get(i) as number;
      expect(t.getChild('difference_low')!.get(i)).toBeLessThanOrEqual(d);
      expect(t.getChild('difference_high')!.get(i)).toBeGreaterThanOrEqual(d);
      const n = t.getChild('shots')!.get(i) as number;
      const onlyA = t.getChild('only_a_wrong')!.get(i) as number, onlyB = t.getChild('only_b_wrong')!.get(i) as number;
      expect(d).toBeCloseTo((onlyA - onlyB) / n, 15);
    }
  });

  it('the --json object lists the comparisons and the band figures', () => {
    const j = JSON.parse(JSON.stringify(resultToJson(plainRun.result))) as { comparisons: Record<string, unknown>[]; points: Record<string, unknown>[] };
    expect(j.comparisons).toHaveLength(6);
    expect(j.comparisons[0]).toMatchObject({ a: 'boxcar', b: 'matched', mcnemarP: expect.any(Number), difference: { value: expect.any(Number) } });
    const banded = j.points.find((p) => p.pipeline === 'banded')!;
    expect(banded.ambiguousBand).toMatchObject({ discardFraction: expect.any(Number), postSelectedError: { rate: expect.any(Number) } });
  });
});
