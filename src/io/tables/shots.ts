/**
 * shots.arrow: one row per scored shot and pipeline, in the order point, batch, pipeline, shot.
 * Truth columns (prepared state, states along the way, first jump time) beside what the
 * pipeline reported (I, Q, projected value, outcome, correct, cause).
 */
import { Float64, RecordBatch, Schema, Struct, Uint32, Bool, makeData } from 'apache-arrow';
import { CAUSE_DISCARDED, CAUSES } from '../../analysis/causes.ts';
import type { ScoredPipeline } from '../../classify/score.ts';
import type { Scenario } from '../../scenario/types.ts';
import {
  boolData, dictionaryData, float64Data, makeDictionaryColumn, nullableFloat64Data, uint32Data, unitField,
  type DictionaryColumn,
} from '../arrow-columns.ts';
import type { BatchRows } from './inputs.ts';

/** Column layout of shots.arrow for one scenario (dictionaries fixed for the whole file). */
export interface ShotsLayout {
  schema: Schema;
  states: DictionaryColumn;
  outcomes: DictionaryColumn;
  causes: DictionaryColumn;
  pipelines: DictionaryColumn;
}

const STATE_COLUMNS = ['prepared', 'after_preparation', 'at_record_start', 'at_window_start', 'at_window_end'] as const;

export function shotsLayout(scenario: Scenario, metadata: Map<string, string>): ShotsLayout {
  const unit = scenario.signal.unit;
  const states = makeDictionaryColumn(1, scenario.states.map((s) => s.name));
  const outcomes = makeDictionaryColumn(2, scenario.outcomes);
  const causes = makeDictionaryColumn(3, [...CAUSES]);
  const pipelines = makeDictionaryColumn(4, scenario.pipelines.map((p) => p.name));
  const schema = new Schema([
    unitField('point', new Uint32(), null),
    unitField('shot', new Uint32(), null),
    unitField('pipeline', pipelines.type, null),
    ...STATE_COLUMNS.map((c) => unitField(c, states.type, null)),
    unitField('first_jump_s', new Float64(), 's', true),
    unitField('in_phase', new Float64(), unit),
    unitField('quadrature', new Float64(), unit),
    unitField('value', new Float64(), unit),
    unitField('outcome', outcomes.type, null),
    unitField('correct', new Bool(), null),
    unitField('cause', causes.type, null),
  ], metadata);
  return { schema, states, outcomes, causes, pipelines };
}

/** The record batches (one per pipeline) of one scored shot batch. */
export function shotRecordBatches(
  layout: ShotsLayout, b: BatchRows, scored: readonly ScoredPipeline[], outcomeOf: readonly number[],
): RecordBatch[] {
  const n = b.count;
  const point = new Uint32Array(n).fill(b.point);
  const shot = new Uint32Array(n);
  for (let i = 0; i < n; i++) shot[i] = b.firstShot + i;
  const stateData = [b.intended, b.prepared, b.initial, b.atWindowStart, b.atWindowEnd].map((a) => dictionaryData(layout.states, a));
  const jump = nullableFloat64Data(b.firstJump);
  return scored.map((s, p) => {
    const correct = new Uint8Array(n);
    for (let i = 0; i < n; i++) correct[i] = s.outcome[i] === outcomeOf[b.intended[i]!] ? 1 : 0;
    const children = [
      uint32Data(point), uint32Data(shot), dictionaryData(layout.pipelines, new Uint8Array(n).fill(p)),
      ...stateData, jump,
      float64Data(b.values[p]!.inPhase), float64Data(b.values[p]!.quadrature), float64Data(s.projected),
      dictionaryData(layout.outcomes, s.outcome), boolData(correct), dictionaryData(layout.causes, shownCause(s)),
    ];
    const data = makeData({ type: new Struct(layout.schema.fields), length: n, nullCount: 0, children });
    return new RecordBatch(layout.schema, data);
  });
}

/** The cause column: 'discarded' for shots inside the ambiguous band (outcome and correct stay the plain decision's). */
function shownCause(s: ScoredPipeline): Uint8Array {
  if (!s.discarded) return s.cause;
  const out = Uint8Array.from(s.cause);
  for (let i = 0; i < out.length; i++) if (s.discarded[i]) out[i] = CAUSE_DISCARDED;
  return out;
}
