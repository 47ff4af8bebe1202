/**
 * Stopping a run cleanly when asked (SIGINT, SIGTERM, or any AbortSignal): the run checks the
 * signal between batches, throws `RunInterrupted`, and the writers' error paths remove their
 * temporary files, so the folder keeps run.json `complete: false` and only complete files.
 */
import type { BatchExecutor } from '../plan/run.ts';

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

/** How long the in-process engine may keep the thread between two event-loop turns. */
const YIELD_EVERY_MS = 20;

/**
 * An executor that passes through `inner`'s batches and stops at the next batch boundary once
 * `signal` is aborted. It yields to the event loop every YIELD_EVERY_MS (not every batch: a turn
 * costs as much as thousands of exact-engine shots), so a signal handler gets to run within
 * that time even while the in-process engine keeps the thread busy.
 */
export function interruptibleExecutor(inner: BatchExecutor, signal: AbortSignal): BatchExecutor {
  return {
    async *run(points, tasks) {
      await checkpoint(signal);
      let last = performance.now();
      for await (const batch of inner.run(points, tasks)) {
        const now = performance.now();
        if (now - last >= YIELD_EVERY_MS) {
          await checkpoint(signal);
          last = performance.now();
        } else if (signal.aborted) {
          throw new RunInterrupted(abortSignalName(signal));
        }
        yield batch;
      }
    },
    close: inner.close ? () => inner.close!() : undefined,
  };
}
