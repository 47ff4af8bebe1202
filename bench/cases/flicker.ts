/**
 * The trace engine with sensor-side 1/f noise on the core workload (bench/workload.ts): charge
 * noise S(f) = A/f on [1 Hz, 1 MHz] at the sensor, modulated by the 1 MHz carrier with the signal,
 * on the continuous timeline across shots. The white-only engine runs alternately in the same
 * loop, so the ratio of the two rates is measured under the same conditions.
 */
import { benchWorkload } from '../workload.ts';
import { interleavedTraceRates, type BenchCase } from '../harness.ts';
import type { NoiseSourceSpec, Scenario } from '../../src/scenario/types.ts';

/** The core workload with sensor-side 1/f noise added. */
export function flickerWorkload(): Scenario {
  const s = benchWorkload();
  return {
    ...s,
    signal: {
      ...s.signal,
      sources: [{ kind: 'flicker', name: 'charge', amplitude: 1e-4, exponent: 1, low: 1, high: 1e6, injection: 'sensor', inDetuning: false } as NoiseSourceSpec],
    },
  };
}

export const cases: BenchCase[] = [{
  name: 'trace engine + sensor-side 1/f, 1 core',
  unit: 'samples/s',
  baseline: 'numpy-trace',
  baselineField: 'samples_per_s',
  async run() {
    const [white, flicker] = interleavedTraceRates([benchWorkload(), flickerWorkload()]);
    return { rate: flicker!, detail: `${(flicker! / white!).toFixed(2)}× the white-only rate (${(white! / 1e6).toFixed(1)} M samples/s) measured alongside; 1/f on [1 Hz, 1 MHz]` };
  },
}];
