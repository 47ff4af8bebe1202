/** Types and helpers shared by benchmark cases. */

export interface BenchResult {
  /** Items per second (samples or shots, as `unit` says). */
  rate: number;
  detail?: string;
}

export interface BenchCase {
  name: string;
  unit: 'samples/s' | 'shots/s' | 'MB';
  /** Name of the numpy baseline the rate is compared with (a bench/*.py script), if any. */
  baseline?: 'numpy-trace' | 'numpy-exact';
  /** Which baseline figure to compare with. */
  baselineField?: 'samples_per_s' | 'shots_per_s';
  run(): Promise<BenchResult>;
}

/** Runs `work` repeatedly for about `seconds` after a warm-up; returns items per second. */
export async function measureRate(work: () => number | Promise<number>, seconds = 3, warmup = 1): Promise<number> {
  let t0 = performance.now();
  while (performance.now() - t0 < warmup * 1000) await work();
  let items = 0;
  t0 = performance.now();
  while (performance.now() - t0 < seconds * 1000) items += await work();
  return items / ((performance.now() - t0) / 1000);
}
