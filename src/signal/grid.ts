/**
 * The sample grid of a record: sample k sits at time k/fs. A time span [a, b) covers the
 * samples with a ≤ k/fs < b. A small tolerance absorbs rounding in unit conversion
 * ("20 us" at "100 MHz" must give exactly 2000 samples).
 */
import type { TimingSpec } from '../scenario/types.ts';

const SLACK = 1e-9;

/** Index of the first sample at or after time t. */
export function firstSampleAtOrAfter(t: number, sampleRate: number): number {
  return Math.max(0, Math.ceil(t * sampleRate - SLACK));
}

/** The record's sample count and the window's sample range [lo, hi). */
export interface Grid {
  samples: number;
  windowLo: number;
  windowHi: number;
  sampleRate: number;
}

export function makeGrid(timing: TimingSpec): Grid {
  const fs = timing.sampleRate;
  const samples = firstSampleAtOrAfter(timing.recordLength, fs);
  const windowLo = Math.min(samples, firstSampleAtOrAfter(timing.windowStart, fs));
  const windowHi = Math.min(samples, firstSampleAtOrAfter(timing.windowStart + timing.windowLength, fs));
  return { samples, windowLo, windowHi, sampleRate: fs };
}
