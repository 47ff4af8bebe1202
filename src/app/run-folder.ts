/**
 * Opening a finished run folder for reading (report, merge, rerun): run.json checked whole
 * (io/manifest.ts), every file it lists checked against its SHA-256, and everything that says how
 * the files were made — the schema metadata of every table (table name, seed, version, engine and
 * its reason, shard, scenario) and the header of tallies.json — required to agree with run.json.
 * A folder that passes holds exactly what one command wrote; anything else is one line, exit 2.
 */
import { statSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../errors.ts';
import { checkArrowFile } from '../io/arrow-read.ts';
import { readManifest, verifyFile, type AnalysisManifest, type Manifest } from '../io/manifest.ts';
import { checkMetadata } from '../io/table-checks.ts';
import { TALLIES } from './tallies.ts';

/** A run folder whose files have been checked. */
export interface RunFolder {
  dir: string;
  manifest: Manifest;
}

/** What every table of the run must say in its schema metadata (as run.json records it). */
export function expectedMetadata(m: Manifest, table: string): Record<string, string | undefined> {
  return {
    table, seed: String(m.seed), version: m.version, engine: m.engine, engine_reason: m.engineReason, shard: m.shard, scenario: m.scenario,
    refine: m.refine ? JSON.stringify(m.refine) : undefined,
  };
}

/**
 * Opens `dir` for reading: see the file comment. `reads` names the listed files the command
 * reads (each checked; one it needs but run.json does not list is refused by the command), or
 * 'all' — then tallies.json must be listed too.
 */
export async function openRunFolder(dir: string, reads: readonly string[] | 'all' = 'all'): Promise<RunFolder> {
  let isFolder = false;
  try {
    isFolder = statSync(dir).isDirectory();
  } catch {
    isFolder = false;
  }
  if (!isFolder) throw new InputError(dir, '', 'a run folder', 'no such folder');
  const manifest = readManifest(dir, true);
  const checked = reads === 'all' ? manifest.files : manifest.files.filter((f) => reads.includes(f));
  for (const f of checked) verifyFile(dir, manifest, f);
  for (const f of checked.filter((x) => x.endsWith('.arrow'))) {
    const path = join(dir, f);
    const schema = await checkArrowFile(path, f.replace(/\.arrow$/, ''));
    checkMetadata(path, schema, expectedMetadata(manifest, f.replace(/\.arrow$/, '')), join(dir, 'run.json'));
  }
  if (reads === 'all' && !manifest.files.includes(TALLIES) && manifest.engine !== 'analyze') {
    throw new InputError(join(dir, 'run.json'), 'files', `a list that holds ${TALLIES}`, JSON.stringify(manifest.files).slice(0, 80));
  }
  return { dir, manifest };
}

/** A checked analysis folder (`analyze`'s output, which `report` reads). */
export interface AnalysisFolder {
  dir: string;
  manifest: AnalysisManifest;
}

/** Opens an analysis folder for reading: run.json checked whole, every listed file against its checksum, every Arrow table's structure and metadata against run.json. */
export async function openAnalysisFolder(dir: string, manifest: AnalysisManifest): Promise<AnalysisFolder> {
  const a = manifest.analysis;
  for (const f of manifest.files) verifyFile(dir, manifest, f);
  for (const f of manifest.files.filter((x) => x.endsWith('.arrow'))) {
    const path = join(dir, f);
    const table = f.replace(/\.arrow$/, '');
    const schema = await checkArrowFile(path, table);
    checkMetadata(path, schema, {
      table, version: manifest.version, engine: 'analyze', shard: '1/1', pipeline_file: a.pipeline, records: a.records, labels: a.labels ?? undefined,
    }, join(dir, 'run.json'));
  }
  return { dir, manifest };
}
