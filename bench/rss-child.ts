/**
 * Child process of the peak-memory benchmark (bench/cases/scale.ts): one `run` of the benchmark
 * workload without shots.arrow and without kept traces, then its peak resident set size.
 * Usage: node bin/run-ts.js bench/rss-child.ts SCENARIO OUT ENGINE SHOTS WORKERS
 * Prints one JSON line: { maxRssMB, shots, seconds, engine }.
 */
import { runToDirectory } from '../src/app/run-to-directory.ts';

const [scenarioPath, outDir, engine, shots, workers] = process.argv.slice(2);
const t0 = performance.now();
const { result } = await runToDirectory({
  scenarioPath: scenarioPath!, outDir: outDir!, force: true, shotsTable: false, report: false,
  engine: engine as 'exact' | 'traces', shots: Number(shots), workers: Number(workers ?? 1),
});
const seconds = (performance.now() - t0) / 1000;
// resourceUsage().maxRSS is in kilobytes (getrusage ru_maxrss)
console.log(JSON.stringify({ maxRssMB: process.resourceUsage().maxRSS / 1024, shots: result.points[0]!.summaries[0]!.shots, seconds, engine: result.engine }));
