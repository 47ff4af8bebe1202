/**
 * Random telegraph noise (`signal.noise.telegraph`): two-level fluctuators (charge traps), each
 * adding 0 or its amplitude, switching up at rateUp and down at rateDown (Machlup, J. Appl.
 * Phys. 25, 341 (1954)). All fluctuators of a point share one timeline across the shots
 * (telegraph-timeline.ts), random access by seeding block. Not Gaussian: the histograms get
 * wings, and the exact engine does not take it.
 *
 * Variance of Σ_k x_k·n(t_k): a²·π(1 − π)·Σ_k Σ_k' x_k x_k' e^(−λ|t_k − t_k'|), π = up/λ,
 * λ = up + down; one-sided spectrum 4a²·π(1 − π)·λ/(λ² + (2πf)²) (Machlup 1954).
 * Steps are not smoothed by the analog response (fluctuators switch far more slowly than any
 * bandwidth of interest). On baseband I and Q an amplifier-side fluctuator is one per channel
 * (signal/injection.ts): the second channel's come from a second timeline on the second lanes of
 * the same streams.
 */
import type { NoiseInjection, NoiseSourceSpec } from '../../scenario/types.ts';
import { SEED_BLOCK } from '../../random/streams.ts';
import { exponentialQuadraticForm } from '../filter-function.ts';
import { stationaryOccupation } from '../telegraph.ts';
import { makeTelegraphRecord, makeTelegraphTimeline, type Fluctuator } from '../telegraph-timeline.ts';
import type { CompiledNoiseKind, KindedValue, NoiseSourceKind } from './contract.ts';
import type { Realisation } from '../injection.ts';
import { TELEGRAPH_BLOCKS, telegraphStreamIndex } from './stream-layout.ts';

/** A fluctuator as the scenario holds it. */
export interface TelegraphSourceSpec extends NoiseSourceSpec {
  kind: 'telegraph';
  /** Signal unit, or J of detuning when `inDetuning`. */
  amplitude: number;
  /** 0→1 and 1→0 rates, 1/s. */
  rateUp: number;
  rateDown: number;
}

/** Most fluctuators per point. */
export const MAX_FLUCTUATORS = 16;
/**
 * Most expected switches of one fluctuator in one record: each is simulated (an exponential
 * wait), like a transition of the hidden state, so this caps the work per record as the
 * transitions' limit does (scenario/limits.ts).
 */
export const MAX_SWITCHES_PER_RECORD = 1e6;

const positive = { min: 0, minExclusive: true } as const;

export const telegraphKind: NoiseSourceKind<TelegraphSourceSpec> = {
  kind: 'telegraph',
  config: {
    fields: {
      name: { type: 'name', optional: true, description: 'Name in the noise budget (default telegraph, telegraph2, …)' },
      amplitude: { type: 'kinded', dimension: 'signalOrEnergy', description: 'Level added in the upper state' },
      rateUp: { type: 'quantity', dimension: 'rate', range: { min: 0 }, optional: true, description: 'Rate of lower → upper switches' },
      rateDown: { type: 'quantity', dimension: 'rate', range: { min: 0 }, optional: true, description: 'Rate of upper → lower switches' },
      dwellLow: { type: 'quantity', dimension: 'time', range: positive, optional: true, description: 'Mean time in the lower state (1/rateUp)' },
      dwellHigh: { type: 'quantity', dimension: 'time', range: positive, optional: true, description: 'Mean time in the upper state (1/rateDown)' },
      injection: {
        type: 'choice', words: ['sensor', 'amplifier'],
        description: 'sensor: moves the operating point (modulated by the carrier like the signal); amplifier: added after the modulation',
      },
    },
    expected: 'a fluctuator {amplitude, rates, injection} or a list of them',
    description: 'Random telegraph noise: one two-level fluctuator or a list',
    maxEntries: MAX_FLUCTUATORS,
    plural: 'fluctuators',
  },

  resolve(entry, p, i, c) {
    const t = entry as {
      name?: string; amplitude: KindedValue; rateUp?: number; rateDown?: number; dwellLow?: number; dwellHigh?: number; injection: NoiseInjection;
    };
    const inDetuning = c.signalOrDetuning(t.amplitude, [...p, 'amplitude']);
    const rate = (r: number | undefined, dwell: number | undefined, rk: string, dk: string): number => {
      if ((r === undefined) === (dwell === undefined)) c.fail(p, `either ${rk} or ${dk}`, r === undefined ? 'neither' : 'both');
      return r ?? 1 / dwell!;
    };
    const rateUp = rate(t.rateUp, t.dwellLow, 'rateUp', 'dwellLow'), rateDown = rate(t.rateDown, t.dwellHigh, 'rateDown', 'dwellHigh');
    // every switch inside a record is simulated: cap them like the transitions' jumps
    const switches = (rateUp + rateDown) * c.timing.recordLength;
    if (!(switches <= MAX_SWITCHES_PER_RECORD)) {
      const key = rateUp >= rateDown ? (t.rateUp === undefined ? 'dwellLow' : 'rateUp') : (t.rateDown === undefined ? 'dwellHigh' : 'rateDown');
      c.fail([...p, key], `rates giving at most ${MAX_SWITCHES_PER_RECORD} expected switches per record (${c.format(c.timing.recordLength, 's')})`);
    }
    // the timeline reaches TELEGRAPH_BLOCKS seeding blocks of shots
    if (c.shots > TELEGRAPH_BLOCKS * SEED_BLOCK - 2 * SEED_BLOCK) {
      c.fail(['shots'], `at most ${TELEGRAPH_BLOCKS * SEED_BLOCK - 2 * SEED_BLOCK} shots (and calibration shots) per point with telegraph noise`, String(c.shots));
    }
    return {
      kind: 'telegraph', name: c.uniqueName(t.name, 'telegraph', i, [...p, 'name']), amplitude: t.amplitude.value,
      rateUp, rateDown, injection: t.injection, inDetuning,
    };
  },

  // the exact current step I(ε0 + δ) − I(ε0)
  fromDetuning: (spec, sensor) => ({ ...spec, amplitude: sensor.step(spec.amplitude), inDetuning: false }),

  exactBlocker: 'telegraph noise is not Gaussian',

  // a few switches per record: negligible next to the record's own work
  secondsPerSample: () => 0,

  compile(specs, point) {
    const fluctuators: Fluctuator[] = specs.map((t) => ({ amplitude: t.amplitude, rateUp: t.rateUp, rateDown: t.rateDown }));
    const injections: NoiseInjection[] = specs.map((t) => t.injection);
    const { timing } = point;
    const sampleRate = point.grid.sampleRate;
    const n = point.grid.samples;
    const kind: CompiledNoiseKind = {
      sources: specs.map((t) => ({
        name: t.name, kind: 'telegraph', injection: t.injection, density: t.amplitude, densityUnit: '{unit}',
        origin: `two-level fluctuator, up ${t.rateUp}/s, down ${t.rateDown}/s`,
      })),
      linear: false,
      variance(s, x, lo, hi, fs) {
        const f = fluctuators[s]!;
        const p = stationaryOccupation(f.rateUp, f.rateDown);
        const rho = Math.exp(-(f.rateUp + f.rateDown) / fs);
        return f.amplitude * f.amplitude * p * (1 - p) * exponentialQuadraticForm(x, lo, hi, rho);
      },
      twoLevel(s, x, lo, hi) {
        const f = fluctuators[s]!;
        let seen = 0;
        for (let k = lo; k < hi; k++) seen += x[k]!;
        return { probability: stationaryOccupation(f.rateUp, f.rateDown), step: f.amplitude * seen, switchingRate: f.rateUp + f.rateDown };
      },
      spectrum(s, frequency) {
        const f = fluctuators[s]!;
        const lambda = f.rateUp + f.rateDown;
        if (!(lambda > 0)) return 0;
        const p = stationaryOccupation(f.rateUp, f.rateDown);
        const w = 2 * Math.PI * frequency;
        return (4 * f.amplitude * f.amplitude * p * (1 - p) * lambda) / (lambda * lambda + w * w);
      },
      withKernels: () => kind,
      runtime(purpose, stream) {
        // one timeline per lane a realisation draws from (the second: the second channel's amplifier-side fluctuators)
        const lanes = Math.max(...injections.map((inj) => Math.max(...point.realisations[inj].map((r) => r.lane)))) + 1;
        const timelines = Array.from({ length: lanes }, (_, lane) => makeTelegraphTimeline(
          fluctuators, { period: timing.shotPeriod, recordLength: timing.recordLength, shotsPerBlock: SEED_BLOCK },
          (block) => stream(telegraphStreamIndex(purpose, block), lane),
        ));
        const records = timelines.map(() => makeTelegraphRecord(fluctuators.length));
        // per lane, per fluctuator: the realisation that lane carries (null: its switches there are skipped)
        const carriedBy: (Realisation | null)[][] = records.map((_, lane) => injections.map((inj) => point.realisations[inj].find((r) => r.lane === lane) ?? null));
        return {
          shot(shot) {
            for (let lane = 0; lane < lanes; lane++) timelines[lane]!.record(shot, records[lane]!);
          },
          addToRecord(record, lo, hi) {
            for (let lane = 0; lane < lanes; lane++) {
              const r = records[lane]!;
              let e = 0;
              for (let fi = 0; fi < fluctuators.length; fi++) {
                const realisation = carriedBy[lane]![fi]!;
                const a = fluctuators[fi]!.amplitude;
                let state = r.start[fi]!;
                let k = lo;
                for (;;) {
                  const switching = e < r.count && r.which[e] === fi;
                  const until = switching ? Math.min(hi, Math.max(lo, Math.ceil(r.times[e]! * sampleRate))) : hi;
                  if (realisation && state === 1 && until > k) {
                    const w = realisation.weight;
                    for (const c of realisation.channels) {
                      const at = c * n;
                      for (let q = at + k; q < at + until; q++) record[q] += a * w[q]!;
                    }
                  }
                  if (until > k) k = until;
                  if (!switching) break;
                  state = 1 - state;
                  e++;
                }
              }
            }
          },
        };
      },
    };
    return kind;
  },
};
