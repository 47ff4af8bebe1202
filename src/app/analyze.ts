/**
 * `singleshot analyze TRACES.arrow --pipeline FILE --out DIR [--labels COLUMN]` as a library
 * function: run one pipeline (analyze-pipeline.ts) on the records of an Arrow table
 * (record-table.ts), calibrate it (stored calibration, labelled rows, or nothing), decide every
 * other row, score against a label column if given, and write shots.arrow, summary.arrow and
 * run.json like `run`. Calibration rows are never scored.
 *
 * Each record goes through the honest per-record chain (plan/process.ts): demodulate, filter
 * from rest, decimate, weight — so a pipeline run here on traces written by
 * `run --keep-traces raw` with the run's stored calibration reproduces the run's outcomes shot
 * for shot (the Float32 rounding of the records moves a value by ~1e−7 of its size, which only
 * flips a shot lying that close to the threshold).
 */
import { readFileSync } from 'node:fs';
import { tableToIPC, type Table } from 'apache-arrow';
import { InputError } from '../errors.ts';
import { makeGrid } from '../signal/grid.ts';
import { compileChain, type PipelineChain } from '../dsp/pipeline-chain.ts';
import { integrateBins, makeProcessScratch, processRecord } from '../dsp/process-record.ts';
import { projectRecords } from '../classify/project.ts';
import { separationAxis, type Axis } from '../classify/project.ts';
import { classifyByThreshold, midpointThreshold, optimalThreshold, type ThresholdRule } from '../classify/threshold.ts';
import { weightsFromLabelled } from '../classify/labelled-weights.ts';
import { wilsonInterval, type RateInterval } from '../analysis/intervals.ts';
import { REPORT_CONFIDENCE } from '../analysis/summary.ts';
import { readPipelineFile, resolveAnalysis, type ResolvedAnalysis } from '../scenario/pipeline-file.ts';
import { labelColumn, metadataNumber, optionalIntegerColumn, readArrowTable, recordColumn, type RecordColumn } from '../io/record-table.ts';
import type { StoredCalibration } from '../io/tables/traces.ts';
import { analysisSummaryColumns, writeAnalysisShots } from '../io/tables/analysis.ts';
import { buildTable } from '../io/tables/columns.ts';
import { writeFileAtomic } from '../io/atomic-file.ts';
import { writeManifest } from '../io/manifest.ts';
import { META_PREFIX, tableMetadata, type RunProvenance } from '../io/metadata.ts';
import { OutputFolder } from '../io/output-dir.ts';
import { checkpoint, RunInterrupted } from '../run/interrupt.ts';
import { CLASSIFIERS } from '../classify/registry.ts';

export interface AnalyzeOptions {
  tracesPath: string;
  pipelinePath: string;
  outDir: string;
  /** Label column to score against (outcome labels per row). */
  labels?: string;
  force?: boolean;
  /** Aborting it stops the analysis between records (RunInterrupted); the output folder is left as it was. */
  signal?: AbortSignal;
}

/** Records processed between two chances to stop. */
const RECORDS_PER_TURN = 4096;

/** The decision of every row (255 where the row calibrated and was not scored). */
export interface AnalyzeResult {
  pipeline: string;
  rows: number;
  calibrationRows: number;
  outcome: Uint8Array;
  value: Float64Array;
  discarded: Uint8Array;
  /** Scoring against labels, when --labels was given. */
  scores: AnalyzeScores | null;
  rule: ThresholdRule;
  axis: Axis;
  bins: number;
  files: string[];
}

/** Errors against the label column among the scored, labelled rows. */
export interface AnalyzeScores {
  shots: number;
  errors: number;
  error: RateInterval;
  byOutcome: { outcome: string; shots: number; errors: number; error: RateInterval }[];
  discarded: number;
  discardFraction: number;
  postSelectedError: RateInterval;
  discardsAsFailuresError: RateInterval;
}

/** How the pipeline is calibrated for this table. */
interface Calibration {
  axis: Axis;
  rule: ThresholdRule;
  weights: Float64Array;
  bandHalfWidth: number;
  referencePhase: number;
}

function readText(path: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError(path, '', 'a pipeline file', code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'a directory' : 'an unreadable file');
  }
}

function metadataOutcomes(table: Table): string[] | null {
  const text = table.schema.metadata.get(`${META_PREFIX}outcomes`);
  if (text === undefined) return null;
  try {
    const v: unknown = JSON.parse(text);
    return Array.isArray(v) && v.length === 2 ? v.map(String) : null;
  } catch {
    return null;
  }
}

/**
 * Runs `read`; a column it does not find, named by key `key` of the pipeline file, is refused
 * naming that file and key too (either may be the one to change).
 */
function fromPipelineFile<T>(pipelinePath: string, key: string | null, read: () => T): T {
  try {
    return read();
  } catch (e) {
    if (key === null || !(e instanceof InputError) || !e.message.endsWith('found no such column')) throw e;
    throw new InputError(pipelinePath, key, `a column of the table (${e.message})`, 'a name the table does not have');
  }
}

/** Runs the analysis and writes the tables; see the file comment. */
export async function analyzeToDirectory(o: AnalyzeOptions): Promise<AnalyzeResult> {
  const file = readPipelineFile(readText(o.pipelinePath), o.pipelinePath);
  const table = readArrowTable(o.tracesPath);
  const columnName = file.doc.column ?? 'record';
  const records = fromPipelineFile(o.pipelinePath, file.doc.column === undefined ? null : 'column', () => recordColumn(o.tracesPath, table, columnName));
  const meta = (k: string) => metadataNumber(table, `${META_PREFIX}${k}`);
  const resolved = resolveAnalysis(file, {
    samples: records.samples, sampleRate: meta('sample_rate'), carrierFrequency: meta('carrier_frequency'),
    carrierPhase: meta('carrier_phase'), windowStart: meta('window_start'), windowLength: meta('window_length'),
  }, o.tracesPath, columnName);
  const outcomes = (file.doc.outcomes?.map(String) ?? metadataOutcomes(table) ?? null);
  const scoreLabels = o.labels === undefined ? null : labelColumn(o.tracesPath, table, o.labels, outcomes);
  const grid = { ...makeGrid(resolved.timing), samples: records.samples };

  const calibrationRows = new Uint8Array(records.rows);
  let calibration: (chain: PipelineChain) => Calibration | Promise<Calibration>;
  let referencePhase: number;
  const spec = resolved.pipeline;
  const cal = file.doc.calibration;
  if (cal === 'stored') {
    const stored = storedFor(o.tracesPath, table, spec.name, file.doc.name !== undefined);
    referencePhase = stored.referencePhase;
    calibration = (chain) => {
      if (stored.weights !== null && stored.weights.length !== chain.bins) {
        throw new InputError(o.pipelinePath, 'calibration', `the pipeline of the stored calibration (its "${stored.name}" has ${stored.weights.length} weights, this file gives ${chain.bins} bins: use the run's filter, decimate and window)`, '"stored"');
      }
      return {
        axis: { cos: Math.cos(stored.axisAngle), sin: Math.sin(stored.axisAngle) },
        rule: { threshold: stored.threshold, highIsOne: stored.highIsOne },
        weights: stored.weights ? Float64Array.from(stored.weights) : chain.binWeights,
        bandHalfWidth: stored.bandHalfWidth, referencePhase,
      };
    };
  } else if (cal !== undefined) {
    const labels = fromPipelineFile(o.pipelinePath, 'calibration.labels', () => labelColumn(o.tracesPath, table, cal.labels, outcomes));
    const labelled: number[] = [];
    for (let r = 0; r < records.rows; r++) if (labels[r] !== 255) labelled.push(r);
    const take = Math.ceil((cal.fraction ?? 0.2) * labelled.length);
    for (let j = 0; j < take; j++) calibrationRows[labelled[j]!] = 1;
    referencePhase = spec.referencePhase === 'auto' ? resolved.carrierPhase : spec.referencePhase;
    calibration = (chain) => calibrateOnRows(o.tracesPath, cal.labels, records, chain, labels, calibrationRows, spec.threshold, referencePhase, resolved, o.signal);
  } else {
    if (spec.referencePhase === 'auto' || spec.threshold.method !== 'fixed' || (spec.weights ?? 'boxcar') !== 'boxcar') {
      throw new InputError(o.pipelinePath, 'calibration', 'a calibration ("stored" or {labels: COLUMN}) unless the pipeline has a fixed threshold, a fixed referencePhase and boxcar weights', 'none');
    }
    if (spec.ambiguousBand?.kind === 'fraction') throw new InputError(o.pipelinePath, 'ambiguousBand', '{width: level} without a calibration (a fraction needs calibrated means)', 'fraction');
    referencePhase = spec.referencePhase;
    calibration = (chain) => ({
      axis: { cos: 1, sin: 0 }, rule: { threshold: spec.threshold.value, highIsOne: true }, weights: chain.binWeights,
      bandHalfWidth: spec.ambiguousBand ? spec.ambiguousBand.value / 2 : 0, referencePhase,
    });
  }
  const chain = compileChain(spec, grid, resolved.carrierFrequency, referencePhase);
  const c = await calibration(chain);

  // decide every row that did not calibrate
  const scratch = makeProcessScratch(chain, records.samples);
  const record = new Float64Array(records.samples);
  const binsI = new Float64Array(chain.bins), binsQ = new Float64Array(chain.bins);
  const n = records.rows;
  const inPhase = new Float64Array(n), quadrature = new Float64Array(n), value = new Float64Array(n).fill(NaN);
  const outcome = new Uint8Array(n).fill(255), discarded = new Uint8Array(n);
  for (let r = 0; r < n; r++) {
    if (r % RECORDS_PER_TURN === 0) await checkpoint(o.signal);
    if (calibrationRows[r]) continue;
    processRecord(chain, records.row(r, record), scratch, binsI, binsQ, 0);
    inPhase[r] = integrateBins(binsI, 0, c.weights);
    quadrature[r] = chain.reference ? integrateBins(binsQ, 0, c.weights) : 0;
    value[r] = inPhase[r]! * c.axis.cos + quadrature[r]! * c.axis.sin;
    outcome[r] = classifyByThreshold(value[r]!, c.rule.threshold, c.rule.highIsOne);
    discarded[r] = Math.abs(value[r]! - c.rule.threshold) < c.bandHalfWidth ? 1 : 0;
  }
  const scores = scoreLabels ? scoreRows(scoreLabels, outcome, discarded, outcomes ?? ['0', '1']) : null;

  // tables
  await checkpoint(o.signal);
  const out = OutputFolder.open(o.outDir, {
    force: o.force ?? false, command: 'analyze', inputs: [{ path: o.tracesPath, kind: 'file' }, { path: o.pipelinePath, kind: 'file' }],
  });
  const provenance: RunProvenance = { scenario: file.canonical, seed: 0, engine: 'analyze', shard: '1/1' };
  const files: string[] = [];
  try {
    writeAnalysisShots(out.file('shots.arrow'), tableMetadata('shots', provenance), outcomes ?? ['0', '1'], spec.name,
      { inPhase, quadrature, value, outcome, discarded, labels: scoreLabels, calibrationRows });
    files.push('shots.arrow');
    const calibrationFacts = {
      threshold: c.rule.threshold, highIsOne: c.rule.highIsOne, axisAngle: Math.atan2(c.axis.sin, c.axis.cos),
      referencePhase: c.referencePhase, bins: chain.bins, sampleRate: chain.sampleRate,
    };
    const summary = buildTable(analysisSummaryColumns(spec.name, n, calibrationRows, calibrationFacts, scores), tableMetadata('summary', provenance));
    writeFileAtomic(out.file('summary.arrow'), tableToIPC(summary, 'file'));
    files.push('summary.arrow');
    writeManifest(out.work, { complete: true, seed: 0, engine: 'analyze', shard: '1/1', files, scenario: file.canonical });
    await checkpoint(o.signal);
    out.publish();
  } catch (e) {
    out.discard();
    if (e instanceof RunInterrupted) throw new RunInterrupted(e.signal, `${o.outDir} was left as it was`);
    throw out.userError(e);
  }
  const calibrated = calibrationRows.reduce((a, x) => a + x, 0);
  return { pipeline: spec.name, rows: n, calibrationRows: calibrated, outcome, value, discarded, scores, rule: c.rule, axis: c.axis, bins: chain.bins, files };
}

/** The stored calibration of pipeline `name` (point 0 when the table mixes points). */
function storedFor(path: string, table: Table, name: string, named: boolean): StoredCalibration['pipelines'][number] {
  const text = table.schema.metadata.get(`${META_PREFIX}calibration`);
  let stored: StoredCalibration[] | null = null;
  try {
    stored = text === undefined ? null : (JSON.parse(text) as StoredCalibration[]);
  } catch {
    stored = null;
  }
  if (!stored || !Array.isArray(stored) || stored.length === 0 || !Array.isArray(stored[0]!.pipelines)) {
    throw new InputError(path, `metadata ${META_PREFIX}calibration`, 'a stored calibration (written by run --keep-traces)', 'none');
  }
  const points = optionalIntegerColumn(table, 'point');
  if (points && points.some((p) => p !== points[0]) && stored.length > 1) {
    throw new InputError(path, 'column "point"', 'records of one sweep point (each point has its own calibration)', 'several points');
  }
  const point = stored.find((s) => s.point === (points?.[0] ?? stored![0]!.point)) ?? stored[0]!;
  const list = point.pipelines;
  const key = `metadata ${META_PREFIX}calibration`;
  if (!Array.isArray(list) || list.some((p) => storedEntryProblem(p) !== null)) {
    const bad = Array.isArray(list) ? list.map(storedEntryProblem).find((x) => x !== null) : 'not a list';
    throw new InputError(path, key, 'a stored calibration (written by run --keep-traces)', `one that does not read back (${bad ?? 'pipelines'})`);
  }
  const found = list.find((p) => p.name === name) ?? (!named && list.length === 1 ? list[0] : undefined);
  if (!found) throw new InputError(path, `metadata ${META_PREFIX}calibration`, `a calibration of pipeline "${name}" (stored: ${list.map((p) => `"${p.name}"`).join(', ')}); set name in the pipeline file`, 'none');
  const classifier = CLASSIFIERS.find((k) => k.name === found.classifier);
  if (!classifier || classifier.readsBins) {
    throw new InputError(path, `metadata ${META_PREFIX}calibration`, `a pipeline that decides on its integrated value ("${found.name}" uses the ${found.classifier} classifier)`, found.classifier);
  }
  return found;
}

/** What is wrong with one stored pipeline calibration, or null when it is whole. */
function storedEntryProblem(p: unknown): string | null {
  if (p === null || typeof p !== 'object') return 'an entry that is not an object';
  const e = p as Record<string, unknown>;
  const finite = (x: unknown) => typeof x === 'number' && Number.isFinite(x) && Math.abs(x) <= 1e100;
  if (typeof e.name !== 'string' || typeof e.classifier !== 'string') return 'a name and a classifier';
  if (!finite(e.referencePhase) || !finite(e.axisAngle)) return 'finite angles';
  if (!finite(e.threshold)) return 'a finite threshold';
  if (typeof e.highIsOne !== 'boolean') return 'highIsOne true or false';
  if (!finite(e.bandHalfWidth) || (e.bandHalfWidth as number) < 0) return 'a band half-width ≥ 0';
  if (e.weights !== null && !(Array.isArray(e.weights) && e.weights.length > 0 && e.weights.every(finite))) return 'null or finite weights';
  return null;
}

/** Calibrates on the flagged rows from their labels (see the file comment of analyze-pipeline.ts). */
async function calibrateOnRows(
  path: string, labelName: string, records: RecordColumn, chain0: PipelineChain, labels: Uint8Array, rows: Uint8Array,
  threshold: ResolvedAnalysis['pipeline']['threshold'], referencePhase: number, resolved: ResolvedAnalysis, signal?: AbortSignal,
): Promise<Calibration> {
  const chain = chain0;
  const picked: number[] = [];
  for (let r = 0; r < rows.length; r++) if (rows[r]) picked.push(r);
  const count = picked.length;
  const bins = chain.bins;
  const binsI = new Float64Array(count * bins), binsQ = chain.reference ? new Float64Array(count * bins) : null;
  const scratch = makeProcessScratch(chain, records.samples);
  const record = new Float64Array(records.samples);
  const calLabels = new Uint8Array(count);
  for (const [j, r] of picked.entries()) {
    if (j % RECORDS_PER_TURN === 0) await checkpoint(signal);
    processRecord(chain, records.row(r, record), scratch, binsI, binsQ, j * bins);
    calLabels[j] = labels[r]!;
  }
  // axis from the mean I/Q of each label (the boxcar over the bins)
  const sums = [[0, 0, 0], [0, 0, 0]];
  for (let j = 0; j < count; j++) {
    const s = sums[calLabels[j]!]!;
    s[0]! += integrateBins(binsI, j * bins, chain.binWeights);
    s[1]! += binsQ ? integrateBins(binsQ, j * bins, chain.binWeights) : 0;
    s[2]!++;
  }
  if (sums[0]![2] === 0 || sums[1]![2] === 0) {
    throw new InputError(path, `column "${labelName}"`, 'calibration rows of both outcomes (raise calibration.fraction or check the labels)', `only outcome ${sums[0]![2] === 0 ? 1 : 0}`);
  }
  const axis = binsQ === null ? { cos: 1, sin: 0 }
    : separationAxis(sums[0]![0]! / sums[0]![2]!, sums[0]![1]! / sums[0]![2]!, sums[1]![0]! / sums[1]![2]!, sums[1]![1]! / sums[1]![2]!);
  const projected = projectRecords(binsI, binsQ, axis);
  let weights = chain.binWeights;
  if (chain.weights !== 'boxcar') {
    try {
      weights = weightsFromLabelled(chain.weights, projected, bins, calLabels);
    } catch (e) {
      throw new InputError(path, `column "${labelName}"`, `enough calibration rows for ${chain.weights} weights over ${bins} bins`, (e as Error).message);
    }
  }
  const values: [number[], number[]] = [[], []];
  for (let j = 0; j < count; j++) values[calLabels[j]!]!.push(integrateBins(projected, j * bins, weights));
  const mean = (v: number[]) => v.reduce((a, x) => a + x, 0) / v.length;
  const m0 = mean(values[0]), m1 = mean(values[1]);
  let rule: ThresholdRule;
  if (threshold.method === 'midpoint') rule = midpointThreshold(m0, m1);
  else if (threshold.method === 'fixed') rule = { threshold: threshold.value, highIsOne: m1 >= m0 };
  else {
    const best = optimalThreshold(Float64Array.from(values[0]), Float64Array.from(values[1]));
    rule = { threshold: best.threshold, highIsOne: best.highIsOne };
  }
  const band = resolved.pipeline.ambiguousBand ?? null;
  const bandHalfWidth = band === null ? 0 : band.kind === 'width' ? band.value / 2 : (band.value * Math.abs(m1 - m0)) / 2;
  return { axis, rule, weights, bandHalfWidth, referencePhase };
}

function scoreRows(labels: Uint8Array, outcome: Uint8Array, discarded: Uint8Array, outcomeNames: readonly string[]): AnalyzeScores {
  const shots = [0, 0], errors = [0, 0];
  let disc = 0, discWrong = 0;
  for (let r = 0; r < labels.length; r++) {
    const l = labels[r]!;
    if (l > 1 || outcome[r] === 255) continue;
    shots[l]!++;
    const wrong = outcome[r] !== l;
    if (wrong) errors[l]!++;
    if (discarded[r]) {
      disc++;
      if (wrong) discWrong++;
    }
  }
  const total = shots[0]! + shots[1]!, wrong = errors[0]! + errors[1]!;
  return {
    shots: total, errors: wrong, error: wilsonInterval(wrong, total, REPORT_CONFIDENCE),
    byOutcome: [0, 1].map((o) => ({ outcome: outcomeNames[o]!, shots: shots[o]!, errors: errors[o]!, error: wilsonInterval(errors[o]!, shots[o]!, REPORT_CONFIDENCE) })),
    discarded: disc, discardFraction: total > 0 ? disc / total : 0,
    postSelectedError: wilsonInterval(wrong - discWrong, total - disc, REPORT_CONFIDENCE),
    discardsAsFailuresError: wilsonInterval(wrong - discWrong + disc, total, REPORT_CONFIDENCE),
  };
}
