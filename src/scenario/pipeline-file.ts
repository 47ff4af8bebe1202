/**
 * The pipeline file of `singleshot analyze` (YAML or JSON): the same pipeline keys as a
 * scenario's `processing` (filter, decimate, window, weights, threshold, ambiguousBand,
 * referencePhase), plus what the records need:
 *   name         pipeline name (default "main"; picks the stored calibration of that pipeline)
 *   column       the column of sample lists in an Arrow or Parquet file (default "record", else
 *                the pair in_phase/quadrature)
 *   sampleRate   Hz (default: the table's singleshot.sample_rate metadata)
 *   carrier      "none" | {frequency, phase} (default: singleshot.carrier_frequency/_phase, else none)
 *   recordWindow {start, length}: the window the pipeline's own window must end in (default:
 *                singleshot.window_start/_length, else the whole record)
 *   outcomes     [label0, label1]: how string labels map to outcomes (default singleshot.outcomes)
 *   calibration  "stored" (the calibration `run --keep-traces` wrote into the metadata) |
 *                {labels: LABELS, fraction: f}: the first f (default 0.2) of the rows labelled
 *                in LABELS (a file, FILE:NAME, or a NAME beside the records) calibrate, and are
 *                not scored | absent: the labels of --labels when the pipeline needs a
 *                calibration, else nothing (fixed threshold, boxcar weights, fixed referencePhase)
 * Every classifier applies: one that needs a model fits it from the calibration rows alone.
 */
import { z } from 'zod';
import { InputError } from '../errors.ts';
import { parseScenarioText } from './parse.ts';
import { zodErrorToInputError, fallbackMessage } from './issues.ts';
import { ResolveContext } from './context.ts';
import { label, name, number, quantity, section, text } from './fields.ts';
import { DIMENSION_RANGES, withinMagnitude } from './bounds.ts';
import { chainToPipeline, checkPipelines, MAIN_PIPELINE, pipelineChainShape } from './sections/processing.ts';
import type { PipelineSpec, TimingSpec } from './types.ts';
import { canonicalJson } from './canonical.ts';

const positive = { min: 0, minExclusive: true } as const;

const analyzeSchema = section({
  name: name().optional(),
  column: text().optional(),
  sampleRate: quantity('frequency', positive, 'Sample rate of the records (default: the table metadata)').optional(),
  carrier: z
    .union([z.literal('none'), section({ frequency: quantity('frequency', positive), phase: quantity('angle').optional() })], {
      error: () => '"none" or a mapping {frequency, phase}',
    })
    .optional(),
  recordWindow: section({
    start: quantity('time', { min: 0 }).optional(),
    length: quantity('time', positive).optional(),
  }).optional(),
  outcomes: z.array(label(), { error: () => 'a list of the two outcome labels' }).length(2, { error: () => 'a list of the two outcome labels' }).optional(),
  calibration: z
    .union([z.literal('stored'), section({ labels: text(), fraction: number({ min: 0, minExclusive: true, max: 1, maxExclusive: true }).optional() })], {
      error: () => '"stored" or a mapping {labels: COLUMN, fraction: 0.2}',
    })
    .optional(),
  ...pipelineChainShape,
}, 'a mapping of pipeline keys (filter, decimate, weights, threshold, …)');

/** A parsed pipeline file, before it meets a table. */
export interface AnalyzeFile {
  file: string;
  canonical: string;
  doc: z.output<typeof analyzeSchema>;
  raw: unknown;
}

/** Reads and validates a pipeline file; InputError on any problem. */
export function readPipelineFile(text: string, file: string): AnalyzeFile {
  const raw = parseScenarioText(text, file);
  const parsed = analyzeSchema.safeParse(raw, { reportInput: true, error: fallbackMessage });
  if (!parsed.success) throw zodErrorToInputError(file, parsed.error);
  return { file, canonical: canonicalJson(raw), doc: parsed.data, raw };
}

/** The pipeline when no file is given: the scenario defaults (boxcar over the record window, referencePhase auto, midpoint threshold). */
export function defaultPipelineFile(): AnalyzeFile {
  return readPipelineFile('{}', '(the default pipeline)');
}

/** What the records must supply or may supply for the pipeline. */
export interface TableFacts {
  samples: number;
  sampleRate: number | null;
  carrierFrequency: number | null;
  carrierPhase: number | null;
  windowStart: number | null;
  windowLength: number | null;
}

/** The pipeline and the record timing once the table is known. */
export interface ResolvedAnalysis {
  pipeline: PipelineSpec;
  timing: TimingSpec;
  carrierFrequency: number;
  carrierPhase: number;
}

/** Resolves the pipeline against the table's facts (sample rate, carrier, window). */
export function resolveAnalysis(a: AnalyzeFile, facts: TableFacts, source: string): ResolvedAnalysis {
  const d = a.doc;
  const ctx = new ResolveContext(a.file, a.raw);
  // a value the records' file (its attributes or metadata) or an option gave is refused naming the records and the value
  const fromTable = (key: string, expected: string, value: number): never => {
    throw new InputError(source, key, `${expected} (or set it with an option or in a pipeline file)`, String(value));
  };
  const sampleRate = d.sampleRate ?? facts.sampleRate;
  if (sampleRate === null) {
    throw new InputError(source, 'sample rate', 'a sample rate: --sample-rate, sampleRate in a pipeline file, or the file\'s own (a sample_rate attribute in HDF5, singleshot.sample_rate in Arrow or Parquet metadata)', 'none of them');
  }
  const frequency = DIMENSION_RANGES.frequency, angle = DIMENSION_RANGES.angle;
  if (d.sampleRate === undefined && !(sampleRate > 0 && withinMagnitude(sampleRate, frequency))) fromTable('sample_rate', `a sample rate between ${frequency.min} and ${frequency.max} Hz`, sampleRate);
  const carrierFrequency = d.carrier === undefined ? facts.carrierFrequency ?? 0 : d.carrier === 'none' ? 0 : d.carrier.frequency;
  const carrierPhase = d.carrier === undefined ? facts.carrierPhase ?? 0 : d.carrier === 'none' ? 0 : d.carrier.phase ?? 0;
  if (d.carrier === undefined && !(carrierFrequency >= 0 && carrierFrequency < sampleRate / 2)) fromTable('carrier_frequency', `a carrier frequency from 0 to half the sample rate (${sampleRate / 2} Hz)`, carrierFrequency);
  if (d.carrier === undefined && !withinMagnitude(carrierPhase, angle)) fromTable('carrier_phase', `an angle of magnitude at most ${angle.max} rad`, carrierPhase);
  if (!(carrierFrequency < sampleRate / 2)) ctx.fail(['carrier', 'frequency'], `a frequency below half the sample rate (${sampleRate / 2} Hz)`);
  const recordLength = facts.samples / sampleRate;
  const windowStart = d.recordWindow?.start ?? facts.windowStart ?? 0;
  const windowLength = d.recordWindow?.length ?? (d.recordWindow?.start !== undefined ? recordLength - windowStart : facts.windowLength ?? recordLength - windowStart);
  if (!(windowStart >= 0 && windowLength > 0 && windowStart + windowLength <= recordLength * (1 + 1e-9))) {
    const inside = `a window inside the ${facts.samples}-sample record (${recordLength} s)`;
    if (d.recordWindow === undefined) fromTable(facts.windowStart !== null && !(windowStart >= 0 && windowStart < recordLength) ? 'window_start' : 'window_length', inside, facts.windowStart !== null && !(windowStart >= 0 && windowStart < recordLength) ? windowStart : windowLength);
    ctx.fail(['recordWindow'], inside, `start ${windowStart} s, length ${windowLength} s`);
  }
  const timing: TimingSpec = { sampleRate, recordLength, windowStart, windowLength, shotPeriod: recordLength };
  const pipeline = chainToPipeline(d.name ?? MAIN_PIPELINE, d, [], [], ctx);
  checkPipelines([pipeline], timing, Number.MAX_SAFE_INTEGER, ctx, false, []);
  return { pipeline, timing, carrierFrequency, carrierPhase };
}
