/**
 * What every output table carries in its schema metadata: the scenario (canonical JSON), the
 * seed, the tool version, the engine and the shard, so a table alone says how it was made.
 */
import { readFileSync } from 'node:fs';

export const META_PREFIX = 'singleshot.';

/** The package's package.json: two folders up from this source (src/io/), one up from the built chunks (dist/). */
const PACKAGE_JSON = new URL(import.meta.url.endsWith('.ts') ? '../../package.json' : '../package.json', import.meta.url);

/** The tool version from package.json. */
export const TOOL_VERSION: string = (JSON.parse(readFileSync(PACKAGE_JSON, 'utf8')) as { version: string }).version;

export interface RunProvenance {
  /** Canonical JSON of the scenario document as run (overrides applied). */
  scenario: string;
  seed: number;
  engine: string;
  /** Why that engine ran (plan/engine.ts). */
  engineReason?: string;
  /** "K/N" (1-based K) of the shard this run covered. */
  shard: string;
  /** For a run with --refine: JSON {key, points} of the refinement (absent otherwise). */
  refine?: string;
}

/** Schema metadata of a table. */
export function tableMetadata(table: string, p: RunProvenance): Map<string, string> {
  return new Map([
    [`${META_PREFIX}table`, table],
    [`${META_PREFIX}version`, TOOL_VERSION],
    [`${META_PREFIX}seed`, String(p.seed)],
    [`${META_PREFIX}engine`, p.engine],
    ...(p.engineReason ? [[`${META_PREFIX}engine_reason`, p.engineReason] as [string, string]] : []),
    [`${META_PREFIX}shard`, p.shard],
    [`${META_PREFIX}scenario`, p.scenario],
    ...(p.refine ? [[`${META_PREFIX}refine`, p.refine] as [string, string]] : []),
  ]);
}

/** Schema metadata of a table of `analyze`: what it ran on instead of a scenario and a seed. */
export function analysisMetadata(table: string, p: { pipeline: string; records: string; labels: string | null }): Map<string, string> {
  return new Map([
    [`${META_PREFIX}table`, table],
    [`${META_PREFIX}version`, TOOL_VERSION],
    [`${META_PREFIX}engine`, 'analyze'],
    [`${META_PREFIX}shard`, '1/1'],
    [`${META_PREFIX}pipeline_file`, p.pipeline],
    [`${META_PREFIX}records`, p.records],
    ...(p.labels !== null ? [[`${META_PREFIX}labels`, p.labels] as [string, string]] : []),
  ]);
}
