/**
 * Exponentially correlated Gaussian noise (`signal.noise.correlated`): an Ornstein–Uhlenbeck
 * process of standard deviation σ and correlation time τc — a slow amplifier, a filtered line, an
 * ensemble of charge fluctuators — with the one-sided Lorentzian spectrum
 * S(f) = 4σ²τc/(1 + (2πfτc)²), written as its σ or as its low-frequency density √S(0) = 2σ√τc
 * (Gillespie, Phys. Rev. E 54, 2084 (1996)).
 *
 * Generation, exact at the samples: x_0 ~ N(0, σ²) (stationary), x_{k+1} = a·x_k + √(1 − a²)·σ·n_k
 * with a = e^(−1/(fs·τc)) (Gillespie 1996), over the synthesised samples of each shot, drawn
 * from the shot's own stream after its white noise: each shot sees a fresh stretch of the
 * process, independent of the other shots (a correlation time beyond the shot period draws a
 * warning: real shots would share it; a 1/f source models drift across shots).
 *
 * Variance of Σ_k x_k·n(t_k): σ²·Σ_k Σ_k' x_k x_k' a^|k−k'|, exact; the exact engine takes its
 * covariance between outputs into the joint Gaussian of the values. The analog response is not
 * applied to it (a warning says so when the correlation time is within 10× the response time).
 */
import type { NoiseInjection, NoiseSourceSpec } from '../../scenario/types.ts';
import { exponentialBilinearForm, exponentialQuadraticForm } from '../filter-function.ts';
import type { CompiledNoiseKind, KindedValue, NoiseSourceKind } from './contract.ts';

/** A correlated source as the scenario holds it. */
export interface CorrelatedSourceSpec extends NoiseSourceSpec {
  kind: 'correlated';
  /** σ of the process: signal unit, or J of detuning when `inDetuning`. */
  sigma: number;
  /** Correlation time τc, s. */
  correlationTime: number;
}

/**
 * Adds weight[at + j]·x_j to record[at + j] for j < m, x the process x_0 = σ·n_0,
 * x_{j+1} = a·x_j + b·n_{j+1} driven by normals[0 … m); with `keep`, x_j replaces n_j in normals.
 */
function addProcess(
  record: Float64Array, at: number, m: number, normals: Float64Array, weight: Float64Array, sigma: number, a: number, b: number, keep: boolean,
): void {
  let x = sigma * normals[0]!;
  record[at] += weight[at]! * x;
  if (keep) {
    normals[0] = x;
    for (let j = 1; j < m; j++) {
      x = a * x + b * normals[j]!;
      normals[j] = x;
      record[at + j] += weight[at + j]! * x;
    }
    return;
  }
  for (let j = 1; j < m; j++) {
    x = a * x + b * normals[j]!;
    record[at + j] += weight[at + j]! * x;
  }
}

/** Most correlated sources per point. */
export const MAX_CORRELATED_SOURCES = 8;

const positive = { min: 0, minExclusive: true } as const;

export const correlatedKind: NoiseSourceKind<CorrelatedSourceSpec> = {
  kind: 'correlated',
  config: {
    fields: {
      name: { type: 'name', optional: true, description: 'Name in the noise budget (default correlated, correlated2, …)' },
      sigma: { type: 'kinded', dimension: 'signalOrEnergy', range: { min: 0 }, optional: true, description: 'Standard deviation of the process' },
      density: {
        type: 'kinded', dimension: 'densityOrEnergyDensity', range: { min: 0 }, optional: true,
        description: 'Amplitude density at low frequency, √S(0) = 2σ√τc (instead of sigma)',
      },
      correlationTime: { type: 'quantity', dimension: 'time', range: positive, description: 'Correlation time τc: the spectrum falls off above 1/(2πτc)' },
      injection: {
        type: 'choice', words: ['sensor', 'amplifier'],
        description: 'sensor: moves the operating point (modulated by the carrier like the signal); amplifier: added after the modulation',
      },
    },
    expected: 'a correlated source {sigma or density, correlationTime, injection} or a list of them',
    description: 'Exponentially correlated Gaussian noise (Lorentzian spectrum): one source or a list',
    maxEntries: MAX_CORRELATED_SOURCES,
    plural: 'correlated sources',
  },

  resolve(entry, p, i, c) {
    const e = entry as { name?: string; sigma?: KindedValue; density?: KindedValue; correlationTime: number; injection: NoiseInjection };
    if ((e.sigma === undefined) === (e.density === undefined)) c.fail(p, 'either sigma or density', e.sigma === undefined ? 'neither' : 'both');
    const tau = e.correlationTime;
    const given = e.sigma ?? e.density!;
    const inDetuning = c.signalOrDetuning(given, [...p, e.sigma ? 'sigma' : 'density']);
    const sigma = e.sigma ? e.sigma.value : e.density!.value / (2 * Math.sqrt(tau));
    const dt = 1 / c.timing.sampleRate;
    if (tau < dt) c.warn([...p, 'correlationTime'], `${c.format(tau, 's')} is shorter than one sample (${c.format(dt, 's')}): the noise is nearly white at this sample rate`);
    if (tau > c.timing.shotPeriod) {
      c.warn([...p, 'correlationTime'], `${c.format(tau, 's')} is longer than the shot period (${c.format(c.timing.shotPeriod, 's')}): each shot draws its own stretch of the process, so the correlation between shots is left out (a 1/f source models drift across shots)`);
    }
    return { kind: 'correlated', name: c.uniqueName(e.name, 'correlated', i, [...p, 'name']), sigma, correlationTime: tau, injection: e.injection, inDetuning };
  },

  // linear response: the current's σ is |dI/dε| times the detuning's
  fromDetuning: (spec, sensor) => ({ ...spec, sigma: spec.sigma * Math.abs(sensor.slope), inDetuning: false }),

  exactBlocker: null,

  // one normal and a multiply-add per sample and source, next to the record's own work
  secondsPerSample: (specs) => specs.length * 1e-8,

  compile(specs, point) {
    const fs = point.grid.sampleRate;
    const tc = point.responseTimeConstant;
    // a = e^(−dt/τc) and √(1 − a²) without cancellation for τc ≫ dt
    const decay = specs.map((s) => Math.exp(-1 / (fs * s.correlationTime)));
    const innovation = specs.map((s) => s.sigma * Math.sqrt(-Math.expm1(-2 / (fs * s.correlationTime))));
    const n = point.grid.samples;
    const realisationsOf = (s: number) => point.realisations[specs[s]!.injection];
    let normals = new Float64Array(0);
    const kind: CompiledNoiseKind = {
      sources: specs.map((s) => ({
        name: s.name, kind: 'correlated', injection: s.injection, density: 2 * s.sigma * Math.sqrt(s.correlationTime),
        densityUnit: '{unit}/√Hz at low frequency', origin: `Lorentzian, σ = ${s.sigma}, τc = ${s.correlationTime} s${tc !== null && s.injection === 'sensor' ? ' (the analog response is not applied to it)' : ''}`,
      })),
      linear: false,
      variance: (s, x, lo, hi) => specs[s]!.sigma ** 2 * exponentialQuadraticForm(x, lo, hi, decay[s]!),
      spectrum(s, f) {
        const { sigma, correlationTime: t } = specs[s]!;
        const w = 2 * Math.PI * f * t;
        return (4 * sigma * sigma * t) / (1 + w * w);
      },
      perShot: {
        covariance: (s, xa, xb, lo, hi) => specs[s]!.sigma ** 2 * exponentialBilinearForm(xa, xb, lo, hi, decay[s]!),
        addShot(record, lo, hi, streams) {
          const m = hi - lo;
          if (normals.length < m) normals = new Float64Array(m);
          for (let s = 0; s < specs.length; s++) {
            for (const r of realisationsOf(s)) {
              streams[r.lane]!.fillNormals(normals, 0, m);
              // the first channel in the same pass as the process; the others from the process kept in `normals`
              const [first, ...rest] = r.channels;
              addProcess(record, first! * n + lo, m, normals, r.weight, specs[s]!.sigma, decay[s]!, innovation[s]!, rest.length > 0);
              for (const c of rest) {
                const at = c * n + lo, w = r.weight;
                for (let j = 0; j < m; j++) record[at + j] += w[at + j]! * normals[j]!;
              }
            }
          }
        },
      },
      withKernels: () => kind,
      runtime: () => ({ shot() {}, addToRecord() {} }),
    };
    return kind;
  },
};
