/**
 * run.json: what a run folder holds, how it was made, and the SHA-256 of every file it lists.
 * Written last into the staging folder (io/output-dir.ts), so a published folder always has it
 * complete; `complete: false` is only found in folders of older versions or made by hand.
 *
 * `readManifest` checks its whole structure (every key, its type and range, the file names, one
 * checksum per file) and refuses anything else with one line naming the key;
 * `verifiedFile`/`verifyFile` check a listed file's bytes against its checksum.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { InputError, describeFound } from '../errors.ts';
import { writeFileAtomic } from './atomic-file.ts';
import { sha256, sha256File } from './checksum.ts';
import { readJsonFile } from './json-file.ts';
import { TOOL_VERSION } from './metadata.ts';
import { fileSystemError } from './fs-errors.ts';

/** Layout version of run.json (2: checksums of every file). */
export const MANIFEST_FORMAT = 2;
/** Most shards a run may be split into. */
export const MAX_SHARDS = 1 << 20;

/** Files a run.json may list (run.json and report.html are never listed). */
export const LISTED_FILES: ReadonlySet<string> = new Set(['tallies.json', ...[
  'summary', 'budget', 'comparisons', 'shots', 'traces', 'noise',
].flatMap((t) => [`${t}.arrow`, `${t}.parquet`])]);

export interface Manifest {
  tool: 'singleshot';
  format: number;
  version: string;
  complete: boolean;
  seed: number;
  engine: string;
  /** Why that engine ran (engine/choose.ts). */
  engineReason?: string;
  /** "K/N", 1-based. */
  shard: string;
  files: string[];
  /** Hex SHA-256 of each listed file. */
  sha256: Record<string, string>;
  scenario: string;
  /** For a merged run: the shard folders it was merged from, in shard order. */
  mergedFrom?: string[];
  /** For a run with --refine: the swept key refined (true: the run chose it) and the points added. */
  refine?: { key: string | true; points: number };
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
  format: number;
  version: string;
  kind: 'analysis';
  complete: boolean;
  engine: 'analyze';
  shard: '1/1';
  files: string[];
  sha256: Record<string, string>;
  analysis: AnalysisProvenance;
}

/** Writes the run.json of an analysis into `dir`, with the checksum of every listed file. */
export function writeAnalysisManifest(dir: string, m: Pick<AnalysisManifest, 'complete' | 'files' | 'analysis'>): void {
  const sums = Object.fromEntries(m.files.map((f) => [f, sha256File(join(dir, f))]));
  const full: AnalysisManifest = { tool: 'singleshot', format: MANIFEST_FORMAT, version: TOOL_VERSION, kind: 'analysis', engine: 'analyze', shard: '1/1', ...m, sha256: sums };
  writeFileAtomic(join(dir, MANIFEST), JSON.stringify(full, null, 2) + '\n');
}

/** Writes run.json into `dir`, with the checksum of every listed file (read back from `dir`). */
export function writeManifest(dir: string, m: Omit<Manifest, 'tool' | 'version' | 'format' | 'sha256'>): void {
  const sums = Object.fromEntries(m.files.map((f) => [f, sha256File(join(dir, f))]));
  const full: Manifest = { tool: 'singleshot', format: MANIFEST_FORMAT, version: TOOL_VERSION, ...m, sha256: sums };
  writeFileAtomic(join(dir, MANIFEST), JSON.stringify(full, null, 2) + '\n');
}

/** A "K/N" shard, 1 ≤ K ≤ N ≤ MAX_SHARDS, or null. */
export function parseShardText(text: unknown): { k: number; n: number } | null {
  if (typeof text !== 'string') return null;
  const m = /^(\d{1,7})\/(\d{1,7})$/.exec(text);
  if (!m) return null;
  const k = Number(m[1]), n = Number(m[2]);
  return k >= 1 && n >= 1 && k <= n && n <= MAX_SHARDS ? { k, n } : null;
}

const KEYS = new Set(['tool', 'format', 'version', 'complete', 'seed', 'engine', 'engineReason', 'shard', 'files', 'sha256', 'scenario', 'mergedFrom', 'refine']);
const ANALYSIS_KEYS = new Set(['tool', 'format', 'version', 'kind', 'complete', 'engine', 'shard', 'files', 'sha256', 'analysis']);

type Fail = (key: string, expected: string, found: unknown) => never;

function failer(path: string): Fail {
  return (key, expected, found) => {
    throw new InputError(path, key, expected, typeof found === 'string' && found.startsWith('\u0000') ? found.slice(1) : describeFound(found));
  };
}

/** Whether `text` is JSON of an object. */
function isJsonObject(text: unknown): boolean {
  try {
    const doc: unknown = JSON.parse(text as string);
    return typeof text === 'string' && doc !== null && typeof doc === 'object' && !Array.isArray(doc);
  } catch {
    return false;
  }
}

/** The keys every run.json has: tool, format, version, complete, and the listed files with one checksum each. */
function checkCommon(m: Record<string, unknown>, keys: ReadonlySet<string>, fail: Fail): void {
  if (m.tool !== 'singleshot') fail('tool', '"singleshot"', m.tool);
  if (m.format !== MANIFEST_FORMAT) {
    if (m.format === undefined) fail('format', `run.json format ${MANIFEST_FORMAT} (this folder was made by an earlier singleshot, without checksums: run it again)`, m.format);
    fail('format', `run.json format ${MANIFEST_FORMAT}`, m.format);
  }
  const unknown = Object.keys(m).find((k) => !keys.has(k));
  if (unknown !== undefined) fail(unknown, 'no such key in run.json', m[unknown]);
  if (typeof m.version !== 'string' || m.version.length === 0 || m.version.length > 64) fail('version', 'a version string', m.version);
  if (typeof m.complete !== 'boolean') fail('complete', 'true or false', m.complete);
  if (!Array.isArray(m.files)) fail('files', 'a list of file names', m.files);
  const files = m.files as unknown[];
  files.forEach((f, i) => {
    if (typeof f !== 'string' || !LISTED_FILES.has(f)) fail(`files[${i}]`, `one of ${[...LISTED_FILES].join(', ')}`, f);
    if (files.indexOf(f) !== i) fail(`files[${i}]`, 'each file once', f);
  });
  const sums = m.sha256;
  if (sums === null || typeof sums !== 'object' || Array.isArray(sums)) fail('sha256', 'a checksum per listed file', sums);
  const sumKeys = Object.keys(sums as object);
  for (const f of files as string[]) {
    const s = (sums as Record<string, unknown>)[f];
    if (typeof s !== 'string' || !/^[0-9a-f]{64}$/.test(s)) fail(`sha256.${f}`, 'a SHA-256 in hex (64 digits)', s);
  }
  const extra = sumKeys.find((k) => !(files as string[]).includes(k));
  if (extra !== undefined) fail(`sha256.${extra}`, 'checksums of listed files only', 'a checksum of a file run.json does not list');
}

/** Checks the structure of a parsed run.json of a run; throws an InputError naming the key. */
export function checkManifest(path: string, v: unknown): Manifest {
  const fail = failer(path);
  if (v === null || typeof v !== 'object' || Array.isArray(v)) fail('', 'a run manifest (a JSON object)', v);
  const m = v as Record<string, unknown>;
  if (m.kind === 'analysis') fail('kind', 'the folder of a run (this one holds an analysis of recorded traces, which only report reads)', m.kind);
  checkCommon(m, KEYS, fail);
  if (!Number.isSafeInteger(m.seed) || (m.seed as number) < 0) fail('seed', 'a whole number from 0 to 2^53-1', m.seed);
  if (m.engine !== 'exact' && m.engine !== 'traces') fail('engine', '"exact" or "traces"', m.engine);
  if (m.engineReason !== undefined && typeof m.engineReason !== 'string') fail('engineReason', 'a string', m.engineReason);
  if (parseShardText(m.shard) === null) fail('shard', `a shard "K/N" with 1 ≤ K ≤ N ≤ ${MAX_SHARDS}`, m.shard);
  if (typeof m.scenario !== 'string') fail('scenario', 'the scenario as JSON text', m.scenario);
  if (!isJsonObject(m.scenario)) fail('scenario', 'the scenario as JSON text', '\u0000text that is not a JSON object');
  if (m.mergedFrom !== undefined && (!Array.isArray(m.mergedFrom) || m.mergedFrom.some((d) => typeof d !== 'string'))) fail('mergedFrom', 'a list of folder names', m.mergedFrom);
  if (m.refine !== undefined) {
    const r = m.refine as Record<string, unknown> | null;
    if (r === null || typeof r !== 'object' || (r.key !== true && typeof r.key !== 'string') || !Number.isInteger(r.points) || (r.points as number) < 2 || (r.points as number) > 64) {
      fail('refine', 'the refinement {key, points} of --refine', m.refine);
    }
  }
  return m as unknown as Manifest;
}

/** Checks the structure of a parsed run.json of an analysis; throws an InputError naming the key. */
function checkAnalysisManifest(path: string, m: Record<string, unknown>): AnalysisManifest {
  const fail = failer(path);
  checkCommon(m, ANALYSIS_KEYS, fail);
  if (m.engine !== 'analyze') fail('engine', '"analyze"', m.engine);
  if (m.shard !== '1/1') fail('shard', '"1/1"', m.shard);
  const a = m.analysis as Record<string, unknown> | null;
  if (a === null || typeof a !== 'object' || Array.isArray(a)) fail('analysis', 'what the analysis ran on {pipeline, records, labels}', a);
  if (!isJsonObject(a!.pipeline)) fail('analysis.pipeline', 'the pipeline as JSON text', a!.pipeline);
  if (typeof a!.records !== 'string') fail('analysis.records', 'the records read', a!.records);
  if (a!.labels !== null && typeof a!.labels !== 'string') fail('analysis.labels', 'the labels read, or null', a!.labels);
  const unknown = Object.keys(a!).find((k) => !['pipeline', 'records', 'labels'].includes(k));
  if (unknown !== undefined) fail(`analysis.${unknown}`, 'no such key in run.json', a![unknown]);
  return m as unknown as AnalysisManifest;
}

/** Reads and checks run.json of a folder, a run's or an analysis's; refuses a missing, malformed or (unless told otherwise) unfinished one. */
export function readAnyManifest(dir: string, requireComplete = true): Manifest | AnalysisManifest {
  const path = join(dir, MANIFEST);
  const v = readJsonFile(path, 'not found: this folder does not hold a singleshot run');
  const analysis = v !== null && typeof v === 'object' && !Array.isArray(v) && (v as Record<string, unknown>).kind === 'analysis';
  const m = analysis ? checkAnalysisManifest(path, v as Record<string, unknown>) : checkManifest(path, v);
  if (requireComplete && !m.complete) throw new InputError(path, 'complete', 'a finished run', 'complete: false (the run was interrupted)');
  return m;
}

/** Reads and checks run.json of a run folder; refuses a missing, malformed or (unless told otherwise) unfinished one, and an analysis's. */
export function readManifest(dir: string, requireComplete = true): Manifest {
  const path = join(dir, MANIFEST);
  const m = checkManifest(path, readJsonFile(path, 'not found: this folder does not hold a singleshot run'));
  if (requireComplete && !m.complete) throw new InputError(path, 'complete', 'a finished run', 'complete: false (the run was interrupted)');
  return m;
}

function mismatch(dir: string, path: string, expected: string): InputError {
  return new InputError(path, '', `the bytes ${join(dir, MANIFEST)} records (sha256 ${expected.slice(0, 12)}…)`, 'other bytes: one of the two was changed or damaged after the run');
}

/** The bytes of listed file `name`, checked against its checksum. */
export function verifiedFile(dir: string, m: Pick<Manifest, 'sha256'>, name: string): Buffer {
  const path = join(dir, name);
  const expected = m.sha256[name];
  if (expected === undefined) throw new InputError(join(dir, MANIFEST), 'files', `a listing of ${name}`, 'none');
  let bytes: Buffer;
  try {
    bytes = readFileSync(path);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT') throw new InputError(path, '', 'a file run.json lists', 'no such file');
    throw fileSystemError(e, path, 'reading');
  }
  if (sha256(bytes) !== expected) throw mismatch(dir, path, expected);
  return bytes;
}

/** Checks listed file `name` against its checksum without holding it in memory. */
export function verifyFile(dir: string, m: Pick<Manifest, 'sha256'>, name: string): void {
  const path = join(dir, name);
  const expected = m.sha256[name];
  if (expected === undefined) throw new InputError(join(dir, MANIFEST), 'files', `a listing of ${name}`, 'none');
  let actual: string;
  try {
    actual = sha256File(path);
  } catch (e) {
    if (e instanceof InputError && /ENOENT/.test(e.message)) throw new InputError(path, '', 'a file run.json lists', 'no such file');
    throw e;
  }
  if (actual !== expected) throw mismatch(dir, path, expected);
}
