/**
 * The progress line of runs, on stderr: the phase (setting up, calibrating, simulating), shots
 * done, shots per second and the time left. It appears once a run has taken about a second —
 * also while nothing has been counted yet (compiling points, starting threads), so a long set-up
 * never looks like a hang — and is redrawn a few times a second. The time left is shown once the
 * phase has run long enough to measure its rate, never as a guess of 0 s. Only on a terminal,
 * never with --quiet; stdout is left to the results (and to --json).
 */
import type { RunPhase } from '../run/run-points.ts';

/** A stream the line may draw on (process.stderr, or a test's stand-in). */
export type ProgressStream = NodeJS.WritableStream & { isTTY?: boolean; columns?: number };

/** Where and when the line may draw. */
export interface ProgressOptions {
  /** Where to draw (default process.stderr). */
  stream?: ProgressStream;
  /** No line at all. */
  quiet?: boolean;
  /** Milliseconds a run must have taken before the line appears (default 1000). */
  delay?: number;
  /** Clock in milliseconds (default Date.now). */
  now?: () => number;
  /** Milliseconds between redraws without news (default 250; 0: only on updates and `tick()`). */
  every?: number;
}

/** Receives progress and draws the line when it should. */
export interface Progress {
  /** The `onProgress` callback of runToDirectory (phase: default 'simulating'). */
  update(done: number, total: number, phase?: RunPhase): void;
  /** Redraws (the timer calls it; tests call it by hand). */
  tick(): void;
  /** Removes the line and its timer (call when the run ends, also on error). */
  stop(): void;
  /** Whether the line has been drawn. */
  readonly shown: boolean;
}

/** Default delay before the line appears (ms). */
export const PROGRESS_DELAY = 1000;
/** A phase must have run this long (ms) before its rate gives a time left. */
const RATE_AFTER = 1000;
const BAR_WIDTH = 24;
/** Updates redraw at most this often (ms). */
const REDRAW_MS = 100;

/** "812", "12.3 k", "1.25 M". */
export function formatRate(perSecond: number): string {
  if (!Number.isFinite(perSecond) || perSecond <= 0) return '—';
  if (perSecond >= 1e6) return `${(perSecond / 1e6).toPrecision(3)} M`;
  if (perSecond >= 1e3) return `${(perSecond / 1e3).toPrecision(3)} k`;
  return perSecond.toFixed(0);
}

/**
 * A clock reading for the line, redrawn several times a second: "45 s", "3 min 20 s",
 * "2 h 05 min". Not run/estimate.ts formatDuration, whose two significant figures ("3.3 min")
 * suit a one-off estimate but would make a countdown stand still or jump.
 */
export function formatClock(seconds: number): string {
  const s = Math.max(0, Math.round(seconds));
  if (s < 60) return `${s} s`;
  if (s < 3600) return `${Math.floor(s / 60)} min ${String(s % 60).padStart(2, '0')} s`;
  return `${Math.floor(s / 3600)} h ${String(Math.floor((s % 3600) / 60)).padStart(2, '0')} min`;
}

/** Whether a line may be drawn on this stream at all. */
export function wantsBar(o: ProgressOptions): boolean {
  const stream = o.stream ?? process.stderr;
  return !o.quiet && stream.isTTY === true;
}

const NOTHING: Progress = { update() {}, tick() {}, stop() {}, shown: false };

/** Makes the progress reporter for one run; its clock starts now. */
export function makeProgress(o: ProgressOptions = {}): Progress {
  if (!wantsBar(o)) return NOTHING;
  const stream = o.stream ?? process.stderr;
  const now = o.now ?? Date.now;
  const delay = o.delay ?? PROGRESS_DELAY;
  const started = now();
  let shown = false;
  // the current phase, with where and when it started (its rate and time left are its own)
  let phase: RunPhase | null = null;
  let phaseStart = started;
  let phaseStartDone = 0;
  let done = 0;
  let total = 0;

  const line = (): string => {
    const t = now();
    const seconds = (t - started) / 1000;
    if (phase === null) return `setting up (compiling the points, starting threads) ${formatClock(seconds)}`;
    const fraction = total > 0 ? Math.min(1, done / total) : 0;
    const filled = Math.round(fraction * BAR_WIDTH);
    const bar = '█'.repeat(filled) + '░'.repeat(BAR_WIDTH - filled);
    const inPhase = (t - phaseStart) / 1000;
    const rate = inPhase > 0 ? (done - phaseStartDone) / inPhase : NaN;
    const left = inPhase * 1000 >= RATE_AFTER && rate > 0 ? `${formatClock((total - done) / rate)} left` : 'time left: measuring';
    return `${phase} ${bar} ${Math.floor(100 * fraction)}% | ${done}/${total} shots | ${formatRate(rate)} shots/s | ${left}`;
  };

  let lastDraw = -Infinity;
  const draw = () => {
    const t = now();
    if (t - started < delay) return;
    lastDraw = t;
    const width = Math.max(20, (stream.columns ?? 80) - 1);
    stream.write(`\r${line().slice(0, width)}\x1b[K`);
    shown = true;
  };

  const every = o.every ?? 250;
  const timer = every > 0 ? setInterval(draw, every) : null;
  timer?.unref();

  return {
    get shown() {
      return shown;
    },
    update(newDone: number, newTotal: number, newPhase: RunPhase = 'simulating') {
      const changed = newPhase !== phase;
      if (changed) {
        phase = newPhase;
        phaseStart = now();
        phaseStartDone = newDone;
      }
      done = newDone;
      total = newTotal;
      // updates may come thousands of times a second: redraw at most every REDRAW_MS
      if (changed || now() - lastDraw >= REDRAW_MS) draw();
    },
    tick: draw,
    stop() {
      if (timer) clearInterval(timer);
      if (shown) stream.write('\r\x1b[K');
      shown = false;
    },
  };
}
