/**
 * The defaults of every library function, which are the command line's: the CLI passes its
 * parsed options through these functions, and its help text reads its defaults from here. This
 * module imports nothing heavy (the CLI loads it at start-up).
 */
import { DEFAULT_REFINE_POINTS } from '../run/refine.ts';
import { DEFAULT_BOOTSTRAP_SEED, DEFAULT_RESAMPLES } from '../fit/estimate.ts';

/** The engine choices: exact, traces, or auto (exact when the scenario allows it). */
export const ENGINES = ['exact', 'traces', 'auto'] as const;
/** One of ENGINES. */
export type EngineName = (typeof ENGINES)[number];

/** The defaults, one place for the library and the CLI. */
export const DEFAULTS = {
  /** `run`: the engine (`--engine`). */
  engine: 'auto' as EngineName,
  /** `run`, `merge`, `fit`: write the report (`--no-report` turns it off). */
  report: true,
  /** `run`: write shots.arrow (`--no-shots-table` turns it off). */
  shotsTable: true,
  /** `run`: points a refinement adds (`--refine-points`). */
  refinePoints: DEFAULT_REFINE_POINTS,
  /** Every writing command: replace the files of a non-empty output folder (`--force`). */
  force: false,
  /** `run`, `analyze`: also write Parquet copies (`--parquet`). */
  parquet: false,
  /** `fit`: bootstrap resamples (`--resamples`). */
  resamples: DEFAULT_RESAMPLES,
  /** `fit`: seed of the bootstrap (`--seed`). */
  bootstrapSeed: DEFAULT_BOOTSTRAP_SEED,
} as const;
