/**
 * SIGINT and SIGTERM during a command that writes (run, merge, report, rerun, analyze): the first
 * signal aborts the command's AbortSignal (it stops at its next chance, removes its staging folder
 * and temporary files, releases its folder lock, and leaves the folder as it was); a second one
 * exits at once after doing the same. Either way the exit code is 128 + the signal's number.
 */
import { abortOpenFiles } from '../io/atomic-file.ts';
import { releaseAllLocks } from '../io/folder-lock.ts';
import { discardAllOutputs } from '../io/output-dir.ts';
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
        discardAllOutputs();
        releaseAllLocks();
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
