/**
 * 1/f^α noise (`signal.noise.flicker`): one-sided S(f) = A/f^α on [low, high], written as its
 * amplitude density at a reference frequency, S(at) = density², so A = density²·at^α.
 *
 * Generation: every source runs on a multi-rate timeline spanning the shots (Timmer & König,
 * Astron. Astrophys. 300, 707 (1995), per band; flicker-timeline.ts), so slow drift correlates
 * successive shots. All sources of a point share one base grid, step shotPeriod/m0 (m0 integer,
 * rate ≥ 8·f_high): every shot sees the same interpolation weights, and its base samples are
 * i·m0 + j. Sample k of a record is linearly interpolated between base samples ⌊p_k⌋ and
 * ⌊p_k⌋ + 1, p_k = k·m0/(shotPeriod·fs). Sensor-side 1/f passes the analog response too: it is
 * generated with the response's power gain folded into its spectrum (a stationary Gaussian
 * process through a linear filter is the process with spectrum S·|H|², so this is exact in
 * distribution).
 *
 * Linear path: a value's 1/f part is Σ_j G_j·w_j, w the shot's window of the timeline and G the
 * pipeline's kernel carried onto it through the interpolation (carryKernel), the same linear map
 * as adding the noise to the record and integrating — the exact engine uses it, and the trace
 * engine too whenever the record itself is not needed.
 *
 * Variance: Σ over bands of gᵀ·R̄·g with g the functional carried onto each band's grid
 * (flickerFunctionalVariance): the interpolation's spectral effect is in it exactly, as is the
 * analog response for sensor-side noise.
 */
import type { NoiseInjection, NoiseSourceSpec } from '../../scenario/types.ts';
import { SEED_BLOCK } from '../../random/streams.ts';
import {
  BASE_OVERSAMPLING, flickerFunctionalVariance, makeFlickerTimeline, planFlickerTimeline, type FlickerBand,
} from '../flicker-timeline.ts';
import { responsePowerGain } from '../response.ts';
import type { CompiledNoiseKind, KernelPair, KindedValue, NoiseSourceKind } from './contract.ts';
import { seenThrough, type Realisation } from '../injection.ts';
import { flickerStreamIndex, MAX_FLICKER_SOURCES } from './stream-layout.ts';

/** A 1/f source as the scenario holds it. */
export interface FlickerSourceSpec extends NoiseSourceSpec {
  kind: 'flicker';
  /** A: signal unit²/Hz at 1 Hz, or J²/Hz at 1 Hz when `inDetuning`. */
  amplitude: number;
  exponent: number;
  /** Band edges, Hz. */
  low: number;
  high: number;
}

/**
 * Conservative cost of a 1/f source per record sample of every shot, in seconds, in either
 * engine (the run estimate): its timeline is synthesised at about the record's rate (FFT blocks,
 * band interpolation). Measured at ~170 ns per sample for one source on the loaded 2-core machine.
 */
export const FLICKER_SECONDS_PER_SAMPLE = 2.5e-7;

const positive = { min: 0, minExclusive: true } as const;
const INJECTIONS = ['sensor', 'amplifier'] as const;

/** The point's 1/f tables: the shared base grid and the interpolation onto the record. */
export interface FlickerGrid {
  /** Base samples per shot period, m0; the base rate is m0/shotPeriod. */
  step: number;
  baseRate: number;
  /** Base sample (from the shot start) of the first window entry, and the window length. */
  offset: number;
  width: number;
  /** Per record sample k: the window entry below it, and its interpolation fraction. */
  index: Int32Array;
  fraction: Float64Array;
  /**
   * Shots the timelines reach (the scored and calibration shots, and a block more); the shot index
   * is taken modulo this, so shots beyond the scenario's (examples, report views) wrap around.
   */
  capacity: number;
}

/**
 * Carries a record-grid functional x (on [lo, hi)) onto the base-sample window through the
 * interpolation: G[j] += x[k]·(1 − u_k) at j = index[k], G[j + 1] += x[k]·u_k. Σ_k x[k]·n(t_k)
 * of the interpolated noise n then equals Σ_j G[j]·w[j] of its window values w.
 */
export function carryKernel(f: Pick<FlickerGrid, 'index' | 'fraction' | 'width'>, x: Float64Array, lo: number, hi: number): Float64Array {
  const g = new Float64Array(f.width + 1);
  for (let k = lo; k < hi; k++) {
    const j = f.index[k]!;
    g[j] += x[k]! * (1 - f.fraction[k]!);
    g[j + 1] += x[k]! * f.fraction[k]!;
  }
  return g;
}

/** A pipeline's I and Q kernels carried onto the window (Q null at baseband). */
type CarriedPair = { inPhase: Float64Array; quadrature: Float64Array | null };

/**
 * One realisation of an injection point's 1/f noise (signal/injection.ts): the sum of that
 * injection's sources on their timelines of the realisation's lane, entering the record with the
 * realisation's weights.
 */
interface Entry {
  realisation: Realisation;
  /** The sources that enter through it. */
  sources: number[];
  /** Per record entry: the realisation's weight times the interpolation weights 1 − u_k and u_k. */
  below: Float64Array;
  above: Float64Array;
}

/** record[at + k] += w[j]·below[at + k] + w[j + 1]·above[at + k], j = index[k]: the window interpolated onto channel `at / samples` of the record. */
function addInterpolatedNoise(
  record: Float64Array, at: number, lo: number, hi: number, w: Float64Array, index: Int32Array, below: Float64Array, above: Float64Array,
): void {
  for (let k = lo; k < hi; k++) {
    const j = index[k]!;
    record[at + k] += w[j]! * below[at + k]! + w[j + 1]! * above[at + k]!;
  }
}

export const flickerKind: NoiseSourceKind<FlickerSourceSpec> = {
  kind: 'flicker',
  config: {
    fields: {
      name: { type: 'name', optional: true, description: 'Name in the noise budget (default flicker, flicker2, …)' },
      density: { type: 'kinded', dimension: 'densityOrEnergyDensity', range: { min: 0 }, description: 'Amplitude density √S at the reference frequency' },
      at: { type: 'quantity', dimension: 'frequency', range: positive, optional: true, description: 'Reference frequency of the density (default 1 Hz)' },
      exponent: { type: 'number', range: { min: 0, minExclusive: true, max: 3 }, optional: true, description: 'α in S ∝ 1/f^α (default 1)' },
      low: { type: 'quantity', dimension: 'frequency', range: positive, description: 'Lower band edge (below it S = 0)' },
      high: { type: 'quantity', dimension: 'frequency', range: positive, description: 'Upper band edge (above it S = 0)' },
      injection: { type: 'choice', words: INJECTIONS, description: 'sensor: moves the operating point (modulated by the carrier like the signal); amplifier: added after the modulation' },
    },
    expected: 'a 1/f source {density, low, high, injection, …} or a list of them',
    description: '1/f noise: one source or a list',
    maxEntries: MAX_FLICKER_SOURCES,
    plural: '1/f sources',
  },

  resolve(entry, p, i, c) {
    const f = entry as { name?: string; density: KindedValue; at?: number; exponent?: number; low: number; high: number; injection: NoiseInjection };
    const fs = c.timing.sampleRate;
    const inDetuning = c.signalOrDetuning(f.density, [...p, 'density']);
    if (!(f.high > f.low)) c.fail([...p, 'high'], `a frequency above low (${c.format(f.low, 'Hz')})`);
    if (f.high > fs / 2) c.fail([...p, 'high'], `a frequency at most half the sample rate (${c.format(fs / 2, 'Hz')})`);
    const exponent = f.exponent ?? 1;
    const reference = f.at ?? 1;
    const amplitude = f.density.value * f.density.value * reference ** exponent;
    const period = c.timing.shotPeriod;
    const step = Math.max(1, Math.ceil(BASE_OVERSAMPLING * f.high * period));
    try {
      planFlickerTimeline({ amplitude, exponent, fLo: f.low, fHi: f.high, baseRate: step / period, span: (c.shots + 1) * step });
    } catch (e) {
      if (!(e instanceof RangeError)) throw e;
      c.fail([...p, 'low'], `a band the 1/f generator can cover (${e.message.replace(/^flicker: /, '')})`);
    }
    if (f.high > fs / 16) {
      c.warn([...p, 'high'], `1/f up to ${c.format(f.high, 'Hz')} is generated at ${BASE_OVERSAMPLING}× that rate, above the sample rate / 2: slow`);
    }
    return {
      kind: 'flicker', name: c.uniqueName(f.name, 'flicker', i, [...p, 'name']), amplitude, exponent, low: f.low, high: f.high,
      injection: f.injection, inDetuning,
    };
  },

  // linear response: (dI/dε)²·A_ε
  fromDetuning: (spec, sensor) => ({ ...spec, amplitude: spec.amplitude * sensor.slope * sensor.slope, inDetuning: false }),

  exactBlocker: null,

  secondsPerSample: (specs) => specs.length * FLICKER_SECONDS_PER_SAMPLE,

  compile(specs, point) {
    const { timing, grid, synthLo, synthHi } = point;
    const period = timing.shotPeriod;
    const fs = grid.sampleRate;
    const highest = Math.max(...specs.map((s) => s.high));
    const step = Math.max(1, Math.ceil(BASE_OVERSAMPLING * highest * period * (1 - 1e-12)));
    const baseRate = step / period;
    const position = (k: number) => (k * step) / (period * fs);
    const offset = Math.floor(position(synthLo));
    const width = Math.floor(position(synthHi - 1)) + 2 - offset;
    // sized for the scored and calibration shots; auxiliary shots (examples, report views) wrap around
    const capacity = Math.max(point.shots, point.calibrationShots) + SEED_BLOCK;
    const span = (capacity + 1) * step + offset + width;
    const tc = point.responseTimeConstant;
    const bands: FlickerBand[][] = specs.map((s) => {
      const weight = s.injection === 'sensor' && tc !== null ? (f: number) => responsePowerGain(tc, f) : undefined;
      return planFlickerTimeline({ amplitude: s.amplitude, exponent: s.exponent, fLo: s.low, fHi: s.high, baseRate, span, ...(weight ? { weight } : {}) });
    });
    const n = grid.samples;
    const index = new Int32Array(n);
    const fraction = new Float64Array(n);
    for (let k = synthLo; k < synthHi; k++) {
      const p = position(k);
      const j = Math.floor(p);
      index[k] = j - offset;
      fraction[k] = p - j;
    }
    const tables: FlickerGrid = { step, baseRate, offset, width, index, fraction, capacity };
    const entries: Entry[] = INJECTIONS.flatMap((injection) => {
      const sources = specs.flatMap((s, i) => (s.injection === injection ? [i] : []));
      if (sources.length === 0) return [];
      return point.realisations[injection].map((realisation) => {
        const below = new Float64Array(realisation.weight.length), above = new Float64Array(realisation.weight.length);
        for (const c of realisation.channels) {
          const at = c * n, w = realisation.weight;
          for (let k = synthLo; k < synthHi; k++) {
            below[at + k] = w[at + k]! * (1 - fraction[k]!);
            above[at + k] = w[at + k]! * fraction[k]!;
          }
        }
        return { realisation, sources, below, above };
      });
    });
    // per entry, per pipeline: the kernels each realisation sees, carried onto the window
    const carry = (kernels: readonly KernelPair[]): CarriedPair[][] => entries.map(({ realisation: r }) => kernels.map((k) => ({
      inPhase: carryKernel(tables, seenThrough(r, k.inPhase, k.lo, k.hi, n), k.lo, k.hi),
      quadrature: k.quadrature ? carryKernel(tables, seenThrough(r, k.quadrature, k.lo, k.hi, n), k.lo, k.hi) : null,
    })));

    const compiled = (carried: CarriedPair[][]): CompiledNoiseKind => ({
      sources: specs.map((s) => ({
        name: s.name, kind: 'flicker', injection: s.injection, density: Math.sqrt(s.amplitude), densityUnit: '{unit}/√Hz at 1 Hz', origin: `1/f^${s.exponent} on [${s.low}, ${s.high}] Hz`,
      })),
      linear: true,
      variance: (s, x, lo, hi) => flickerFunctionalVariance(bands[s]!, carryKernel(tables, x, lo, hi), step, offset).total,
      spectrum(s, f) {
        const spec = specs[s]!;
        if (!(f >= spec.low && f <= spec.high)) return 0;
        const response = spec.injection === 'sensor' && tc !== null ? responsePowerGain(tc, f) : 1;
        return (spec.amplitude / f ** spec.exponent) * response;
      },
      withKernels: (kernels) => compiled(carry(kernels)),
      runtime(purpose, stream) {
        // per entry, the timeline of each of its sources on the entry's lane (a source enters one injection point, so no two entries share one)
        const read = entries.map((e) => e.sources.map((source) => makeFlickerTimeline(
          bands[source]!, (band, pair) => stream(flickerStreamIndex(purpose, source, band, pair), e.realisation.lane),
        )));
        const windows = entries.map(() => new Float64Array(width + 1));
        return {
          shot(shot) {
            // shots beyond the planned ones (auxiliary shots, benchmarks) wrap around the timeline
            const J0 = (shot % capacity) * step + offset;
            for (let i = 0; i < entries.length; i++) {
              const w = windows[i]!;
              w.fill(0);
              for (const t of read[i]!) t.addRange(w, 0, J0, width);
            }
          },
          addToRecord(record, lo, hi) {
            entries.forEach((e, i) => {
              for (const c of e.realisation.channels) addInterpolatedNoise(record, c * n, lo, hi, windows[i]!, index, e.below, e.above);
            });
          },
          value(p, quadrature) {
            let v = 0;
            for (let i = 0; i < entries.length; i++) {
              const c = carried[i]![p]!;
              const g = quadrature ? c.quadrature : c.inPhase;
              if (!g) continue;
              const w = windows[i]!;
              let s0 = 0, s1 = 0;
              let j = 0;
              for (; j + 1 < g.length; j += 2) {
                s0 += g[j]! * w[j]!;
                s1 += g[j + 1]! * w[j + 1]!;
              }
              if (j < g.length) s0 += g[j]! * w[j]!;
              v += s0 + s1;
            }
            return v;
          },
        };
      },
    });
    return compiled(carry(point.kernels));
  },
};
