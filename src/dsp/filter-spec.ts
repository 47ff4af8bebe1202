/**
 * A filter described as data, and its design into one uniform object the processing chain can
 * use without knowing the kind: every designed filter has a Float64Array state, an `apply` with
 * state in/out, and a frequency response.
 */

import { butterworthSections, sosFrequencyResponse } from './butterworth.ts';
import { type ComplexSeries, makeComplexSeries } from './complex-response.ts';
import { applyFir, firResponse, type FirWindow, makeFirHistory, windowedSincTaps } from './fir.ts';
import { applySections, makeSectionState } from './sosfilt.ts';
import { applySinglePole, makeSinglePoleState, singlePoleAlpha, singlePoleResponse } from './single-pole.ts';

/** A low-pass filter as data (cutoffs in Hz, lengths in samples). */
export type FilterSpec =
  | { kind: 'none' }
  | { kind: 'boxcar'; length: number }
  | { kind: 'single-pole'; cutoff: number }
  | { kind: 'butterworth'; order: number; cutoff: number }
  | { kind: 'fir'; taps: number; cutoff: number; window: FirWindow };

/** The coefficients a design produced, for reports and inspection. */
export type FilterCoefficients =
  | { kind: 'identity' }
  | { kind: 'taps'; taps: Float64Array }
  | { kind: 'single-pole'; alpha: number }
  | { kind: 'sections'; sos: Float64Array; sections: number };

/** A filter designed for one sample rate: state factory, stateful application and response. */
export interface DesignedFilter {
  readonly spec: FilterSpec;
  readonly sampleRate: number;
  readonly coefficients: FilterCoefficients;
  /** A fresh state (filter at rest). */
  makeState(): Float64Array;
  /** Filters `input` into `output` (same length; may be `input`) and returns it; `state` is updated in place. */
  apply(input: Float64Array, output: Float64Array, state: Float64Array): Float64Array;
  /** Complex response at each frequency of `freqs` (Hz). */
  response(freqs: ArrayLike<number>): ComplexSeries;
}

/**
 * Designs `spec` at `sampleRate` (Hz). A boxcar of L samples is the FIR with L taps of 1/L (a
 * moving average); 'none' is the identity. Throws RangeError on invalid parameters.
 */
export function designFilter(spec: FilterSpec, sampleRate: number): DesignedFilter {
  switch (spec.kind) {
    case 'none':
      return {
        spec,
        sampleRate,
        coefficients: { kind: 'identity' },
        makeState: () => new Float64Array(0),
        apply: (input, output) => {
          if (output !== input) output.set(input);
          return output;
        },
        response: (freqs) => {
          const out = makeComplexSeries(freqs.length);
          out.re.fill(1);
          return out;
        },
      };
    case 'boxcar': {
      if (!Number.isInteger(spec.length) || spec.length < 1) {
        throw new RangeError(`boxcar length must be an integer ≥ 1, got ${spec.length}`);
      }
      return tapsFilter(spec, sampleRate, new Float64Array(spec.length).fill(1 / spec.length));
    }
    case 'fir':
      return tapsFilter(spec, sampleRate, windowedSincTaps(spec.taps, spec.cutoff, sampleRate, spec.window));
    case 'single-pole': {
      if (!(spec.cutoff > 0) || !Number.isFinite(spec.cutoff)) {
        throw new RangeError(`single-pole cutoff must be positive, got ${spec.cutoff}`);
      }
      const alpha = singlePoleAlpha(spec.cutoff, sampleRate);
      return {
        spec,
        sampleRate,
        coefficients: { kind: 'single-pole', alpha },
        makeState: makeSinglePoleState,
        apply: (input, output, state) => applySinglePole(alpha, input, output, state),
        response: (freqs) => singlePoleResponse(alpha, freqs, sampleRate),
      };
    }
    case 'butterworth': {
      const { sos, sections } = butterworthSections(spec.order, spec.cutoff, sampleRate);
      return {
        spec,
        sampleRate,
        coefficients: { kind: 'sections', sos, sections },
        makeState: () => makeSectionState(sections),
        apply: (input, output, state) => applySections(sos, input, output, state),
        response: (freqs) => sosFrequencyResponse(sos, freqs, sampleRate),
      };
    }
  }
}

/** A designed FIR filter over fixed taps. */
function tapsFilter(spec: FilterSpec, sampleRate: number, taps: Float64Array): DesignedFilter {
  return {
    spec,
    sampleRate,
    coefficients: { kind: 'taps', taps },
    makeState: () => makeFirHistory(taps.length),
    apply: (input, output, state) => applyFir(taps, input, output, state),
    response: (freqs) => firResponse(taps, freqs, sampleRate),
  };
}

/** The first `n` samples of the filter's response to a unit impulse, from rest. */
export function filterImpulseResponse(designed: DesignedFilter, n: number): Float64Array {
  const out = new Float64Array(n);
  if (n > 0) out[0] = 1;
  return designed.apply(out, out, designed.makeState());
}

/**
 * The transpose of filtering from rest on a finite stretch: output[m] = Σ_{n ≥ m} h[n − m]·input[n]
 * (h the impulse response), computed by filtering the time-reversed input and reversing back.
 * With u the integration weights placed on the samples they read, this turns "filter, then
 * weight" into one kernel on the filter's input: Σ_n u[n]·(h ∗ x)[n] = Σ_m output[m]·x[m].
 * `output` may be `input`; `state` must be at rest (it is overwritten).
 */
export function applyFilterAdjoint(
  designed: DesignedFilter, input: Float64Array, output: Float64Array, state: Float64Array,
): Float64Array {
  const n = input.length;
  if (output !== input) for (let i = 0; i < n; i++) output[i] = input[n - 1 - i]!;
  else output.reverse();
  designed.apply(output, output, state);
  output.reverse();
  return output;
}
