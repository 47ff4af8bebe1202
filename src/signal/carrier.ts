/**
 * Carrier tables: the in-phase and quadrature waveforms that modulate the state level, sampled
 * on the record grid. A complex level L gives Re(L)·c(t) − Im(L)·s(t), i.e. Re(L·e^{iθ(t)}) for
 * a sine carrier with θ(t) = 2π f t + φ. A square carrier uses sign(cos θ) and sign(sin θ).
 * Baseband: c = 1, s = 0.
 */
import type { CarrierSpec } from '../scenario/types.ts';

export interface CarrierTables {
  /** In-phase waveform per sample. */
  inPhase: Float64Array;
  /** Quadrature waveform per sample. */
  quadrature: Float64Array;
}

/** Carrier tables for n samples at sampleRate, sample k at time k/sampleRate. */
export function carrierTables(carrier: CarrierSpec, n: number, sampleRate: number): CarrierTables {
  const inPhase = new Float64Array(n);
  const quadrature = new Float64Array(n);
  if (carrier.shape === 'none') {
    inPhase.fill(1);
    return { inPhase, quadrature };
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
  return { inPhase, quadrature };
}

/** The waveform of one state: gain·(Re(L)·c − Im(L)·s), written into out. */
export function stateWaveform(tables: CarrierTables, re: number, im: number, gain: number, out: Float64Array): Float64Array {
  const { inPhase, quadrature } = tables;
  for (let k = 0; k < out.length; k++) out[k] = gain * (re * inPhase[k]! - im * quadrature[k]!);
  return out;
}
