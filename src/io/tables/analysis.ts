/**
 * The tables of `analyze`: shots.arrow (one row per decided record: I, Q, value, outcome, the
 * ambiguous band, and with labels the label and whether the outcome matches it) and a one-row
 * summary.arrow (the pipeline, the row counts, the errors against the labels with their
 * intervals, the calibration). Plain rows in, Arrow out.
 */
import { Bool, Float64, makeData, RecordBatch, Schema, Struct, Uint32 } from 'apache-arrow';
import { ArrowFileStream } from '../arrow-sink.ts';
import { boolData, dictionaryData, float64Data, makeDictionaryColumn, uint32Data, unitField } from '../arrow-columns.ts';
import { META_PREFIX } from '../metadata.ts';
import type { ColumnSpec } from './columns.ts';

/** A rate with its interval. */
interface Rate {
  rate: number;
  low: number;
  high: number;
}

/** The errors against the labels, as analyze scores them. */
export interface AnalysisScores {
  shots: number;
  error: Rate;
  byOutcome: { outcome: string; error: Rate }[];
  discardFraction: number;
  postSelectedError: Rate;
  discardsAsFailuresError: Rate;
}

/** What the summary says about the calibration. */
export interface AnalysisCalibration {
  threshold: number;
  highIsOne: boolean;
  axisAngle: number;
  referencePhase: number;
  bins: number;
  sampleRate: number;
}

/** The per-row columns of shots.arrow (255 in outcome: a calibration row, not decided). */
export interface ShotColumns {
  inPhase: Float64Array;
  quadrature: Float64Array;
  value: Float64Array;
  outcome: Uint8Array;
  discarded: Uint8Array;
  labels: Uint8Array | null;
  calibrationRows: Uint8Array;
}

/** shots.arrow of analyze: one row per decided (non-calibration) row, in batches of 65 536. */
export function writeAnalysisShots(path: string, metadata: Map<string, string>, outcomes: readonly string[], pipeline: string, s: ShotColumns): void {
  const dict = makeDictionaryColumn(1, outcomes);
  const fields = [
    unitField('row', new Uint32(), null), unitField('in_phase', new Float64(), null), unitField('quadrature', new Float64(), null),
    unitField('value', new Float64(), null), unitField('outcome', dict.type, null), unitField('discarded', new Bool(), null),
    ...(s.labels ? [unitField('label', dict.type, null, true), unitField('correct', new Bool(), null, true)] : []),
  ];
  const schema = new Schema(fields, new Map([...metadata, [`${META_PREFIX}pipeline`, pipeline]]));
  const stream = new ArrowFileStream(path, schema);
  try {
    const decided: number[] = [];
    for (let r = 0; r < s.outcome.length; r++) if (!s.calibrationRows[r]) decided.push(r);
    for (let from = 0; from < decided.length || from === 0; from += 65536) {
      const rows = decided.slice(from, from + 65536);
      const pick = <T extends Float64Array | Uint8Array>(a: T, make: (n: number) => T): T => {
        const out = make(rows.length);
        rows.forEach((r, j) => { out[j] = a[r]!; });
        return out;
      };
      const f64 = (a: Float64Array) => float64Data(pick(a, (k) => new Float64Array(k)));
      const u8 = (a: Uint8Array) => pick(a, (k) => new Uint8Array(k));
      const children = [
        uint32Data(Uint32Array.from(rows)), f64(s.inPhase), f64(s.quadrature), f64(s.value),
        dictionaryData(dict, u8(s.outcome)), boolData(u8(s.discarded)),
      ];
      if (s.labels) {
        // unlabelled rows (255) get null label and correct
        const label = u8(s.labels);
        const valid = new Uint8Array((rows.length + 7) >> 3);
        let nulls = 0;
        label.forEach((l, j) => { if (l <= 1) valid[j >> 3]! |= 1 << (j & 7); else nulls++; });
        const correct = Uint8Array.from(label, (l, j) => (l <= 1 && l === s.outcome[rows[j]!] ? 1 : 0));
        const nullBitmap = nulls > 0 ? valid : undefined;
        children.push(
          makeData({ type: dict.type, length: rows.length, nullCount: nulls, nullBitmap, data: Uint8Array.from(label, (l) => (l <= 1 ? l : 0)), dictionary: dict.dictionary }),
          makeData({ type: new Bool(), length: rows.length, nullCount: nulls, nullBitmap, data: boolData(correct).values }),
        );
      }
      stream.write(new RecordBatch(schema, makeData({ type: new Struct(fields), length: rows.length, nullCount: 0, children })));
      if (decided.length === 0) break;
    }
    stream.finish();
  } catch (e) {
    stream.abort();
    throw e;
  }
}


/** The columns of analyze's one-row summary.arrow. */
export function analysisSummaryColumns(
  pipeline: string, rows: number, calibrationRows: Uint8Array, c: AnalysisCalibration, scores: AnalysisScores | null,
): ColumnSpec[] {
  const calibrated = calibrationRows.reduce((a, x) => a + x, 0);
  const f = (name: string, v: number | null) => ({ name, kind: 'f64' as const, unit: '', values: [v] });
  const u = (name: string, v: number) => ({ name, kind: 'u32' as const, unit: null, values: [v] });
  return [
    { name: 'pipeline', kind: 'str' as const, unit: null, values: [pipeline] },
    u('rows', rows), u('calibration_rows', calibrated), u('decided_rows', rows - calibrated),
    u('scored_shots', scores?.shots ?? 0),
    f('mean_error', scores?.error.rate ?? null), f('mean_error_low', scores?.error.low ?? null), f('mean_error_high', scores?.error.high ?? null),
    ...(scores?.byOutcome ?? []).flatMap((b) => [
      f(`error_${b.outcome}`, b.error.rate), f(`error_${b.outcome}_low`, b.error.low), f(`error_${b.outcome}_high`, b.error.high),
    ]),
    f('discard_fraction', scores?.discardFraction ?? null),
    f('post_selected_error', scores?.postSelectedError.rate ?? null),
    f('discards_as_failures_error', scores?.discardsAsFailuresError.rate ?? null),
    f('threshold', c.threshold), { name: 'high_is_one', kind: 'bool' as const, unit: null, values: [c.highIsOne] },
    { ...f('axis_angle', c.axisAngle), unit: 'rad' }, { ...f('reference_phase', c.referencePhase), unit: 'rad' },
    u('bins', c.bins), { ...f('sample_rate', c.sampleRate), unit: 'Hz' },
  ];
}
