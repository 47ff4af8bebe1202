/**
 * run.json: what a run folder holds and whether the run finished. Written with
 * `complete: false` before the first table and rewritten with `complete: true` after the last,
 * so a folder from an interrupted run says so (merge and report refuse it).
 */
import { join } from 'node:path';
import { InputError } from '../errors.ts';
import { writeFileAtomic } from './atomic-file.ts';
import { readJsonFile } from './json-file.ts';
import { TOOL_VERSION } from './metadata.ts';

export interface Manifest {
  tool: 'singleshot';
  version: string;
  complete: boolean;
  seed: number;
  engine: string;
  /** Why that engine ran (plan/engine.ts). */
  engineReason?: string;
  /** "K/N", 1-based. */
  shard: string;
  files: string[];
  scenario: string;
  /** For a merged run: the shard folders it was merged from, in shard order. */
  mergedFrom?: string[];
}

export const MANIFEST = 'run.json';

export function writeManifest(dir: string, m: Omit<Manifest, 'tool' | 'version'>): void {
  const full: Manifest = { tool: 'singleshot', version: TOOL_VERSION, ...m };
  writeFileAtomic(join(dir, MANIFEST), JSON.stringify(full, null, 2) + '\n');
}

/** Reads run.json of a folder; refuses a missing, malformed or incomplete one. */
export function readManifest(dir: string, requireComplete = true): Manifest {
  const path = join(dir, MANIFEST);
  const m = readJsonFile(path, 'not found: this folder does not hold a singleshot run') as Manifest;
  if (m.tool !== 'singleshot' || typeof m.complete !== 'boolean') throw new InputError(path, 'tool', '"singleshot" run manifest', JSON.stringify(m.tool));
  if (requireComplete && !m.complete) throw new InputError(path, 'complete', 'a finished run', 'complete: false (the run was interrupted)');
  return m;
}
