/**
 * Processing pipelines on the core workload (bench/workload.ts), scored batches, 1 core:
 * a Butterworth + decimation + calibrated (here: fixed exponential) weights pipeline, which the
 * engine folds into one kernel, and the likelihood classifier, which needs every shot's
 * decimated record (demodulate, filter, decimate per record, plan/process.ts) plus the
 * hidden-Markov recursion at scoring. The plain workload runs alternately in the same loop, so
 * the ratios are measured under the same conditions.
 */
import { benchWorkload } from '../workload.ts';
import { interleavedTraceRates, type BenchCase } from '../harness.ts';
import type { PipelineSpec, Scenario } from '../../src/scenario/types.ts';

const base = { referencePhase: 0, threshold: { method: 'midpoint' as const, value: 0 } };

/** The workload with one pipeline replaced. */
function withPipeline(p: PipelineSpec): Scenario {
  return { ...benchWorkload(), pipelines: [p] };
}

export const cases: BenchCase[] = [{
  name: 'trace engine, Butterworth+matched kernel and likelihood bins, 1 core',
  unit: 'samples/s',
  baseline: 'numpy-trace',
  baselineField: 'samples_per_s',
  async run() {
    const bins = 100;
    const weights = Array.from({ length: bins }, (_, b) => Math.exp(-b * 0.2e-6 / 200e-6));
    const scenarios = [
      benchWorkload(),
      { scenario: withPipeline({ name: 'matched', ...base, filter: { kind: 'butterworth', order: 4, cutoff: 2e6 }, decimate: 20, weights: 'matched' }), weights: [Float64Array.from(weights)] },
      withPipeline({ name: 'hmm', ...base, classifier: 'likelihood', decimate: 20 }),
    ];
    const [plain, matched, hmm] = interleavedTraceRates(scenarios);
    return {
      rate: matched!,
      detail: `Butterworth+matched kernel ${(matched! / plain!).toFixed(2)}×, likelihood bins ${(hmm! / plain!).toFixed(2)}× the plain boxcar rate (${(plain! / 1e6).toFixed(1)} M samples/s) measured alongside`,
    };
  },
}];
