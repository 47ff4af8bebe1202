/**
 * Worker threads for the simulation (`--workers N`): a `BatchExecutor` that hands batch tasks
 * out in order to N threads, keeps a bounded number of batches in flight, and yields the results
 * in task order. Every batch draws only from its own seeding blocks' streams, so the results
 * are identical to one thread's, whatever N.
 *
 * Each worker starts from a small JavaScript snippet that imports the worker module: the built
 * pool-worker.js, or, when this module runs from its TypeScript source (tests, benchmarks), the
 * source pool-worker.ts after registering tsx (`tsx/esm/api`, a development dependency), since
 * workers do not inherit the main thread's loader. Results come back with their typed arrays
 * transferred, not copied.
 */
import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { InputError, ScenarioProblem } from '../errors.ts';
import { usableCores } from './cores.ts';
import type { ShotBatch } from '../engine/trace/batch.ts';
import type { BatchTask, TaskList } from './batches.ts';
import type { TalliedBatch } from '../engine/exact/fused.ts';
import type { BatchExecutor } from './executor.ts';
import type { PointPlan } from '../engine/point-plan.ts';

/** The default number of workers: every physical core the process may use (run/cores.ts). */
export function defaultWorkers(): number {
  return usableCores();
}

/** Messages from the main thread to a worker. */
export type ToWorker =
  | { type: 'points'; run: number; plans: readonly PointPlan[] }
  | { type: 'task'; run: number; seq: number; task: BatchTask };

/** An error as it crosses threads. */
export interface WireError {
  name: string;
  message: string;
  stack?: string;
  file?: string;
  path?: string;
  /** A ScenarioProblem's fields. */
  problem?: { path: (string | number)[]; expected: string; found?: string; point: number | null };
}

/** Messages from a worker to the main thread. */
export type FromWorker =
  | { type: 'result'; run: number; seq: number; batch: ShotBatch | TalliedBatch }
  | { type: 'error'; run: number; seq: number; error: WireError }
  | { type: 'boot-error'; error: WireError };

/** The boot snippet: CommonJS, evaluated by the worker; registers tsx when the module is TypeScript. */
const BOOT = `
const { workerData, parentPort } = require('node:worker_threads');
(async () => {
  if (workerData.tsx) (await import(workerData.tsx)).register();
  await import(workerData.module);
})().catch((e) => parentPort.postMessage({ type: 'boot-error', error: { name: e && e.name || 'Error', message: String(e && e.message || e), stack: e && e.stack } }));
`;

/** URL of tsx's ESM register API (import.meta.resolve where the runtime has it, else via require's resolution). */
function tsxApi(): string {
  const resolve = (import.meta as { resolve?: (s: string) => string }).resolve;
  if (typeof resolve === 'function') {
    try {
      return resolve('tsx/esm/api');
    } catch {
      // fall through
    }
  }
  return pathToFileURL(createRequire(import.meta.url).resolve('tsx/esm/api').replace(/\.cjs$/, '.mjs')).href;
}

/** The worker module: dist/pool-worker.js beside the built chunks, or pool-worker.ts beside this source (tests, benchmarks). */
function workerModule(): { module: string; tsx: string | null } {
  const fromSources = import.meta.url.endsWith('.ts');
  const module = new URL(fromSources ? './pool-worker.ts' : './pool-worker.js', import.meta.url).href;
  return { module, tsx: fromSources ? tsxApi() : null };
}

/** Rebuilds an error that crossed from a worker (an InputError stays one, for the CLI's exit code 2). */
export function reviveError(w: WireError): Error {
  if (w.name === 'ScenarioProblem' && w.problem) {
    const p = new ScenarioProblem(w.problem.path, w.problem.expected, w.problem.found);
    p.point = w.problem.point;
    return p;
  }
  const e = w.name === 'InputError' ? new InputError(w.file ?? '', w.path ?? '', 'x') : new Error(w.message);
  e.message = w.message;
  if (w.name !== 'InputError') e.name = w.name;
  if (w.stack) e.stack = w.stack;
  return e;
}

/** Every distinct ArrayBuffer under a value (typed arrays found through objects and arrays). */
export function transferables(value: unknown, out: Set<ArrayBuffer> = new Set()): ArrayBuffer[] {
  if (ArrayBuffer.isView(value)) {
    if (value.buffer instanceof ArrayBuffer) out.add(value.buffer);
  } else if (Array.isArray(value)) {
    for (const v of value) transferables(v, out);
  } else if (value !== null && typeof value === 'object') {
    for (const v of Object.values(value)) transferables(v, out);
  }
  return [...out];
}

interface Pending {
  resolve: (b: ShotBatch | TalliedBatch) => void;
  reject: (e: Error) => void;
}

/** Options of the pool. */
export interface PoolOptions {
  /** Batches in flight per worker (default 2: one running, one queued). */
  perWorker?: number;
}

/** A pool of `workers` threads implementing BatchExecutor; `close()` ends the threads. */
export function workerPoolExecutor(workers: number, options: PoolOptions = {}): BatchExecutor & { close(): Promise<void> } {
  if (!Number.isInteger(workers) || workers < 1) throw new RangeError(`workers must be a whole number ≥ 1, found ${workers}`);
  const perWorker = options.perWorker ?? 2;
  let threads: { worker: Worker; busy: number; dead: Error | null }[] | null = null;
  let runId = 0;
  const waiting = new Map<number, Pending>();
  let broken: Error | null = null;

  const failAll = (e: Error) => {
    broken ??= e;
    for (const p of waiting.values()) p.reject(e);
    waiting.clear();
  };

  const start = () => {
    if (threads) return threads;
    const { module, tsx } = workerModule();
    threads = Array.from({ length: workers }, () => {
      // the same small nursery as bin/singleshot.js gives the main thread (flat memory)
      const worker = new Worker(BOOT, { eval: true, workerData: { module, tsx }, resourceLimits: { maxYoungGenerationSizeMb: 6 } });
      const t = { worker, busy: 0, dead: null as Error | null };
      worker.on('message', (m: FromWorker) => {
        if (m.type === 'boot-error') return failAll(reviveError(m.error));
        if (m.run !== runId) return; // a result of an abandoned run
        t.busy--;
        const p = waiting.get(m.seq);
        if (!p) return;
        waiting.delete(m.seq);
        if (m.type === 'result') p.resolve(m.batch);
        else p.reject(reviveError(m.error));
      });
      worker.on('error', (e) => { t.dead = e; failAll(e); });
      worker.on('exit', (code) => {
        if (!t.dead) t.dead = new Error(`simulation worker stopped (exit code ${code})`);
        if (threads) failAll(t.dead);
      });
      return t;
    });
    return threads;
  };

  return {
    async *run(points: readonly PointPlan[], tasks: TaskList): AsyncGenerator<ShotBatch | TalliedBatch> {
      if (tasks.length === 0) return;
      if (broken) throw broken;
      const pool = start();
      const run = ++runId;
      for (const t of pool) {
        t.busy = 0;
        t.worker.postMessage({ type: 'points', run, plans: points } satisfies ToWorker);
      }
      const results = new Map<number, Promise<ShotBatch | TalliedBatch>>();
      let next = 0;
      const limit = workers * perWorker;
      const dispatch = () => {
        while (next < tasks.length && results.size < limit) {
          // the least busy thread; ties go to the first
          let best = pool[0]!;
          for (const t of pool) if (t.busy < best.busy) best = t;
          const seq = next++;
          const promise = new Promise<ShotBatch | TalliedBatch>((resolve, reject) => waiting.set(seq, { resolve, reject }));
          promise.catch(() => {}); // rejections are rethrown when the result is awaited
          results.set(seq, promise);
          best.busy++;
          best.worker.postMessage({ type: 'task', run, seq, task: tasks.at(seq)! } satisfies ToWorker);
        }
      };
      try {
        for (let seq = 0; seq < tasks.length; seq++) {
          dispatch();
          const batch = await results.get(seq)!;
          results.delete(seq);
          yield batch;
        }
      } finally {
        // an abandoned run: its late results are dropped by run id
        for (const seq of results.keys()) waiting.delete(seq);
        if (runId === run) runId++;
      }
    },
    async close() {
      const t = threads;
      threads = null;
      if (!t) return;
      await Promise.all(t.map((x) => x.worker.terminate()));
    },
  };
}
