/**
 * The engine of recorded traces: a lab's records, row by row, through each pipeline's per-record
 * path (dsp/process-record.ts) into the same batch columns a simulated batch has, so calibration
 * and scoring (classify/) run on them unchanged. What a simulation knows and a record does not —
 * the hidden history — is the label: each labelled row's "state" is its labelled outcome (states
 * and outcomes coincide), prepared and initial alike, with no jump; an unlabelled row counts as
 * outcome 0 there and is never tallied.
 *
 * Complex records (I and Q) are baseband I and Q: the record is laid out as the engines lay out
 * two channels, I's samples then Q's.
 */
import { integrateBins, makeProcessScratch, processRecord, type KeptBins, type ProcessScratch } from '../../dsp/process-record.ts';
import type { PipelineChain } from '../../dsp/pipeline-chain.ts';
import type { ShotColumns } from '../../classify/shots.ts';

/** What the engine reads of a record set (io/records/record-set.ts's RecordSet has it). */
export interface RecordRows {
  samples: number;
  complex: boolean;
  row(r: number, outI: Float64Array, outQ: Float64Array | null): void;
}

/** A pipeline as the engine runs it: its chain, and whether its decimated bins are kept. */
export interface RecordedPipeline {
  chain: PipelineChain;
  keepBins: boolean;
}

/** Buffers reused batch after batch (no per-record allocation). */
export interface RecordedScratch {
  record: Float64Array;
  quadrature: Float64Array | null;
  process: ProcessScratch[];
}

export function makeRecordedScratch(source: RecordRows, pipelines: readonly RecordedPipeline[]): RecordedScratch {
  const channels = source.complex ? 2 : 1;
  return {
    record: new Float64Array(channels * source.samples),
    quadrature: source.complex ? new Float64Array(source.samples) : null,
    process: pipelines.map((p) => makeProcessScratch(p.chain, channels * source.samples)),
  };
}

/** Rows `rows` of `source` as one batch; `labels[r]` is row r's outcome (255: unlabelled). */
export function recordedBatch(
  source: RecordRows, pipelines: readonly RecordedPipeline[], rows: ArrayLike<number>, labels: Uint8Array | null, scratch: RecordedScratch,
): ShotColumns {
  const count = rows.length;
  const n = source.samples;
  const intended = new Uint8Array(count);
  const values = pipelines.map(() => ({ inPhase: new Float64Array(count), quadrature: new Float64Array(count) }));
  const records: (KeptBins | null)[] = pipelines.map(({ chain, keepBins }) => (keepBins
    ? { bins: chain.bins, inPhase: new Float64Array(count * chain.bins), quadrature: chain.reference ? new Float64Array(count * chain.bins) : null }
    : null));
  const bins = pipelines.map(({ chain }) => ({ i: new Float64Array(chain.bins), q: new Float64Array(chain.bins) }));
  const { record, quadrature } = scratch;
  for (let j = 0; j < count; j++) {
    const r = rows[j]!;
    source.row(r, record, quadrature);
    if (quadrature) record.set(quadrature, n);
    const label = labels ? labels[r]! : 255;
    intended[j] = label === 255 ? 0 : label;
    pipelines.forEach(({ chain }, p) => {
      const kept = records[p];
      const outI = kept ? kept.inPhase : bins[p]!.i, outQ = kept ? kept.quadrature : bins[p]!.q;
      const offset = kept ? j * chain.bins : 0;
      processRecord(chain, record, scratch.process[p]!, outI, outQ, offset);
      values[p]!.inPhase[j] = integrateBins(outI, offset, chain.binWeights);
      values[p]!.quadrature[j] = chain.reference && outQ ? integrateBins(outQ, offset, chain.binWeights) : 0;
    });
  }
  const none = new Uint8Array(count);
  return {
    count, values, records,
    intended, prepared: intended, initial: intended, atWindowStart: intended, atWindowEnd: intended,
    firstJump: new Float64Array(count).fill(NaN), jumpCause: none,
  };
}
