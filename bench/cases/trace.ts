/** The trace engine on one core: every sample synthesised, demodulated and integrated. */
import { compilePoint } from '../../src/engine/compile-point.ts';
import { makeScratch, simulateBatch } from '../../src/engine/trace/batch.ts';
import { benchWorkload } from '../workload.ts';
import { measureRate, type BenchCase } from '../harness.ts';

export const cases: BenchCase[] = [{
  name: 'trace engine, 1 core',
  unit: 'samples/s',
  baseline: 'numpy-trace',
  baselineField: 'samples_per_s',
  async run() {
    const scenario = benchWorkload();
    const point = compilePoint(scenario);
    const scratch = makeScratch(point);
    const samples = point.grid.samples;
    let batch = 0;
    const rate = await measureRate(() => {
      simulateBatch(point, 0, 'score', batch++ % 1000, scenario.batchSize, scratch);
      return scenario.batchSize * samples;
    }, 4, 2);
    return { rate, detail: `${samples} samples per shot` };
  },
}];
