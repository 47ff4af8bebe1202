/**
 * What a run will cost before it starts: memory, disk and time, from the scenario alone (pure:
 * no clock, no file system). The resource guard (io/resource-guard.ts) compares the estimate
 * with what the machine has free. The numbers are deliberately on the high side: a refused run
 * can be forced, a run that dies of memory exhaustion half-way helps nobody.
 */
import { recordChannels } from '../signal/carrier.ts';
import { makeGrid } from '../signal/grid.ts';
import type { Scenario } from '../scenario/types.ts';
import { sourcesByKind } from '../signal/noise/registry.ts';

/**
 * Conservative throughput of the trace engine on one core, in record samples per second
 * (synthesis, noise and one pipeline's dot products). Measured at 45–65 M/s on a loaded
 * 2-core development machine for the demo scenario; about half of that is used so that slower
 * machines and heavier pipelines are not under-estimated. A constant, not a measurement, so
 * the estimate is the same on every run.
 */
export const CONSERVATIVE_SAMPLES_PER_SECOND = 25e6;
/**
 * Conservative cost of one shot in the exact-statistic engine (history, joint Gaussian,
 * scoring and tallies; no samples), in seconds: a few times the 30–50 ns measured on the same
 * loaded machine, so that many pipelines and slower machines are not under-estimated.
 */
export const EXACT_SECONDS_PER_SHOT = 2e-7;
/** Conservative extra cost of each pipeline output (I or Q) per exact-engine shot, in seconds. */
export const EXACT_SECONDS_PER_OUTPUT = 2e-8;
/** Conservative cost of one hidden-state jump (exponential draw, table walk), in seconds. */
export const SECONDS_PER_JUMP = 2e-7;
/**
 * Fixed costs, in CPU seconds (measured on the loaded 2-core machine, rounded up): a run (the
 * scenario, the output folder, the tables and their checksums) and each point (compiling its
 * tables, calibrating, its analytic budget and noise prediction, finishing its summary). They
 * dominate small runs, which are estimated honestly only with them.
 */
export const RUN_SECONDS = 0.05;
export const POINT_SECONDS = 0.006;
/** Memory of the process itself (Node, modules, tables of the engine), bytes. */
export const BASE_PROCESS_BYTES = 160 * 2 ** 20;
/** Extra memory of each worker thread (its own heap and modules), bytes. */
export const WORKER_BYTES = 80 * 2 ** 20;
/**
 * Bytes of one shots.arrow row: point 4, shot 4, pipeline 1, five state columns 5, first jump
 * 8 (+ validity bit), I, Q and projected value 24, outcome 1, correct 1 bit, cause 1.
 */
export const SHOT_ROW_BYTES = 48.25;
/** Per record batch overhead of an Arrow IPC file (message header, buffer padding), bytes. */
export const ARROW_BATCH_OVERHEAD_BYTES = 1024;
/** Size allowance of summary.arrow + budget.arrow + run.json per sweep point, bytes. */
export const SMALL_TABLES_BYTES_PER_POINT = 64 * 1024;
/**
 * Size allowance of report.html: its plots (SVG) and tables, a few hundred kilobytes for the
 * demo sweep, plus its table of every point. Counted so that a full disk is found before the run.
 */
export const REPORT_BYTES = 4 * 2 ** 20;
export const REPORT_BYTES_PER_POINT = 4 * 1024;

/** Kept raw or processed records (traces.arrow), when asked for. */
export interface TraceEstimate {
  /** Shots whose records are kept (per point). */
  shots: number;
  /** Values kept per shot (samples, or samples × 2 for I and Q). */
  valuesPerShot: number;
  /** Bytes per value (4 for Float32). */
  bytesPerValue: number;
}

/** The traces.arrow part of the estimate: every scored shot's record as Float32 (I and Q for baseband). */
export function keptTracesEstimate(s: Scenario, kind: 'raw' | 'baseband'): TraceEstimate {
  const samples = makeGrid(s.timing).samples;
  return { shots: s.shots, valuesPerShot: kind === 'raw' ? recordChannels(s.signal.carrier) * samples : 2 * samples, bytesPerValue: 4 };
}

export interface EstimateOptions {
  /** Whether shots.arrow is written (default true). */
  shotsTable?: boolean;
  /** Threads running batches at once (default 1: in-process). */
  workers?: number;
  /** Whether those threads are worker threads even when there is one (default: only when more than one). */
  pool?: boolean;
  /** Only part K of N of every point's scored shots. */
  shard?: { index: number; count: number };
  /** Kept traces, if any. */
  traces?: TraceEstimate;
  /** Throughput to assume per worker (default CONSERVATIVE_SAMPLES_PER_SECOND; trace engine). */
  samplesPerSecond?: number;
  /** The engine that will run (default 'traces'): the exact engine costs per shot, not per sample. */
  engine?: 'exact' | 'traces';
  /** Whether report.html is written (default false). */
  report?: boolean;
}

/** The estimate, with the parts that make it up (for the message). */
export interface RunEstimate {
  memoryBytes: number;
  diskBytes: number;
  seconds: number;
  /** Samples synthesised in total (calibration + scored, every point). */
  samples: number;
  /** The part of `seconds` that does not grow with the shots (RUN_SECONDS, POINT_SECONDS per point). */
  fixedSeconds: number;
  /** Named parts of the memory estimate, bytes. */
  memory: Record<string, number>;
  /** Named parts of the disk estimate, bytes. */
  disk: Record<string, number>;
}

/** Scored shots of a point that this shard runs (whole batches, as batches.ts divides them). */
function shardShots(s: Scenario, shard?: { index: number; count: number }): number {
  if (!shard) return s.shots;
  const batches = Math.ceil(s.shots / s.batchSize);
  const first = Math.floor((shard.index * batches) / shard.count);
  const end = Math.floor(((shard.index + 1) * batches) / shard.count);
  return Math.max(0, Math.min(s.shots, end * s.batchSize) - first * s.batchSize);
}

/** Bytes of one shot in a ShotBatch plus its scored columns (all pipelines). */
function shotBytes(pipelines: number): number {
  // intended, prepared, initial, atWindowStart, atWindowEnd, jumpCause (1 each), firstJump 8,
  // per pipeline I and Q (16), projected 8, outcome 1, cause 1, Arrow copies ~20
  return 14 + pipelines * (16 + 10 + 20);
}

/** Expected jumps of the hidden state in one record, bounded by the fastest exit rate. */
function jumpsPerRecord(s: Scenario): number {
  const exit = new Float64Array(s.states.length);
  for (const t of s.transitions) exit[t.from]! += t.rate;
  return Math.max(0, ...exit) * s.timing.recordLength;
}

/** Estimates memory, disk and time of running `scenarios` (one per sweep point). */
export function estimateRun(scenarios: readonly Scenario[], o: EstimateOptions = {}): RunEstimate {
  const workers = Math.max(1, o.workers ?? 1);
  const rate = o.samplesPerSecond ?? CONSERVATIVE_SAMPLES_PER_SECOND;
  const memory: Record<string, number> = { process: BASE_PROCESS_BYTES, workers: workers > 1 || o.pool ? workers * WORKER_BYTES : 0 };
  const disk: Record<string, number> = {};
  let compiled = 0, calibration = 0, batches = 0, rows = 0, arrowBatches = 0, samples = 0, seconds = 0;
  for (const s of scenarios) {
    // entries of a record: samples × channels (two for baseband I and Q)
    const n = makeGrid(s.timing).samples * recordChannels(s.signal.carrier);
    const p = s.pipelines.length;
    // waveforms (one per state), kernels (I and Q per pipeline), record scratch, carrier and
    // reference tables while compiling, and the record kernel's own copy of the waveforms,
    // kernels and record (plan/record-kernel.ts): kept by the run and by each executor
    const perCompile = 8 * n * (s.states.length + 2 * p + 1 + 4) + 8 * n * (s.states.length + 2 * p + 1);
    compiled += perCompile * (1 + workers);
    // every calibration shot is held until the threshold is set: batch columns + projected copies
    calibration += s.calibrationShots * (shotBytes(p) + p * 24);
    // batches in flight: one per worker plus one being written
    batches = Math.max(batches, (workers + 1) * s.batchSize * shotBytes(p));
    const scored = shardShots(s, o.shard);
    rows += scored * p;
    arrowBatches += Math.ceil(scored / s.batchSize) * p;
    const shots = scored + s.calibrationShots;
    samples += shots * n;
    const jumps = shots * jumpsPerRecord(s) * SECONDS_PER_JUMP;
    // noise timelines (1/f) are synthesised in both engines (the exact engine only skips the records)
    for (const { kind, specs } of sourcesByKind(s.signal.sources)) seconds += shots * n * kind.secondsPerSample(specs);
    if (o.engine === 'exact') {
      // no record is synthesised: a fixed cost per shot and output (I and Q of each pipeline)
      seconds += shots * (EXACT_SECONDS_PER_SHOT + 2 * p * EXACT_SECONDS_PER_OUTPUT) + jumps;
    } else {
      const sampleCost = 1 + 0.5 * p;
      seconds += (shots * n * sampleCost) / rate + jumps;
    }
  }
  memory.compiled = compiled;
  memory.calibration = calibration;
  memory.batches = batches;
  if (o.traces) memory.traces = (workers + 1) * Math.min(o.traces.shots, scenarios[0]?.batchSize ?? 0) * o.traces.valuesPerShot * o.traces.bytesPerValue;
  if (o.shotsTable ?? true) disk.shots = rows * SHOT_ROW_BYTES + arrowBatches * ARROW_BATCH_OVERHEAD_BYTES;
  if (o.traces) disk.traces = scenarios.length * o.traces.shots * o.traces.valuesPerShot * o.traces.bytesPerValue;
  disk.tables = scenarios.length * SMALL_TABLES_BYTES_PER_POINT;
  if (o.report) disk.report = REPORT_BYTES + scenarios.length * REPORT_BYTES_PER_POINT;
  const sum = (r: Record<string, number>) => Object.values(r).reduce((a, b) => a + b, 0);
  const fixedSeconds = RUN_SECONDS + scenarios.length * POINT_SECONDS;
  return { memoryBytes: sum(memory), diskBytes: sum(disk), seconds: seconds / workers + fixedSeconds, fixedSeconds, samples, memory, disk };
}

/** "1.5 GiB", "820 MiB", "12 kiB", "300 B". */
export function formatBytes(bytes: number): string {
  const units = ['B', 'kiB', 'MiB', 'GiB', 'TiB', 'PiB', 'EiB'];
  let v = bytes;
  let i = 0;
  while (Math.abs(v) >= 1024 && i < units.length - 1) {
    v /= 1024;
    i++;
  }
  return `${i === 0 ? Math.round(v) : Number(v.toPrecision(3))} ${units[i]}`;
}

/** "45 s", "12 min", "3.2 h", "4.1 days", "2e+06 years". */
export function formatDuration(seconds: number): string {
  if (seconds < 90) return `${Number(seconds.toPrecision(2))} s`;
  if (seconds < 5400) return `${Number((seconds / 60).toPrecision(2))} min`;
  if (seconds < 172800) return `${Number((seconds / 3600).toPrecision(2))} h`;
  if (seconds < 3.15e8) return `${Number((seconds / 86400).toPrecision(2))} days`;
  return `${(seconds / 3.15576e7).toPrecision(2)} years`;
}

/** The biggest parts of an estimate, e.g. "calibration 1.2 GiB, compiled 300 MiB". */
export function describeParts(parts: Record<string, number>, count = 3): string {
  return Object.entries(parts)
    .filter(([, v]) => v > 0)
    .sort((a, b) => b[1] - a[1])
    .slice(0, count)
    .map(([k, v]) => `${k} ${formatBytes(v)}`)
    .join(', ');
}
