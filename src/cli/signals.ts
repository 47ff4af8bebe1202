/**
 * SIGINT and SIGTERM during a long command: the first signal aborts the command's AbortSignal
 * (the run stops at the next batch, removes its temporary files and leaves run.json
 * `complete: false`); a second one exits at once after removing the temporary files.
 */
import { abortOpenFiles } from '../io/atomic-file.ts';
import { RunInterrupted, SIGNAL_EXIT_CODES } from '../run/interrupt.ts';

const HANDLED = ['SIGINT', 'SIGTERM'] as const;

/**
 * Runs `job` with an AbortSignal that SIGINT/SIGTERM abort; the handlers are removed when the
 * job settles. An interrupted job rejects with RunInterrupted (exit code 130 or 143).
 */
export async function withInterruptSignals<T>(job: (signal: AbortSignal) => Promise<T>): Promise<T> {
  const controller = new AbortController();
  const handlers = new Map<string, () => void>();
  for (const name of HANDLED) {
    const handler = () => {
      if (controller.signal.aborted) {
        // second signal: stop now; only whole files or none are left behind
        abortOpenFiles();
        process.stderr.write(`singleshot: ${name} again, stopping at once\n`);
        process.exit(SIGNAL_EXIT_CODES[name] ?? 130);
      }
      controller.abort(new RunInterrupted(name));
    };
    handlers.set(name, handler);
    process.on(name, handler);
  }
  try {
    return await job(controller.signal);
  } finally {
    for (const [name, handler] of handlers) process.off(name, handler);
  }
}
