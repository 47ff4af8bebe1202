/**
 * Carrier tables: the in-phase and quadrature waveforms that modulate the state level, sampled
 * on the record grid. A complex level L gives Re(L)·c(t) − Im(L)·s(t), i.e. Re(L·e^{iθ(t)}) for
 * a sine carrier with θ(t) = 2π f t + φ. A square carrier uses sign(cos θ) and sign(sin θ).
 * Baseband: c = 1, s = 0.
 *
 * Baseband I and Q ('baseband-iq'): the record has two channels, stored channel-major — samples
 * [0, n) are I, [n, 2n) are Q — and the tables cover both: c = (1 | 0), s = (0 | −1), so that
 * Re(L)·c − Im(L)·s writes Re(L) into I and Im(L) into Q. Every table and kernel on such a record
 * has the same channel-major layout, so a linear statistic is still Σ kernel·record over it.
 */
import type { CarrierSpec } from '../scenario/types.ts';

export interface CarrierTables {
  /** Channels of the record (1, or 2 for baseband I and Q); each table holds channels × samples entries. */
  channels: number;
  /** In-phase waveform per sample. */
  inPhase: Float64Array;
  /** Quadrature waveform per sample. */
  quadrature: Float64Array;
}

/** Channels a record has under this carrier: I and Q for baseband-iq, else one. */
export function recordChannels(carrier: Pick<CarrierSpec, 'shape'>): number {
  return carrier.shape === 'baseband-iq' ? 2 : 1;
}

/** Carrier tables for n samples (per channel) at sampleRate, sample k at time k/sampleRate. */
export function carrierTables(carrier: CarrierSpec, n: number, sampleRate: number): CarrierTables {
  const channels = recordChannels(carrier);
  const inPhase = new Float64Array(channels * n);
  const quadrature = new Float64Array(channels * n);
  if (carrier.shape === 'none') {
    inPhase.fill(1);
    return { channels, inPhase, quadrature };
  }
  if (carrier.shape === 'baseband-iq') {
    inPhase.fill(1, 0, n);
    quadrature.fill(-1, n, 2 * n);
    return { channels, inPhase, quadrature };
  }
  const w = 2 * Math.PI * carrier.frequency / sampleRate;
  for (let k = 0; k < n; k++) {
    const theta = w * k + carrier.phase;
    const c = Math.cos(theta), s = Math.sin(theta);
    if (carrier.shape === 'sine') {
      inPhase[k] = c;
      quadrature[k] = s;
    } else {
      inPhase[k] = c > 0 ? 1 : c < 0 ? -1 : 0;
      quadrature[k] = s > 0 ? 1 : s < 0 ? -1 : 0;
    }
  }
  return { channels, inPhase, quadrature };
}

/** The waveform of one state: gain·(Re(L)·c − Im(L)·s), written into out (channels × samples long). */
export function stateWaveform(tables: CarrierTables, re: number, im: number, gain: number, out: Float64Array): Float64Array {
  const { inPhase, quadrature } = tables;
  for (let k = 0; k < out.length; k++) out[k] = gain * (re * inPhase[k]! - im * quadrature[k]!);
  return out;
}
