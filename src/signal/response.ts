/**
 * First-order analog response on the level path: the state level L(t) (piecewise constant,
 * complex) passes a single-pole low-pass dy/dt = (L − y)/τ before the carrier; a resonator that
 * rings up after a drive step, or a sensor behind an RC, has this shape. For a piecewise-constant
 * input the solution is exact in closed form: within a segment of constant level L,
 * y(t) = L + (y(t_s) − L)·e^(−(t − t_s)/τ), so only the deviation d = y − L is carried, multiplied
 * by a = e^(−1/(fs·τ)) from sample to sample, and rebased at each jump (d ← d + L_old − L_new).
 * The output sample is Re(y·e^(iθ_k))·gain = wave_state[k] + gain·(Re d·c_k − Im d·s_k).
 * Start: `settled` (y(0) = L(0), the level has been there for long) or `zero` (y(0) = 0, a ring-up).
 * Amplitude-domain relation: |H(f)|² = 1/(1 + (2πfτ)²), bandwidth (−3 dB) f_c = 1/(2πτ).
 * On baseband I and Q (carrier.ts) the tables are channel-major and each channel is written in
 * turn: the response of the complex level is the response of its real and imaginary parts.
 */
import type { PathBuffer } from '../physics/chain.ts';

/** |H(f)|² of the first-order response with time constant τ. */
export function responsePowerGain(timeConstant: number, f: number): number {
  const x = 2 * Math.PI * f * timeConstant;
  return 1 / (1 + x * x);
}

/** What the responded writer needs, precomputed once per point. */
export interface ResponseTables {
  /** Time constant τ, s. */
  timeConstant: number;
  /** y(0) = 0 (ring-up) instead of the initial level. */
  fromZero: boolean;
  /** Channels of the record; the tables hold channels × samples entries, channel-major. */
  channels: number;
  /** gain·c_k and gain·s_k: the carrier's in-phase and quadrature tables times the gain. */
  inPhase: Float64Array;
  quadrature: Float64Array;
  /** State levels (before gain). */
  levelRe: Float64Array;
  levelIm: Float64Array;
  /** Below this |d| the deviation is dropped and the rest of a segment copied from the waveform. */
  negligible: number;
}

/**
 * Writes the noise-free responded signal of a shot into out[lo … hi): `waves[s]` is state s's
 * unresponded waveform (gain·Re(L_s·e^(iθ_k))); sample k at time k/fs takes the level path's
 * response at that instant (jumps at the path's times, as in trace.ts writeSignal). `offset` is
 * the channel's first entry in out, the waves and the tables (0 for I, samples for Q).
 */
export function writeRespondedSignal(
  out: Float64Array, lo: number, hi: number, waves: readonly Float64Array[], t: ResponseTables,
  start: number, path: PathBuffer, sampleRate: number, offset = 0,
): void {
  const tau = t.timeConstant;
  const a = Math.exp(-1 / (sampleRate * tau));
  const cI = t.inPhase, cQ = t.quadrature;
  let state = start;
  // deviation at time tRef
  let dRe = t.fromZero ? -t.levelRe[start]! : 0;
  let dIm = t.fromZero ? -t.levelIm[start]! : 0;
  let tRef = 0;
  let k = lo;
  for (let j = 0; j <= path.jumps; j++) {
    const until = j < path.jumps ? Math.min(hi, Math.max(lo, Math.ceil(path.times[j]! * sampleRate))) : hi;
    if (until > k) {
      const wave = waves[state]!;
      const f = Math.exp(-(k / sampleRate - tRef) / tau);
      let re = dRe * f, im = dIm * f;
      for (; k < until; k++) {
        if (Math.abs(re) + Math.abs(im) < t.negligible) {
          for (; k < until; k++) out[offset + k] = wave[offset + k]!;
          break;
        }
        out[offset + k] = wave[offset + k]! + re * cI[offset + k]! - im * cQ[offset + k]!;
        re *= a;
        im *= a;
      }
    }
    if (j < path.jumps) {
      const tj = path.times[j]!;
      const f = Math.exp(-(tj - tRef) / tau);
      const next = path.entered[j]!;
      dRe = dRe * f + t.levelRe[state]! - t.levelRe[next]!;
      dIm = dIm * f + t.levelIm[state]! - t.levelIm[next]!;
      tRef = tj;
      state = next;
    }
  }
}

/**
 * The no-jump responded waveform of one state (for the budget's means): gain·Re(y(t_k)·e^(iθ_k))
 * with y(t) = L·(1 − e^(−t/τ)) from zero, or L when settled, channel by channel. Writes into out
 * and returns it.
 */
export function respondedWaveform(wave: Float64Array, t: ResponseTables, state: number, sampleRate: number, out: Float64Array): Float64Array {
  if (!t.fromZero) {
    out.set(wave);
    return out;
  }
  const a = Math.exp(-1 / (sampleRate * t.timeConstant));
  const samples = out.length / t.channels;
  for (let at = 0; at < out.length; at += samples) {
    let re = -t.levelRe[state]!, im = -t.levelIm[state]!;
    for (let k = at; k < at + samples; k++) {
      out[k] = wave[k]! + re * t.inPhase[k]! - im * t.quadrature[k]!;
      re *= a;
      im *= a;
    }
  }
  return out;
}
