/**
 * The noise of the records: their clean stretches (posteriors.ts) inside the integration window,
 * with the fitted level taken away, cut into Welch segments (analysis/welch.ts) and summed per
 * group of records. Inside the window, because that is the noise a readout integrates — and
 * because records kept by `run --keep-traces` carry their slow and correlated noise only on the
 * samples the pipelines read (engine/trace/collect.ts pads the rest with white noise). Real
 * records lose their state's waveform (the level, or the level on the carrier), so their
 * spectrum is that of the additive noise of the record. Complex records lose their state's
 * level and are projected onto the axis that separates the levels: the spectrum along the
 * separation is what decides an error.
 */
import { makeWelchSegmenter, type WelchSegmenter } from '../analysis/welch.ts';
import { envelopeOf, makeEnvelopeScratch, type BinPlan } from './binning.ts';
import type { RecordGroups } from './estimate.ts';
import type { RecordReading } from './posteriors.ts';
import type { RecordSource } from './records.ts';

/** What is taken away from each clean stretch. */
export type ResidualModel =
  /** Real records: the noise-free record of each state. */
  | { kind: 'record'; waveforms: [Float64Array, Float64Array] }
  /** Complex records: each state's level, and the unit axis along the separation. */
  | { kind: 'along-axis'; levels: [{ re: number; im: number }, { re: number; im: number }]; axis: { cos: number; sin: number } };

/** Welch sums of the residuals per group. */
export interface ResidualSpectra {
  segmenter: WelchSegmenter;
  /** groups × (L/2 + 1) sums of |X_k|². */
  sums: Float64Array;
  /** Segments per group. */
  segments: Float64Array;
}

/** Sample range [lo, hi) of a stretch of bins [first, end) inside the window (a stretch that reaches an end of the record takes that end's samples). */
function stretchSamples(first: number, end: number, plan: BinPlan): [number, number] {
  const lo = first === 0 ? 0 : first * plan.binSamples;
  const hi = end === plan.bins ? plan.samples : end * plan.binSamples;
  return [Math.max(lo, plan.windowLo), Math.min(hi, plan.windowHi)];
}

/** The segment length: a power of two ≤ 4096, ≤ half the window where possible, and short enough that most clean samples lie in stretches that hold a segment; 0 when no stretch holds the shortest. */
export function chooseSegmentLength(reading: RecordReading, plan: BinPlan, shortest: number): number {
  let length = shortest;
  while (length * 2 <= Math.min(4096, Math.max(shortest, (plan.windowHi - plan.windowLo) / 2))) length *= 2;
  const lengths: number[] = [];
  for (let j = 0; j < reading.stretchCount; j++) {
    const [lo, hi] = stretchSamples(reading.stretches[4 * j + 1]!, reading.stretches[4 * j + 2]!, plan);
    lengths.push(Math.max(0, hi - lo));
  }
  const total = lengths.reduce((a, b) => a + b, 0);
  const covered = (l: number) => lengths.reduce((a, b) => a + (b >= l ? b : 0), 0);
  while (length > shortest && covered(length) < 0.5 * total) length /= 2;
  return covered(length) > 0 ? length : 0;
}

/** The residual spectra of the clean stretches (see the file comment). */
export function residualSpectra(
  src: RecordSource, plan: BinPlan, reading: RecordReading, model: ResidualModel, segmentLength: number, groups: RecordGroups,
): ResidualSpectra {
  const segmenter = makeWelchSegmenter(segmentLength);
  const width = segmentLength / 2 + 1;
  const sums = new Float64Array(groups.count * width), segments = new Float64Array(groups.count);
  const scratch = makeEnvelopeScratch(plan.samples);
  const residual = new Float64Array(plan.samples);
  let current = -1;
  for (let j = 0; j < reading.stretchCount; j++) {
    const record = reading.stretches[4 * j]!, state = reading.stretches[4 * j + 3]!;
    const [lo, hi] = stretchSamples(reading.stretches[4 * j + 1]!, reading.stretches[4 * j + 2]!, plan);
    if (hi - lo < segmentLength) continue;
    if (record !== current) {
      if (model.kind === 'record') src.row(record, scratch.inPhase, null);
      else envelopeOf(src, record, plan, scratch);
      current = record;
    }
    if (model.kind === 'record') {
      const w = model.waveforms[state]!;
      for (let k = lo; k < hi; k++) residual[k] = scratch.inPhase[k]! - w[k]!;
    } else {
      const level = model.levels[state]!, { cos, sin } = model.axis;
      for (let k = lo; k < hi; k++) residual[k] = (scratch.zRe[k]! - level.re) * cos + (scratch.zIm[k]! - level.im) * sin;
    }
    const g = groups.of[record]!;
    segments[g] += segmenter.addStretch(residual, lo, hi, sums, g * width);
  }
  return { segmenter, sums, segments };
}
