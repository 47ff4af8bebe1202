/**
 * Stopping a run cleanly when asked (SIGINT, SIGTERM, or any AbortSignal): the run checks the
 * signal between batches, throws `RunInterrupted`, and the writers' error paths remove their
 * temporary files, so the folder keeps run.json `complete: false` and only complete files.
 */
import type { BatchExecutor } from './executor.ts';

/** Exit codes of a process stopped by a signal, by shell convention 128 + signal number. */
export const SIGNAL_EXIT_CODES: Readonly<Record<string, number>> = { SIGINT: 130, SIGTERM: 143, SIGHUP: 129 };

/** A run stopped on request before it finished. `exitCode` follows the 128 + signal rule. */
export class RunInterrupted extends Error {
  /** Name of the signal ("SIGINT"), or "abort" for a programmatic abort. */
  readonly signal: string;
  readonly exitCode: number;

  constructor(signal: string, detail = '') {
    super(`interrupted by ${signal}${detail ? `; ${detail}` : ''}`);
    this.name = 'RunInterrupted';
    this.signal = signal;
    this.exitCode = SIGNAL_EXIT_CODES[signal] ?? 130;
  }
}

/** The signal name carried by an aborted AbortSignal (its reason), or "abort". */
export function abortSignalName(signal: AbortSignal): string {
  const reason: unknown = signal.reason;
  if (reason instanceof RunInterrupted) return reason.signal;
  return typeof reason === 'string' && reason.startsWith('SIG') ? reason : 'abort';
}

/** Lets pending signal handlers and I/O run (a macrotask turn), then throws if aborted. */
export async function checkpoint(signal: AbortSignal | undefined): Promise<void> {
  if (!signal) return;
  await new Promise<void>((resolve) => setImmediate(resolve));
  if (signal.aborted) throw new RunInterrupted(abortSignalName(signal));
}

/** Shots of tallied batches (exact engine, fused path) between two event-loop turns: ~10 ms of work. */
const TALLIED_SHOTS_PER_TURN = 2 ** 18;

/**
 * An executor that passes through `inner`'s batches and stops at the next batch boundary once
 * `signal` is aborted. It yields to the event loop after every per-shot batch and after every
 * TALLIED_SHOTS_PER_TURN shots of tallied ones (a turn costs as much as thousands of
 * exact-engine shots), so a signal handler gets to run soon even while the in-process engine
 * keeps the thread busy. (Counted in shots, not timed: nothing here may read a clock.)
 */
export function interruptibleExecutor(inner: BatchExecutor, signal: AbortSignal): BatchExecutor {
  return {
    async *run(points, tasks) {
      await checkpoint(signal);
      let tallied = 0;
      for await (const batch of inner.run(points, tasks)) {
        if ('kind' in batch) tallied += batch.count;
        if (!('kind' in batch) || tallied >= TALLIED_SHOTS_PER_TURN) {
          await checkpoint(signal);
          tallied = 0;
        } else if (signal.aborted) {
          throw new RunInterrupted(abortSignalName(signal));
        }
        yield batch;
      }
    },
    close: inner.close ? () => inner.close!() : undefined,
  };
}
