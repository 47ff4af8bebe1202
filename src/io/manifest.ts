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

/** What an analysis of recorded traces ran on: the pipeline file (canonical JSON), the records and the labels. */
export interface AnalysisProvenance {
  pipeline: string;
  records: string;
  labels: string | null;
}

/** run.json of an `analyze` folder: no seed and no scenario, the analysis's inputs instead. */
export interface AnalysisManifest {
  tool: 'singleshot';
  version: string;
  kind: 'analysis';
  complete: boolean;
  engine: 'analyze';
  shard: '1/1';
  files: string[];
  analysis: AnalysisProvenance;
}

export function writeAnalysisManifest(dir: string, m: Omit<AnalysisManifest, 'tool' | 'version' | 'kind' | 'engine' | 'shard'>): void {
  const full: AnalysisManifest = { tool: 'singleshot', version: TOOL_VERSION, kind: 'analysis', engine: 'analyze', shard: '1/1', ...m };
  writeFileAtomic(join(dir, MANIFEST), JSON.stringify(full, null, 2) + '\n');
}

export function writeManifest(dir: string, m: Omit<Manifest, 'tool' | 'version'>): void {
  const full: Manifest = { tool: 'singleshot', version: TOOL_VERSION, ...m };
  writeFileAtomic(join(dir, MANIFEST), JSON.stringify(full, null, 2) + '\n');
}

/** Reads run.json of a folder, a run's or an analysis's; refuses a missing, malformed or incomplete one. */
export function readAnyManifest(dir: string, requireComplete = true): Manifest | AnalysisManifest {
  const path = join(dir, MANIFEST);
  const m = readJsonFile(path, 'not found: this folder does not hold a singleshot run') as Manifest | AnalysisManifest;
  if (m === null || typeof m !== 'object' || m.tool !== 'singleshot' || typeof m.complete !== 'boolean') {
    throw new InputError(path, 'tool', '"singleshot" run manifest', JSON.stringify((m as { tool?: unknown } | null)?.tool));
  }
  if (requireComplete && !m.complete) throw new InputError(path, 'complete', 'a finished run', 'complete: false (the run was interrupted)');
  return m;
}

/** Reads run.json of a run folder (not an analysis's). */
export function readManifest(dir: string, requireComplete = true): Manifest {
  const m = readAnyManifest(dir, requireComplete);
  if ('kind' in m && m.kind === 'analysis') {
    throw new InputError(join(dir, MANIFEST), 'kind', 'the folder of a run (this one holds an analysis of recorded traces, which only report reads)', '"analysis"');
  }
  return m as Manifest;
}
