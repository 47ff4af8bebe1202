/**
 * Records to bins of their complex envelope z: for real records with a carrier the lab's
 * demodulation z_k = 2·x_k·e^(−i2πf k/fs) (dsp/demodulate.ts, reference phase 0), times π/4 for a
 * square carrier (its fundamental is 4/π of its height, so z then shows the level itself); for
 * baseband records z = x; for complex records z = I + iQ. A bin is the mean of z over
 * `binSamples` samples; with a carrier it spans whole carrier periods where the sample rate allows,
 * so the 2f term of the demodulation averages out. The window mean of z is kept per record too.
 */
import { demodulate, makeReference, type Reference } from '../dsp/demodulate.ts';
import type { RecordSource } from './records.ts';

/** Most bins per record (enough to place a jump; more only slows the model). */
export const MAX_BINS = 64;

/** How records become bins. */
export interface BinPlan {
  samples: number;
  binSamples: number;
  bins: number;
  /** The demodulation reference (real records with a carrier), else null. */
  reference: Reference | null;
  /** π/4 for a square carrier, else 1. */
  scale: number;
  /** The window's samples [lo, hi). */
  windowLo: number;
  windowHi: number;
}

/** The plan for records of `samples` samples; `carrier` only for real records with one. */
export function planBins(
  samples: number, sampleRate: number, carrier: { frequency: number; shape: 'sine' | 'square' } | null, window: { lo: number; hi: number },
): BinPlan {
  let binSamples = Math.max(1, Math.ceil(samples / MAX_BINS));
  if (carrier) {
    const period = sampleRate / carrier.frequency;
    // whole periods per bin where the period is close to a whole number of samples
    const whole = Math.max(1, Math.round(period));
    binSamples = Math.max(whole, whole * Math.ceil(binSamples / whole));
  }
  const bins = Math.max(1, Math.floor(samples / binSamples));
  return {
    samples, binSamples, bins, reference: carrier ? makeReference(samples, sampleRate, carrier.frequency, 0) : null,
    scale: carrier?.shape === 'square' ? Math.PI / 4 : 1, windowLo: window.lo, windowHi: window.hi,
  };
}

/** Reusable buffers for one record. */
export interface EnvelopeScratch {
  inPhase: Float64Array;
  quadrature: Float64Array;
  zRe: Float64Array;
  zIm: Float64Array;
}

/** Buffers for records of `samples` samples. */
export function makeEnvelopeScratch(samples: number): EnvelopeScratch {
  return { inPhase: new Float64Array(samples), quadrature: new Float64Array(samples), zRe: new Float64Array(samples), zIm: new Float64Array(samples) };
}

/** Reads row r and writes its envelope into scratch.zRe/zIm. */
export function envelopeOf(src: RecordSource, r: number, plan: BinPlan, scratch: EnvelopeScratch): void {
  const n = plan.samples;
  src.row(r, scratch.inPhase, src.complex ? scratch.quadrature : null);
  if (src.complex) {
    scratch.zRe.set(scratch.inPhase);
    scratch.zIm.set(scratch.quadrature);
    return;
  }
  demodulate(scratch.inPhase, plan.reference, 0, n, scratch.zRe, scratch.zIm);
  if (plan.scale !== 1) for (let k = 0; k < n; k++) { scratch.zRe[k]! *= plan.scale; scratch.zIm[k]! *= plan.scale; }
}

/** The bins of every record and each record's window mean of z. */
export interface BinnedRecords {
  count: number;
  bins: number;
  /** count × bins, row-major. */
  re: Float32Array;
  im: Float32Array;
  /** Window mean of z per record. */
  windowRe: Float64Array;
  windowIm: Float64Array;
  /** Whether any record has a nonzero imaginary part. */
  complexValued: boolean;
}

/** Bins the first `count` records of `src`. */
export function binRecords(src: RecordSource, count: number, plan: BinPlan): BinnedRecords {
  const { bins, binSamples, windowLo, windowHi } = plan;
  const re = new Float32Array(count * bins), im = new Float32Array(count * bins);
  const windowRe = new Float64Array(count), windowIm = new Float64Array(count);
  const scratch = makeEnvelopeScratch(plan.samples);
  let complexValued = false;
  for (let r = 0; r < count; r++) {
    envelopeOf(src, r, plan, scratch);
    const { zRe, zIm } = scratch;
    for (let b = 0; b < bins; b++) {
      let a = 0, c = 0;
      for (let k = b * binSamples; k < (b + 1) * binSamples; k++) { a += zRe[k]!; c += zIm[k]!; }
      re[r * bins + b] = a / binSamples;
      im[r * bins + b] = c / binSamples;
      if (c !== 0) complexValued = true;
    }
    let a = 0, c = 0;
    for (let k = windowLo; k < windowHi; k++) { a += zRe[k]!; c += zIm[k]!; }
    windowRe[r] = a / (windowHi - windowLo);
    windowIm[r] = c / (windowHi - windowLo);
  }
  return { count, bins, re, im, windowRe, windowIm, complexValued };
}
