/**
 * shots.arrow of `analyze`: one row per record, in the columns of a run's shots table where they
 * mean the same — point (0), shot (the record's row in the input), pipeline, prepared (the
 * label: the outcome the lab says it prepared; null where unlabelled), in_phase, quadrature,
 * value, outcome, correct (null where unlabelled) — and what only an analysis has: calibration
 * (the row calibrated the pipeline and is not in the summary), statistic (the classifier's own,
 * e.g. the log-odds, where it reads the bins) and discarded (inside the ambiguous band).
 */
import { Bool, Float64, makeData, RecordBatch, Schema, Struct, Uint32 } from 'apache-arrow';
import { ArrowFileStream } from '../arrow-sink.ts';
import { boolData, dictionaryData, float64Data, makeDictionaryColumn, nullableFloat64Data, uint32Data, unitField } from '../arrow-columns.ts';

/** Rows per record batch. */
const BATCH_ROWS = 65536;

/** What the table holds, per record. */
export interface RecordedShots {
  pipeline: string;
  outcomes: readonly string[];
  /** Unit of the integrated values ('' for plain numbers). */
  unit: string;
  /** Labelled outcome per row (255: unlabelled), or null. */
  labels: Uint8Array | null;
  /** 1 where the row calibrated. */
  calibration: Uint8Array;
  inPhase: Float64Array;
  quadrature: Float64Array;
  value: Float64Array;
  statistic: Float64Array | null;
  outcome: Uint8Array;
  discarded: Uint8Array;
}

/** The validity bitmap of n rows where `isNull` says which are null (undefined when none is). */
function validity(n: number, isNull: (i: number) => boolean): { nullBitmap: Uint8Array | undefined; nullCount: number } {
  const bitmap = new Uint8Array((n + 7) >> 3);
  let nullCount = 0;
  for (let i = 0; i < n; i++) {
    if (isNull(i)) nullCount++;
    else bitmap[i >> 3]! |= 1 << (i & 7);
  }
  return { nullBitmap: nullCount > 0 ? bitmap : undefined, nullCount };
}

/** Writes shots.arrow at `path` with schema metadata `metadata`. */
export function writeRecordedShots(path: string, metadata: Map<string, string>, s: RecordedShots): void {
  const outcomes = makeDictionaryColumn(1, s.outcomes);
  const pipelines = makeDictionaryColumn(2, [s.pipeline]);
  const fields = [
    unitField('point', new Uint32(), null), unitField('shot', new Uint32(), null), unitField('pipeline', pipelines.type, null),
    unitField('prepared', outcomes.type, null, true), unitField('calibration', new Bool(), null),
    unitField('in_phase', new Float64(), s.unit), unitField('quadrature', new Float64(), s.unit), unitField('value', new Float64(), s.unit),
    unitField('statistic', new Float64(), '', true),
    unitField('outcome', outcomes.type, null), unitField('correct', new Bool(), null, true), unitField('discarded', new Bool(), null),
  ];
  const schema = new Schema(fields, metadata);
  const stream = new ArrowFileStream(path, schema);
  try {
    const n = s.value.length;
    for (let from = 0; from < n || from === 0; from += BATCH_ROWS) {
      const to = Math.min(n, from + BATCH_ROWS), count = to - from;
      const label = s.labels ? s.labels.subarray(from, to) : new Uint8Array(count).fill(255);
      const outcome = s.outcome.slice(from, to);
      const correct = Uint8Array.from(outcome, (o, j) => (o === label[j] ? 1 : 0));
      const labelled = validity(count, (j) => label[j] === 255);
      const children = [
        uint32Data(new Uint32Array(count)), uint32Data(Uint32Array.from({ length: count }, (_, j) => from + j)),
        dictionaryData(pipelines, new Uint8Array(count)),
        makeData({ type: outcomes.type, length: count, data: Uint8Array.from(label, (l) => (l === 255 ? 0 : l)), dictionary: outcomes.dictionary, ...labelled }),
        boolData(s.calibration.subarray(from, to)),
        float64Data(s.inPhase.slice(from, to)), float64Data(s.quadrature.slice(from, to)), float64Data(s.value.slice(from, to)),
        nullableFloat64Data(s.statistic ? s.statistic.slice(from, to) : new Float64Array(count).fill(NaN)),
        dictionaryData(outcomes, outcome), makeData({ type: new Bool(), length: count, data: boolData(correct).values, ...labelled }),
        boolData(s.discarded.subarray(from, to)),
      ];
      const struct = makeData({ type: new Struct(fields), length: count, nullCount: 0, children });
      stream.write(new RecordBatch(schema, struct));
      if (n === 0) break;
    }
    stream.finish();
  } catch (e) {
    stream.abort();
    throw e;
  }
}
