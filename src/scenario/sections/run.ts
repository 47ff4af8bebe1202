/**
 * Run section: name, description, seed and shot counts.
 */
import { z } from 'zod';
import { integer, text, type ShapeOutput } from '../fields.ts';
import type { ResolveContext } from '../context.ts';
import { SEED_BLOCK } from '../../random/streams.ts';

/** Default scored shots per point. */
export const DEFAULT_SHOTS = 100_000;
/** Calibration shots default to min(shots, this), and at least 2. */
export const DEFAULT_CALIBRATION_SHOTS = 20_000;
/** Default shots per batch. */
export const DEFAULT_BATCH_SIZE = 4096;
/** Default run seed. */
export const DEFAULT_SEED = 1;

/** Top-level keys of the run section. */
export const runShape = {
  name: text().meta({ description: 'Name of the scenario (shown in reports)' }),
  description: z.string({ error: () => 'a string' }).optional().meta({ description: 'Free text about the device and the run' }),
  seed: integer(0, Number.MAX_SAFE_INTEGER, 'an integer from 0 to 2^53-1').optional().meta({ description: 'Run seed, an integer from 0 to 2^53-1 (default 1)' }),
  shots: integer(1).optional().meta({ description: 'Scored shots per point (default 100000)' }),
  calibrationShots: integer(2)
    .optional()
    .meta({ description: 'Calibration shots per point, never scored (default min(shots, 20000))' }),
  batchSize: integer(SEED_BLOCK, 1_048_576, `a multiple of ${SEED_BLOCK} from ${SEED_BLOCK} to 1048576`)
    .refine((n) => n % SEED_BLOCK === 0, { error: () => `a multiple of ${SEED_BLOCK} from ${SEED_BLOCK} to 1048576` })
    .optional()
    .meta({ description: `Shots per work batch, a multiple of the ${SEED_BLOCK}-shot seeding block (default 4096); results do not depend on it` }),
};

/** Validated run keys. */
export type RunDoc = ShapeOutput<typeof runShape>;

/** The resolved run settings. */
export interface RunSettings {
  name: string;
  description: string;
  seed: number;
  shots: number;
  calibrationShots: number;
  batchSize: number;
}

/** Fills the run defaults. */
export function resolveRun(doc: RunDoc, _ctx: ResolveContext): RunSettings {
  const shots = doc.shots ?? DEFAULT_SHOTS;
  return {
    name: doc.name,
    description: doc.description ?? '',
    seed: doc.seed ?? DEFAULT_SEED,
    shots,
    calibrationShots: doc.calibrationShots ?? Math.max(2, Math.min(shots, DEFAULT_CALIBRATION_SHOTS)),
    batchSize: doc.batchSize ?? DEFAULT_BATCH_SIZE,
  };
}
