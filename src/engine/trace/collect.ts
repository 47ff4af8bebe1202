/**
 * What a batch keeps of each shot's record besides the integrated values: the decimated bins of
 * the pipelines that need them (matched/optimal weights and the likelihood classifier at
 * calibration, the likelihood classifier at scoring), and, when the run keeps traces, the whole
 * record (raw) or its demodulated I/Q (baseband) as Float32 for traces.arrow.
 *
 * Kept traces cover the whole record [0, samples), but the engine synthesises only the samples
 * the pipelines read, [synthLo, synthHi). The samples outside are filled here with the same
 * signal and white noise of the same σ, drawn from a stream of their own (purpose 'aux', block
 * index offset by TRACE_PADDING_BLOCKS), so keeping traces never changes the numbers of the
 * shots: a run gives the same outcomes with and without --keep-traces. Other noise sources
 * added by the engine inside [synthLo, synthHi) are not extended into the padding. A record of
 * two channels (baseband I and Q) keeps both: raw traces are the I and Q channels, the second
 * channel's padding drawn from the padding stream's second lane.
 */
import type { PathBuffer } from '../../physics/chain.ts';
import { BlockStreams, SEED_BLOCK, type StreamPurpose } from '../../random/streams.ts';
import type { RandomStream } from '../../random/stream.ts';
import { addWhiteNoise, writeSignal } from '../../signal/trace.ts';
import { demodulate } from '../../dsp/demodulate.ts';
import { needsCalibrationBins, needsScoreBins } from '../../classify/registry.ts';
import { makeProcessScratch, processRecord, type KeptBins, type ProcessScratch } from '../../dsp/process-record.ts';
import type { CompiledPoint } from '../compile-point.ts';

/** Block-index offset of the padding streams within purpose 'aux' (half of the 2^24 block range). */
export const TRACE_PADDING_BLOCKS = 2 ** 23;


/** Records of every shot of a batch, row after row (count × samples), as Float32. */
export interface KeptTraces {
  kind: 'raw' | 'baseband';
  samples: number;
  /** raw: the record (its I channel on baseband I and Q); baseband: the demodulated I. */
  data: Float32Array;
  /** baseband: the demodulated Q (zeros without a carrier); raw: the Q channel on baseband I and Q, else null. */
  quadrature: Float32Array | null;
}

/** The per-shot hook of simulateBatch. */
export interface ShotCollector {
  /** Called once per shot, in order, after the record of shot i is complete on [synthLo, synthHi). */
  shot(i: number, record: Float64Array, initial: number, path: PathBuffer): void;
  /** What was kept: per pipeline bins (null where not needed) and the traces (null if not kept). */
  result(): { records: (KeptBins | null)[] | null; traces: KeptTraces | null };
}

/** A collector for one batch, or null when nothing beyond the integrated values is needed. */
export function makeShotCollector(
  point: CompiledPoint, pointIndex: number, purpose: StreamPurpose, firstShot: number, count: number,
): ShotCollector | null {
  const samples = point.grid.samples;
  const wanted = point.pipelines.map((p) => (purpose === 'calibrate' ? needsCalibrationBins(p.spec) : purpose === 'score' && needsScoreBins(p.spec)));
  const keep = purpose === 'score' ? point.keepTraces ?? undefined : undefined;
  if (!wanted.some(Boolean) && keep === undefined) return null;

  const records: (KeptBins | null)[] = point.pipelines.map((p, j) => {
    if (!wanted[j]) return null;
    const bins = p.chain.bins;
    return { bins, inPhase: new Float64Array(count * bins), quadrature: p.chain.reference ? new Float64Array(count * bins) : null };
  });
  const scratches: (ProcessScratch | null)[] = point.pipelines.map((p, j) => (wanted[j] ? makeProcessScratch(p.chain, samples) : null));

  const { channels } = point;
  let traces: KeptTraces | null = null;
  let full: Float64Array | null = null;
  let padding: BlockStreams | null = null;
  // the padding's streams: the block's, and its second lane for a second channel
  let streams: RandomStream[] = [];
  const demodI = keep === 'baseband' ? new Float64Array(samples) : null;
  const demodQ = keep === 'baseband' ? new Float64Array(samples) : null;
  if (keep !== undefined) {
    traces = {
      kind: keep, samples, data: new Float32Array(count * samples),
      quadrature: keep === 'baseband' || channels > 1 ? new Float32Array(count * samples) : null,
    };
    full = new Float64Array(channels * samples);
    padding = new BlockStreams(point.scenario.seed, pointIndex, 'aux', TRACE_PADDING_BLOCKS + firstShot / SEED_BLOCK);
    streams = Array.from({ length: channels }, () => padding!.current());
    if (channels > 1) padding.laneInto(streams[1]!);
  }
  const lo = point.synthLo, hi = point.synthHi;
  const fs = point.grid.sampleRate;
  const reference = point.pipelines[0]?.chain.reference ?? null;

  return {
    shot(i, record, initial, path) {
      for (let j = 0; j < records.length; j++) {
        const kept = records[j];
        if (kept) processRecord(point.pipelines[j]!.chain, record, scratches[j]!, kept.inPhase, kept.quadrature, i * kept.bins);
      }
      if (traces === null) return;
      if (i > 0 && i % SEED_BLOCK === 0) {
        streams[0] = padding!.next();
        if (channels > 1) padding!.laneInto(streams[1]!);
      }
      const f = full!;
      for (let c = 0; c < channels; c++) {
        const base = c * samples;
        f.set(record.subarray(base + lo, base + hi), base + lo);
        writeSignal(f, 0, lo, point.waveforms, initial, path, fs, base);
        writeSignal(f, hi, samples, point.waveforms, initial, path, fs, base);
        addWhiteNoise(f, base, base + lo, point.whiteSigma, streams[c]!);
        addWhiteNoise(f, base + hi, base + samples, point.whiteSigma, streams[c]!);
      }
      const at = i * samples;
      if (traces.kind === 'raw') {
        traces.data.set(f.subarray(0, samples), at);
        if (channels > 1) traces.quadrature!.set(f.subarray(samples, 2 * samples), at);
        return;
      }
      demodulate(f, reference, 0, samples, demodI!, demodQ!);
      traces.data.set(demodI!, at);
      traces.quadrature!.set(demodQ!, at);
    },
    result() {
      return { records: wanted.some(Boolean) ? records : null, traces };
    },
  };
}
