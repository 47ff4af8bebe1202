/**
 * tallies.json: what `merge` needs from each shard to rebuild the unsharded result exactly —
 * per point, the scored batch range, the calibrations, each pipeline's pending tally-tree nodes
 * (integer counts and clean-shot moments, analysis/tally-tree.ts) and the paired counts.
 *
 * Numbers must survive bit for bit (io/plain-data.ts).
 */
import { join } from 'node:path';
import { InputError } from '../errors.ts';
import type { PairTally } from '../analysis/compare.ts';
import type { TallyNode } from '../analysis/tally-tree.ts';
import type { PipelineCalibration } from '../classify/calibrate.ts';
import type { PointResult } from '../run/point-result.ts';
import { writeFileAtomic } from '../io/atomic-file.ts';
import { parseJsonText, readJsonFile } from '../io/json-file.ts';
import { verifiedFile, type Manifest } from '../io/manifest.ts';
import { checkTallies } from './tallies-check.ts';
import { TOOL_VERSION } from '../io/metadata.ts';
import { decodeData, encodeData } from '../io/plain-data.ts';

export const TALLIES = 'tallies.json';
/** Layout version of tallies.json. */
export const TALLIES_FORMAT = 2;

/** One point's part of a shard's tallies. */
export interface PointTallies {
  index: number;
  /** Scored batches [first, end) this run covered. */
  batches: [number, number];
  calibrations: PipelineCalibration[];
  /** Per pipeline: the pending tally-tree nodes. */
  stacks: TallyNode[][];
  pairs: PairTally[];
  /** Any other per-point count a run accumulates (summed by merge), e.g. clipped samples. */
  counts: Record<string, number>;
}

/** The tallies of a run or shard. */
export interface RunTallies {
  tool: 'singleshot';
  format: number;
  version: string;
  seed: number;
  engine: string;
  scenario: string;
  points: PointTallies[];
}

/** Per-point counts that a run adds up and a merge must add up too. */
export const SUMMED_POINT_COUNTS = ['clippedSamples'] as const;

/** The tallies of finished points (batch ranges from the shard plan). */
export function runTallies(
  points: readonly PointResult[], batches: readonly [number, number][], info: { seed: number; engine: string; scenario: string },
): RunTallies {
  return {
    tool: 'singleshot', format: TALLIES_FORMAT, version: TOOL_VERSION, ...info,
    points: points.map((p, i) => ({
      index: p.index, batches: batches[i]!, calibrations: p.calibrations, stacks: p.tallyStacks, pairs: p.pairs,
      counts: Object.fromEntries(SUMMED_POINT_COUNTS.flatMap((k) => {
        const v = (p as unknown as Record<string, unknown>)[k];
        return typeof v === 'number' ? [[k, v]] : [];
      })),
    })),
  };
}

/** The text of tallies.json (deterministic for the same tallies). */
export function talliesText(t: RunTallies): string {
  return JSON.stringify(encodeData(t)) + '\n';
}

export function writeTallies(dir: string, t: RunTallies): void {
  writeFileAtomic(join(dir, TALLIES), talliesText(t));
}

/**
 * Reads a folder's tallies.json, its bytes checked against run.json's checksum when `manifest` is
 * given; refuses a missing, foreign or malformed one (tallies-check.ts) with one line.
 */
export function readTallies(dir: string, manifest?: Manifest): RunTallies {
  const path = join(dir, TALLIES);
  const raw = manifest
    ? parseJsonText(verifiedFile(dir, manifest, TALLIES).toString('utf8'), path)
    : readJsonFile(path, 'not found: this run kept no tallies (it was made by an older singleshot?), so it cannot be merged');
  const head = raw as Partial<RunTallies> | null;
  if (head === null || typeof head !== 'object' || head.tool !== 'singleshot' || head.format !== TALLIES_FORMAT) {
    throw new InputError(path, 'format', `singleshot tallies format ${TALLIES_FORMAT}`, JSON.stringify(head?.format ?? null));
  }
  let t: unknown;
  try {
    t = decodeData(raw);
  } catch {
    throw new InputError(path, '', 'tallies whose tagged numbers and arrays read back', 'an unknown tag');
  }
  checkTallies(path, t, SUMMED_POINT_COUNTS);
  return t as RunTallies;
}
