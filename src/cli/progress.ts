/**
 * The progress bar of long runs, on stderr: shots done, shots per second and time left. It
 * appears only on a terminal, only once a run has taken about a second, and never with
 * --quiet; stdout is left to the results (and to --json).
 */
import cliProgress from 'cli-progress';

/** A stream the bar can draw on (process.stderr, or a test's stand-in). */
export type ProgressStream = NodeJS.WritableStream & { isTTY?: boolean; columns?: number };

/** Where and when the bar may draw. */
export interface ProgressOptions {
  /** Where to draw (default process.stderr). */
  stream?: ProgressStream;
  /** No bar at all. */
  quiet?: boolean;
  /** Milliseconds a run must have taken before the bar appears (default 1000). */
  delay?: number;
  /** Clock in milliseconds (default Date.now). */
  now?: () => number;
}

/** Receives progress and draws the bar when it should. */
export interface Progress {
  /** The `onProgress` callback of runToDirectory. */
  update(done: number, total: number): void;
  /** Removes the bar (call when the run ends, also on error). */
  stop(): void;
  /** Whether the bar has been drawn. */
  readonly shown: boolean;
}

/** Default delay before the bar appears (ms). */
export const PROGRESS_DELAY = 1000;

/** "812", "12.3 k", "1.25 M". */
export function formatRate(perSecond: number): string {
  if (!Number.isFinite(perSecond) || perSecond <= 0) return '—';
  if (perSecond >= 1e6) return `${(perSecond / 1e6).toPrecision(3)} M`;
  if (perSecond >= 1e3) return `${(perSecond / 1e3).toPrecision(3)} k`;
  return perSecond.toFixed(0);
}

/** Whether a bar may be drawn on this stream at all. */
export function wantsBar(o: ProgressOptions): boolean {
  const stream = o.stream ?? process.stderr;
  return !o.quiet && stream.isTTY === true;
}

const NOTHING: Progress = { update() {}, stop() {}, shown: false };

/** Makes the progress reporter for one run. */
export function makeProgress(o: ProgressOptions = {}): Progress {
  if (!wantsBar(o)) return NOTHING;
  const stream = o.stream ?? process.stderr;
  const now = o.now ?? Date.now;
  const delay = o.delay ?? PROGRESS_DELAY;
  const started = now();
  let bar: cliProgress.SingleBar | null = null;
  let total = 0;
  return {
    get shown() {
      return bar !== null;
    },
    update(done: number, newTotal: number) {
      const elapsed = now() - started;
      if (bar === null && elapsed < delay) return;
      const rate = formatRate(elapsed > 0 ? (1000 * done) / elapsed : NaN);
      if (bar === null) {
        bar = new cliProgress.SingleBar({
          stream, format: 'simulating {bar} {percentage}% | {value}/{total} shots | {rate} shots/s | {eta_formatted} left',
          barsize: 24, hideCursor: false, gracefulExit: false, clearOnComplete: true, etaBuffer: 20, fps: 8,
        }, cliProgress.Presets.shades_grey);
        total = newTotal;
        bar.start(newTotal, done, { rate });
        return;
      }
      if (newTotal !== total) {
        total = newTotal;
        bar.setTotal(newTotal);
      }
      bar.update(done, { rate });
    },
    stop() {
      bar?.stop();
    },
  };
}
