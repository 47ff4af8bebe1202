/**
 * `rerun`: run a finished result again from what its own tables say — the scenario (canonical
 * JSON), seed, shard and engine in summary.arrow's schema metadata, the files listed in run.json —
 * and check that every table comes out byte for byte the same. A match means the result is
 * reproducible from the folder alone; a mismatch names the first differing byte of each file.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { InputError } from '../errors.ts';
import { readArrowFile, singleshotMetadata } from '../io/arrow-read.ts';
import { openRunFolder } from './run-folder.ts';
import { TOOL_VERSION } from '../io/metadata.ts';
import { runToDirectory } from './run-to-directory.ts';
import type { EngineRequest } from '../engine/choose.ts';

/** Files that are derived views, not tables: not compared. */
const NOT_COMPARED = new Set(['report.html', 'run.json']);

export interface RerunOptions {
  /** The finished run folder to reproduce. */
  dir: string;
  /** Where the rerun writes (kept); default a temporary folder, removed afterwards. */
  outDir?: string;
  force?: boolean;
  /** Simulation threads for the rerun (the bytes must not depend on it). */
  workers?: number;
  signal?: AbortSignal;
  onWarning?: (message: string) => void;
}

export interface FileComparison {
  file: string;
  identical: boolean;
  bytes: number;
  rerunBytes: number;
  /** Offset of the first differing byte (or the shorter length), null when identical. */
  firstDifference: number | null;
}

export interface RerunResult {
  /** Folder of the rerun's files (removed unless `outDir` was given). */
  outDir: string;
  kept: boolean;
  comparisons: FileComparison[];
  identical: boolean;
  /** How the rerun was made: seed, shard, engine, version of the original. */
  provenance: Record<string, string>;
}

/** Compares two byte strings. */
export function compareBytes(file: string, a: Uint8Array, b: Uint8Array): FileComparison {
  const n = Math.min(a.length, b.length);
  let i = 0;
  while (i < n && a[i] === b[i]) i++;
  const identical = i === n && a.length === b.length;
  return { file, identical, bytes: a.length, rerunBytes: b.length, firstDifference: identical ? null : i };
}

/** "K/N" → 0-based shard, or undefined for "1/1". */
function parseShard(text: string, path: string): { index: number; count: number } | undefined {
  const m = /^(\d+)\/(\d+)$/.exec(text);
  if (!m) throw new InputError(path, 'singleshot.shard', 'a shard "K/N"', JSON.stringify(text));
  const k = Number(m[1]), n = Number(m[2]);
  if (!(n >= 1 && k >= 1 && k <= n)) throw new InputError(path, 'singleshot.shard', 'a shard K/N with 1 ≤ K ≤ N', JSON.stringify(text));
  return n === 1 ? undefined : { index: k - 1, count: n };
}

/** Reruns `o.dir` from its embedded scenario and compares every table's bytes. */
export async function rerunDirectory(o: RerunOptions): Promise<RerunResult> {
  // the folder whole: run.json, every file against its checksum, every table's metadata
  const { manifest } = await openRunFolder(o.dir);
  if (manifest.engine === 'analyze') throw new InputError(join(o.dir, 'run.json'), 'engine', 'a run folder (analyze results are not rerun)', '"analyze"');
  const summaryPath = join(o.dir, 'summary.arrow');
  const meta = singleshotMetadata(readArrowFile(summaryPath, 'summary'));
  const scenario = meta.scenario;
  if (!scenario) throw new InputError(summaryPath, 'singleshot.scenario', 'the scenario in the schema metadata', 'none');
  if (meta.seed !== String(manifest.seed)) {
    throw new InputError(summaryPath, 'singleshot.seed', `the seed run.json names (${manifest.seed})`, JSON.stringify(meta.seed));
  }
  if (meta.version !== TOOL_VERSION) {
    o.onWarning?.(`${summaryPath}: made by singleshot ${meta.version}, this is ${TOOL_VERSION}: the bytes may differ for that reason alone`);
  }
  const files = manifest.files.filter((f) => !NOT_COMPARED.has(f));
  if (files.some((f) => f.includes('/') || f.includes('\\') || f.startsWith('.'))) {
    throw new InputError(join(o.dir, 'run.json'), 'files', 'plain file names inside the folder', JSON.stringify(files));
  }
  const shard = parseShard(meta.shard ?? '1/1', summaryPath);
  // the engine as it was asked for: the tables say "auto: …" when the choice was left to the run
  const asked = meta.engine_reason?.startsWith('auto') ? 'auto' : meta.engine;
  const engine = (asked === 'exact' || asked === 'traces' ? asked : 'auto') as EngineRequest;
  let keepTraces: 'raw' | 'baseband' | undefined;
  if (files.includes('traces.arrow')) {
    const kind = singleshotMetadata(readArrowFile(join(o.dir, 'traces.arrow'), 'traces')).trace_kind;
    if (kind !== 'raw' && kind !== 'baseband') throw new InputError(join(o.dir, 'traces.arrow'), 'singleshot.trace_kind', '"raw" or "baseband"', JSON.stringify(kind));
    keepTraces = kind;
  }

  const work = mkdtempSync(join(tmpdir(), 'singleshot-rerun-'));
  const outDir = o.outDir ?? join(work, 'out');
  try {
    // the scenario as the run saw it (overrides applied), under a name that says where it came from
    const scenarioPath = join(work, 'scenario-from-summary.json');
    writeFileSync(scenarioPath, scenario);
    await runToDirectory({
      scenarioPath, outDir, force: o.force, shard, engine, workers: o.workers, keepTraces, refine: manifest.refine,
      shotsTable: files.includes('shots.arrow'), report: false, signal: o.signal,
      // never into the folder it checks, not even with --force
      inputs: [{ path: o.dir, kind: 'folder' }],
    });
    const comparisons = files.map((f) => {
      let original: Uint8Array, again: Uint8Array;
      try {
        original = readFileSync(join(o.dir, f));
      } catch {
        throw new InputError(join(o.dir, f), '', 'a file listed in run.json', 'no such file');
      }
      try {
        again = readFileSync(join(outDir, f));
      } catch {
        again = new Uint8Array(0);
      }
      return compareBytes(f, original, again);
    });
    return {
      outDir, kept: o.outDir !== undefined, comparisons, identical: comparisons.every((c) => c.identical),
      provenance: { seed: meta.seed ?? '', shard: meta.shard ?? '1/1', engine: meta.engine ?? '', version: meta.version ?? '' },
    };
  } finally {
    rmSync(work, { recursive: true, force: true });
  }
}

/** The verdict as text lines: one per file, then the summary line. */
export function formatRerun(dir: string, r: RerunResult): string {
  const lines = r.comparisons.map((c) => c.identical
    ? `  ${c.file}: identical (${c.bytes} bytes)`
    : `  ${c.file}: DIFFERENT (${c.bytes} vs ${c.rerunBytes} bytes, first difference at byte ${c.firstDifference})`);
  const how = `seed ${r.provenance.seed}, shard ${r.provenance.shard}, engine ${r.provenance.engine}`;
  lines.push(r.identical
    ? `${dir}: reproduced — every table is byte-identical (${how})`
    : `${dir}: NOT reproduced — ${r.comparisons.filter((c) => !c.identical).length} of ${r.comparisons.length} files differ (${how})`);
  if (r.kept) lines.push(`rerun written to ${r.outDir}`);
  return lines.join('\n');
}
