/**
 * traces.arrow (run --keep-traces raw|baseband): one row per scored shot, written record batch
 * by record batch (one per scored batch) through ArrowFileStream, so memory stays bounded by the
 * batch. Columns:
 *   point, shot                       u32
 *   prepared … at_window_end          the truth states (as in shots.arrow)
 *   intended_outcome                  the outcome label a perfect readout of the prepared state reports
 *   first_jump_s                      first transition time from the record start (null if none)
 *   cause                             what could make the shot wrong: preparation, mapping, the
 *                                     first jump before the window end (relaxation/excitation/
 *                                     leakage), or none
 *   raw:      record                  FixedSizeList<Float32>[samples], the digitised record
 *             in_phase, quadrature    instead, for a record of baseband I and Q (carrier
 *                                     baseband-iq): its two digitised channels
 *   baseband: in_phase, quadrature    FixedSizeList<Float32>[samples] each: the record times
 *                                     2cos θ and −2sin θ with the first pipeline's reference
 *                                     (not filtered); without a carrier in_phase = the record
 *                                     and quadrature = 0; on baseband I and Q the channels
 *                                     rotated by the reference phase
 * Schema metadata: the provenance of every table, plus singleshot.trace_kind, sample_rate (Hz),
 * carrier_frequency (Hz), carrier_phase (rad), reference_phase (rad, of the first pipeline),
 * window_start / window_length (s), outcomes (JSON list, outcome 0 first) and calibration (JSON:
 * per point and pipeline the calibrated axis, threshold, weights), so `analyze` can read the
 * file alone.
 */
import { encodeData } from '../plain-data.ts';
import { Field, FixedSizeList, Float32, Float64, makeData, RecordBatch, Schema, Struct, Uint32 } from 'apache-arrow';
import { attributeCause, CAUSE_NOISE, CAUSE_NONE, CAUSES } from '../../analysis/causes.ts';
import type { Scenario } from '../../scenario/types.ts';
import { recordChannels } from '../../signal/carrier.ts';
import { DEFAULT_CLASSIFIER } from '../../classify/registry.ts';
import {
  dictionaryData, makeDictionaryColumn, nullableFloat64Data, uint32Data, unitField, type DictionaryColumn,
} from '../arrow-columns.ts';
import { META_PREFIX } from '../metadata.ts';
import type { BatchRows, PointRows } from './inputs.ts';

/** Column layout of traces.arrow (dictionaries fixed for the whole file). */
export interface TracesLayout {
  schema: Schema;
  kind: 'raw' | 'baseband';
  samples: number;
  /** Record columns: `record`, or `in_phase` and `quadrature`. */
  columns: number;
  states: DictionaryColumn;
  outcomes: DictionaryColumn;
  causes: DictionaryColumn;
}

const STATE_COLUMNS = ['prepared', 'after_preparation', 'at_record_start', 'at_window_start', 'at_window_end'] as const;

/** The calibration of one point's pipelines as stored in the metadata (read by analyze). */
export interface StoredCalibration {
  point: number;
  pipelines: {
    name: string;
    referencePhase: number;
    axisAngle: number;
    threshold: number;
    highIsOne: boolean;
    weights: number[] | null;
    bandHalfWidth: number;
    classifier: string;
    /** Mean decision statistic of the calibration shots of each outcome. */
    outcomeMeans: [number, number];
    /** The classifier's fitted model (plain data), null for one that fits none. */
    model: unknown;
  }[];
}

/** The stored calibrations of calibrated points. */
export function storedCalibrations(points: readonly PointRows[]): StoredCalibration[] {
  return points.map((p) => ({
    point: p.index,
    pipelines: p.compiled.pipelines.map((c, i) => {
      const cal = p.calibrations[i]!;
      return {
        name: c.spec.name, referencePhase: c.referencePhase, axisAngle: Math.atan2(cal.axis.sin, cal.axis.cos),
        threshold: cal.rule.threshold, highIsOne: cal.rule.highIsOne,
        weights: cal.weights ? Array.from(cal.weights) : null, bandHalfWidth: cal.bandHalfWidth, classifier: c.spec.classifier ?? DEFAULT_CLASSIFIER,
        outcomeMeans: cal.outcomeMeans, model: encodeData(cal.model),
      };
    }),
  }));
}

/** The layout for `scenario` with the base metadata `metadata` and the points' calibrations. */
export function tracesLayout(
  scenario: Scenario, kind: 'raw' | 'baseband', samples: number, metadata: Map<string, string>,
  calibrated: readonly PointRows[],
): TracesLayout {
  const unit = scenario.signal.unit;
  const states = makeDictionaryColumn(1, scenario.states.map((s) => s.name));
  const outcomes = makeDictionaryColumn(2, scenario.outcomes);
  const causes = makeDictionaryColumn(3, [...CAUSES]);
  const list = () => new FixedSizeList(samples, new Field('sample', new Float32(), false));
  const recordFields = kind === 'raw' && recordChannels(scenario.signal.carrier) === 1
    ? [unitField('record', list(), unit)]
    : [unitField('in_phase', list(), unit), unitField('quadrature', list(), unit)];
  const meta = new Map(metadata);
  const first = calibrated[0]?.compiled;
  const put = (k: string, v: string) => meta.set(`${META_PREFIX}${k}`, v);
  put('trace_kind', kind);
  put('sample_rate', String(scenario.timing.sampleRate));
  put('carrier_frequency', String(scenario.signal.carrier.frequency));
  put('carrier_phase', String(scenario.signal.carrier.phase));
  if (first) put('reference_phase', String(first.pipelines[0]!.referencePhase));
  put('window_start', String(scenario.timing.windowStart));
  put('window_length', String(scenario.timing.windowLength));
  put('outcomes', JSON.stringify(scenario.outcomes));
  put('calibration', JSON.stringify(storedCalibrations(calibrated)));
  const schema = new Schema([
    unitField('point', new Uint32(), null),
    unitField('shot', new Uint32(), null),
    ...STATE_COLUMNS.map((c) => unitField(c, states.type, null)),
    unitField('intended_outcome', outcomes.type, null),
    unitField('first_jump_s', new Float64(), 's', true),
    unitField('cause', causes.type, null),
    ...recordFields,
  ], meta);
  return { schema, kind, samples, columns: recordFields.length, states, outcomes, causes };
}

/** The record batch of one scored shot batch (which must carry `traces`). */
export function traceRecordBatch(layout: TracesLayout, b: BatchRows, outcomeOf: readonly number[]): RecordBatch {
  const traces = b.traces;
  if (!traces || traces.kind !== layout.kind || traces.samples !== layout.samples) {
    throw new Error(`batch ${b.batch} of point ${b.point} carries no ${layout.kind} traces of ${layout.samples} samples`);
  }
  const n = b.count;
  const point = new Uint32Array(n).fill(b.point);
  const shot = new Uint32Array(n);
  const intendedOutcome = new Uint8Array(n);
  const cause = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    shot[i] = b.firstShot + i;
    intendedOutcome[i] = outcomeOf[b.intended[i]!]!;
    const c = attributeCause(b.intended[i]!, b.prepared[i]!, b.initial[i]!, b.jumpCause[i] !== 0, b.jumpCause[i]!);
    cause[i] = c === CAUSE_NOISE ? CAUSE_NONE : c;
  }
  const listData = (values: Float32Array, field: Field) => makeData({
    type: field.type as FixedSizeList<Float32>, length: n, nullCount: 0,
    child: makeData({ type: new Float32(), length: n * layout.samples, nullCount: 0, data: values }),
  });
  const fields = layout.schema.fields;
  const records = layout.columns === 1
    ? [listData(traces.data, fields[fields.length - 1]!)]
    : [listData(traces.data, fields[fields.length - 2]!), listData(traces.quadrature!, fields[fields.length - 1]!)];
  const children = [
    uint32Data(point), uint32Data(shot),
    ...[b.intended, b.prepared, b.initial, b.atWindowStart, b.atWindowEnd].map((a) => dictionaryData(layout.states, a)),
    dictionaryData(layout.outcomes, intendedOutcome),
    nullableFloat64Data(b.firstJump),
    dictionaryData(layout.causes, cause),
    ...records,
  ];
  const data = makeData({ type: new Struct(layout.schema.fields), length: n, nullCount: 0, children });
  return new RecordBatch(layout.schema, data);
}
