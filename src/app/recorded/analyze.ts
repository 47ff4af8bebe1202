/**
 * `singleshot analyze RECORDS --out DIR [--pipeline FILE] [--labels LABELS]` as a library
 * function: a lab's records (any format io/records/open.ts reads: Arrow, Parquet, .npy/.npz,
 * HDF5; real, or complex I and Q) through one pipeline exactly as a run decides simulated shots
 * (run/analyze-records.ts), written as a run writes its folder: shots.arrow, summary.arrow in the
 * run's columns and meanings, noise.arrow (the records' noise spectrum), traces.arrow (a few
 * example records) and run.json; `singleshot report` reads the folder.
 *
 * The pipeline file is optional: without one the pipeline is the scenario default (boxcar over
 * the record window, reference phase `auto`, midpoint threshold). A pipeline that must be
 * calibrated (auto phase on a carrier or on I and Q, a calibrated threshold, matched or optimal
 * weights, a classifier with a model) calibrates on the first 20 % of the labelled rows (the
 * pipeline file's `calibration: {labels, fraction}` says otherwise), or on the calibration a run
 * stored with its traces (`calibration: stored`); calibration rows are never in the summary.
 *
 * Each record goes through the honest per-record chain (dsp/process-record.ts), so a pipeline run
 * here on traces written by `run --keep-traces raw`, with the run's stored calibration, reproduces
 * the run's outcomes shot for shot (the Float32 rounding of the records moves a value by ~1e−7 of
 * its size, which flips only a shot lying that close to the threshold).
 */
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { tableToIPC } from 'apache-arrow';
import { InputError, ScenarioProblem } from '../../errors.ts';
import { makeGrid } from '../../signal/grid.ts';
import { compileChain } from '../../dsp/pipeline-chain.ts';
import { fitCarrier } from '../../fit/carrier.ts';
import { formatQuantity } from '../../scenario/units.ts';
import { analyzeRecords, type CalibrationPlan, type RecordAnalysis } from '../../run/analyze-records.ts';
import { recordsSpectrum } from '../../engine/recorded/spectrum.ts';
import { classifierOf } from '../../classify/registry.ts';
import type { PipelineCalibration } from '../../classify/calibrate.ts';
import type { PointSummary } from '../../analysis/summary.ts';
import { defaultPipelineFile, readPipelineFile, resolveAnalysis, type AnalyzeFile, type ResolvedAnalysis } from '../../scenario/pipeline-file.ts';
import { locateRecords, openLabels, openRecords } from '../../io/records/open.ts';
import type { LabelSet, RecordSet } from '../../io/records/record-set.ts';
import { storedCalibrationOf } from '../../io/records/stored-calibration.ts';
import { writeRecordedShots } from '../../io/tables/recorded-shots.ts';
import { writeRecordedNoise, writeExampleRecords } from '../../io/tables/recorded-records.ts';
import { summaryColumns } from '../../io/tables/summary.ts';
import { buildTable } from '../../io/tables/columns.ts';
import { writeFileAtomic } from '../../io/atomic-file.ts';
import { writeAnalysisManifest } from '../../io/manifest.ts';
import { withParquetCopies } from '../../io/parquet-copy.ts';
import { analysisMetadata } from '../../io/metadata.ts';
import { OutputFolder, type CommandInput } from '../../io/output-dir.ts';
import { checkpoint, RunInterrupted } from '../../run/interrupt.ts';

export interface AnalyzeOptions {
  /** The records: FILE or FILE:NAME (io/records/open.ts). */
  records: string;
  /** The pipeline file (YAML or JSON); absent: the default pipeline. */
  pipelinePath?: string;
  /** Labels to score against: a file (FILE or FILE:NAME) or a NAME in the records' file. */
  labels?: string;
  /** Signal units per stored unit (e.g. volts per ADC count); default 1 (times the file's own scale). */
  scale?: number;
  /** The records' sample rate (Hz), where neither the pipeline file nor the file says it. */
  sampleRate?: number;
  /** The records' carrier (Hz), where neither the pipeline file nor the file says it; 0 for none. */
  carrierFrequency?: number;
  /** The records' window (s), where neither the pipeline file nor the file says it. */
  window?: { start: number; length: number };
  /** The unit of the records after the scale ('A', 'V' or '' for plain numbers), where the file does not say it. */
  unit?: string;
  outDir: string;
  force?: boolean;
  /** Also write every table as Parquet (X.parquet beside X.arrow). */
  parquet?: boolean;
  /** Aborting it stops the analysis between batches of records (RunInterrupted). */
  signal?: AbortSignal;
}

export interface AnalyzeResult {
  /** What the analysis assumed where nothing said (shown to the user as notes). */
  notes: string[];
  pipeline: string;
  /** The pipeline's classifier. */
  classifier: string;
  source: string;
  rows: number;
  complex: boolean;
  /** Rows used to calibrate (decided, never in the summary). */
  calibrationRows: number;
  /** Labelled rows in the summary. */
  scoredRows: number;
  /** How the pipeline was calibrated, in words. */
  calibratedBy: string;
  bins: number;
  referencePhase: number;
  calibration: PipelineCalibration;
  /** The run's summary of the scored rows (null without labels). */
  summary: PointSummary | null;
  outcomes: readonly [string, string];
  /** The unit of the integrated values ('' for plain numbers). */
  unit: string;
  outcome: Uint8Array;
  value: Float64Array;
  /** 1 where the row fell inside the ambiguous band. */
  discarded: Uint8Array;
  files: string[];
}

function readText(path: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError(path, '', 'a pipeline file', code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'a directory' : 'an unreadable file');
  }
}

/**
 * A problem calibration found (classify/, in a scenario's words) in the words of an analysis: too
 * few calibration rows of an outcome names the labels and calibration.fraction; a pipeline key
 * names the pipeline file.
 */
function analysisProblem(e: ScenarioProblem, file: AnalyzeFile, calibratedBy: string | null): InputError {
  if (e.path[0] === 'calibrationShots') {
    return new InputError(file.file, 'calibration', `calibration rows of both outcomes, and enough of them (raise calibration.fraction, or check the labels${calibratedBy ? `: calibrated by ${calibratedBy}` : ''})`, e.found ?? 'too few');
  }
  const path = e.path[0] === 'pipelines' ? e.path.slice(2) : e.path;
  return new InputError(file.file, path.join('.'), e.expected, e.found);
}

/** `dir/file.h5:/a/b` → `file.h5:/a/b`: a source named by its file (and the dataset, array or column in it). */
function fileName(source: string): string {
  try {
    const at = locateRecords(source);
    return `${basename(at.path)}${at.inner === undefined ? '' : `:${at.inner}`}`;
  } catch {
    return basename(source);
  }
}

/** Records read to look for an unannounced carrier. */
const CARRIER_PROBE_ROWS = 256;

/**
 * What the analysis took where neither the options, the pipeline file nor the file said it: the
 * window (the whole record) and the carrier (none) — with a warning when the records show a line
 * that looks like a carrier (fit/carrier.ts finds it as `fit` does).
 */
function assumptions(o: AnalyzeOptions, file: AnalyzeFile, records: RecordSet, r: ResolvedAnalysis): string[] {
  const notes: string[] = [];
  const at = records.attributes;
  if (o.window === undefined && file.doc.recordWindow === undefined && at.windowStart === undefined && at.windowLength === undefined) {
    notes.push('window: not given (no --window, no recordWindow in a pipeline file, no window in the file): the whole record is integrated');
  }
  if (!records.complex && o.carrierFrequency === undefined && file.doc.carrier === undefined && at.carrierFrequency === undefined) {
    const rows = Math.min(records.rows, CARRIER_PROBE_ROWS), n = records.samples;
    const buffer = new Float64Array(rows * n), row = new Float64Array(n);
    for (let k = 0; k < rows; k++) {
      records.row(k, row, null);
      buffer.set(row, k * n);
    }
    const line = fitCarrier(buffer, rows, n, r.timing.sampleRate, null);
    const f = line ? formatQuantity(line.frequency, 'Hz') : '';
    notes.push(line
      ? `carrier: not given, so none; but the records show a ${line.shape} line at ${f} (${line.lineRatio.toFixed(0)}× its neighbours): if it is the carrier, give --carrier "${f}"`
      : 'carrier: not given (no --carrier, no carrier in a pipeline file or the file): the records are taken as baseband');
  }
  return notes;
}

/**
 * Runs `read`; a column, dataset or array it does not find, named by key `key` of the pipeline
 * file, is refused naming that file and key too (either may be the one to change).
 */
async function fromPipelineFile<T>(file: AnalyzeFile, key: string | null, read: () => Promise<T>): Promise<T> {
  try {
    return await read();
  } catch (e) {
    if (key === null || !(e instanceof InputError) || !/found no such (column|dataset|array)$/.test(e.message)) throw e;
    throw new InputError(file.file, key, `a name the records' file has (${e.message})`, 'a name it does not have');
  }
}

/** Whether the pipeline decides with anything a calibration must supply. */
function needsCalibration(r: ResolvedAnalysis, complex: boolean): string | null {
  const p = r.pipeline;
  if (p.referencePhase === 'auto' && (r.carrierFrequency > 0 || complex)) return 'referencePhase: auto (the separation axis)';
  if (p.threshold.method !== 'fixed' && !classifierOf(p).readsBins) return `threshold: ${p.threshold.method}`;
  if ((p.weights ?? 'boxcar') !== 'boxcar') return `weights: ${p.weights}`;
  if (classifierOf(p).readsBins) return `classifier: ${classifierOf(p).name}`;
  if (p.ambiguousBand?.kind === 'fraction') return 'ambiguousBand: {fraction} (a fraction of the calibrated separation)';
  return null;
}

/** Labels checked against the records: one per row. */
function checkedLabels(set: LabelSet, records: RecordSet): LabelSet {
  if (set.values.length !== records.rows) {
    throw new InputError(set.source, '', `${records.rows} labels, one per record of ${records.source}`, `${set.values.length}`);
  }
  return set;
}

/** The first `fraction` of the labelled rows of `labels`. */
function firstLabelledRows(labels: Uint8Array, fraction: number): Uint8Array {
  const rows = new Uint8Array(labels.length);
  const labelled: number[] = [];
  for (let r = 0; r < labels.length; r++) if (labels[r] !== 255) labelled.push(r);
  const take = Math.ceil(fraction * labelled.length);
  for (let j = 0; j < take; j++) rows[labelled[j]!] = 1;
  return rows;
}

/** Runs the analysis and writes the folder; see the file comment. */
export async function analyzeToDirectory(o: AnalyzeOptions): Promise<AnalyzeResult> {
  const file: AnalyzeFile = o.pipelinePath === undefined ? defaultPipelineFile() : readPipelineFile(readText(o.pipelinePath), o.pipelinePath);
  // a pipeline file's column names the records in a table that the argument does not name
  const spec = file.doc.column !== undefined && locateRecords(o.records).inner === undefined ? `${o.records}:${file.doc.column}` : o.records;
  const records = await fromPipelineFile(file, spec === o.records ? null : 'column', () => openRecords(spec, o.scale ?? 1));
  try {
    return await analyzeOpen(o, file, records);
  } finally {
    records.close();
  }
}

async function analyzeOpen(o: AnalyzeOptions, file: AnalyzeFile, records: RecordSet): Promise<AnalyzeResult> {
  const at = records.attributes;
  const resolved = resolveAnalysis(file, {
    samples: records.samples, sampleRate: o.sampleRate ?? at.sampleRate ?? null,
    carrierFrequency: o.carrierFrequency ?? (records.complex ? 0 : at.carrierFrequency ?? null), carrierPhase: at.carrierPhase ?? null,
    windowStart: o.window?.start ?? at.windowStart ?? null, windowLength: o.window?.length ?? at.windowLength ?? null,
  }, records.source);
  const notes = assumptions(o, file, records, resolved);
  if (records.complex && resolved.carrierFrequency > 0) {
    throw new InputError(file.file, 'carrier', 'no carrier for complex records (I and Q are baseband channels, already demodulated)', `${resolved.carrierFrequency} Hz`);
  }
  const givenOutcomes = file.doc.outcomes?.map(String) ?? null;
  const score = o.labels === undefined ? null : checkedLabels(await openLabels(o.labels, records.source, givenOutcomes), records);
  const cal = file.doc.calibration;
  const calibrationLabels = cal !== undefined && cal !== 'stored'
    ? checkedLabels(await fromPipelineFile(file, 'calibration.labels', () => openLabels(cal.labels, records.source, givenOutcomes)), records)
    : null;
  const named = score ?? calibrationLabels;
  const outcomes = (givenOutcomes ?? named?.names ?? ['0', '1']) as [string, string];
  const grid = { ...makeGrid(resolved.timing), samples: records.samples };
  const carrier = { frequency: resolved.carrierFrequency, phase: resolved.carrierPhase, channels: records.complex ? 2 : 1 };

  // how the pipeline is calibrated
  let plan: CalibrationPlan;
  let calibratedBy: string;
  const needs = needsCalibration(resolved, records.complex);
  if (cal === 'stored') {
    const stored = storedCalibrationOf(records, resolved.pipeline.name, file.doc.name !== undefined);
    const bins = compileChain(resolved.pipeline, grid, carrier, stored.referencePhase).bins;
    if (stored.calibration.weights !== null && stored.calibration.weights.length !== bins) {
      throw new InputError(file.file, 'calibration', `the pipeline of the stored calibration (its "${stored.name}" has ${stored.calibration.weights.length} weights, this pipeline gives ${bins} bins: use the run's filter, decimate and window)`, '"stored"');
    }
    plan = { kind: 'given', calibration: stored.calibration, referencePhase: stored.referencePhase };
    calibratedBy = `the calibration stored with the records (pipeline "${stored.name}")`;
  } else if (calibrationLabels || (needs !== null && score)) {
    const labels = (calibrationLabels ?? score)!;
    const fraction = cal !== undefined ? cal.fraction ?? 0.2 : 0.2;
    plan = { kind: 'rows', rows: firstLabelledRows(labels.values, fraction) };
    calibratedBy = `the first ${Math.round(fraction * 100)} % of the rows labelled in ${labels.source}`;
  } else if (needs !== null) {
    throw new InputError(file.file, 'calibration', `a calibration for ${needs}: labels (--labels, or calibration: {labels: …} in a pipeline file) or "stored"; or a pipeline that needs none (fixed threshold, fixed referencePhase, boxcar weights)`, 'none');
  } else {
    const p = resolved.pipeline;
    plan = {
      kind: 'given', referencePhase: p.referencePhase as number,
      calibration: {
        axis: { cos: 1, sin: 0 }, rule: { threshold: p.threshold.value, highIsOne: true }, outcomeMeans: [NaN, NaN], weights: null,
        bandHalfWidth: p.ambiguousBand ? p.ambiguousBand.value / 2 : 0, model: null,
      },
    };
    calibratedBy = 'nothing (a fixed threshold on I of a fixed reference phase)';
  }

  let analysis: RecordAnalysis;
  try {
    analysis = await analyzeRecords({
      source: records, labels: score?.values ?? null, outcomes, spec: resolved.pipeline, grid, carrier, plan, signal: o.signal,
    });
  } catch (e) {
    throw e instanceof ScenarioProblem ? analysisProblem(e, file, plan.kind === 'rows' ? calibratedBy : null) : e;
  }
  const unit = o.unit ?? at.unit ?? '';
  const files = await writeFolder(o, file, records, score, outcomes, unit, analysis, resolved);
  const scoredRows = analysis.summary?.shots ?? 0;
  return {
    notes, pipeline: resolved.pipeline.name, classifier: classifierOf(resolved.pipeline).name, source: records.source, rows: records.rows, complex: records.complex,
    calibrationRows: analysis.calibrationRows, scoredRows, calibratedBy, bins: analysis.chain.bins,
    referencePhase: analysis.referencePhase, calibration: analysis.calibration, summary: analysis.summary, outcomes, unit,
    outcome: analysis.decisions.outcome, value: analysis.decisions.value, discarded: analysis.decisions.discarded, files,
  };
}

/** Writes the tables and run.json through the locked output folder (io/output-dir.ts); returns the files written. */
async function writeFolder(
  o: AnalyzeOptions, file: AnalyzeFile, records: RecordSet, score: LabelSet | null, outcomes: readonly [string, string], unit: string,
  a: RecordAnalysis, resolved: ResolvedAnalysis,
): Promise<string[]> {
  await checkpoint(o.signal);
  const inputs: CommandInput[] = [{ path: locateRecords(o.records).path, kind: 'file' }];
  if (o.pipelinePath !== undefined) inputs.push({ path: o.pipelinePath, kind: 'file' });
  const out = OutputFolder.open(o.outDir, { force: o.force ?? false, command: 'analyze', inputs });
  // the file names, not the folders: the same records analysed anywhere give the same bytes
  const provenance = { pipeline: file.canonical, records: fileName(records.source), labels: score ? fileName(score.source) : null };
  const files: string[] = [];
  const d = a.decisions;
  try {
    writeRecordedShots(out.file('shots.arrow'), analysisMetadata('shots', provenance), {
      pipeline: resolved.pipeline.name, outcomes, unit, labels: score?.values ?? null,
      calibration: a.calibrationMask ?? new Uint8Array(records.rows),
      inPhase: d.inPhase, quadrature: d.quadrature, value: d.value, statistic: d.statistic, outcome: d.outcome, discarded: d.discarded,
    });
    files.push('shots.arrow');
    if (a.summary) {
      const cal = a.calibration;
      const point = {
        index: 0, parameters: {}, scenario: { states: outcomes.map((name) => ({ name })), outcomes },
        summaries: [a.summary], comparisons: [], noise: [null], calibrations: [cal],
        compiled: { pipelines: [{ spec: { name: resolved.pipeline.name, classifier: resolved.pipeline.classifier }, referencePhase: a.referencePhase }] },
      };
      const summary = buildTable(summaryColumns([point], unit), analysisMetadata('summary', provenance));
      writeFileAtomic(out.file('summary.arrow'), tableToIPC(summary, 'file'));
      files.push('summary.arrow');
    }
    await checkpoint(o.signal);
    const spectrum = recordsSpectrum(records, score?.values ?? null, resolved.timing.sampleRate);
    if (spectrum) {
      writeRecordedNoise(out.file('noise.arrow'), analysisMetadata('noise', provenance), spectrum, outcomes, unit);
      files.push('noise.arrow');
    }
    writeExampleRecords(out.file('traces.arrow'), analysisMetadata('traces', provenance), records, score?.values ?? null, outcomes, unit, resolved.timing);
    files.push('traces.arrow');
    const written = o.parquet ? await withParquetCopies(out.work, files) : files;
    writeAnalysisManifest(out.work, { complete: true, files: written, analysis: provenance });
    await checkpoint(o.signal);
    out.publish();
    return written;
  } catch (e) {
    out.discard();
    if (e instanceof RunInterrupted) throw new RunInterrupted(e.signal, `${o.outDir} was left as it was`);
    throw out.userError(e);
  }
}
