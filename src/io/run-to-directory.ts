/**
 * The `run` job as a library function: scenario file in, tables in a folder out.
 * shots.arrow streams batch by batch; summary.arrow and budget.arrow follow at the end;
 * run.json marks the folder complete last.
 */
import { join } from 'node:path';
import { tableToIPC } from 'apache-arrow';
import { loadScenarioFile } from '../scenario/load.ts';
import type { ScenarioOverrides } from '../scenario/overrides.ts';
import { runPoints, type BatchExecutor, type RunResult, type SweepPoint } from '../plan/run.ts';
import { ArrowFileStream } from './arrow-sink.ts';
import { writeFileAtomic } from './atomic-file.ts';
import { writeManifest } from './manifest.ts';
import { tableMetadata, type RunProvenance } from './metadata.ts';
import { prepareOutputDir } from './output-dir.ts';
import { shotRecordBatches, shotsLayout } from './tables/shots.ts';
import { summaryTable } from './tables/summary.ts';
import { budgetTable } from './tables/budget.ts';

export interface RunToDirectoryOptions extends ScenarioOverrides {
  scenarioPath: string;
  outDir: string;
  force?: boolean;
  /** Write shots.arrow (default true). */
  shotsTable?: boolean;
  shard?: { index: number; count: number };
  executor?: BatchExecutor;
  onProgress?: (done: number, total: number) => void;
  onWarning?: (message: string) => void;
}

export interface RunToDirectoryResult {
  result: RunResult;
  provenance: RunProvenance;
  files: string[];
  warnings: string[];
}

/** Turns a loaded scenario into sweep points (a single point when nothing is swept). */
export type SweepExpander = (loaded: Awaited<ReturnType<typeof loadScenarioFile>>, file: string) => SweepPoint[];

let sweepExpander: SweepExpander = (loaded) => [{ parameters: {}, scenario: loaded.scenario }];

/** Installs the sweep expansion (the sweep module registers itself here). */
export function setSweepExpander(f: SweepExpander): void {
  sweepExpander = f;
}

export async function runToDirectory(o: RunToDirectoryOptions): Promise<RunToDirectoryResult> {
  const loaded = await loadScenarioFile(o.scenarioPath, { shots: o.shots, seed: o.seed });
  loaded.warnings.forEach((w) => o.onWarning?.(w));
  const points = sweepExpander(loaded, o.scenarioPath);
  prepareOutputDir(o.outDir, o.force ?? false);
  const first = points[0]!.scenario;
  const shard = o.shard ? `${o.shard.index + 1}/${o.shard.count}` : '1/1';
  const provenance: RunProvenance = { scenario: loaded.canonical, seed: first.seed, engine: 'traces', shard };
  const files: string[] = [];
  writeManifest(o.outDir, { complete: false, seed: first.seed, engine: provenance.engine, shard, files, scenario: loaded.canonical });
  const outcomeOf = first.states.map((s) => s.outcome);
  const layout = shotsLayout(first, tableMetadata('shots', provenance));
  const shots = o.shotsTable === false ? null : new ArrowFileStream(join(o.outDir, 'shots.arrow'), layout.schema);
  let result: RunResult;
  try {
    result = await runPoints(points, {
      executor: o.executor, shard: o.shard, onProgress: o.onProgress,
      onScoredBatch: shots ? (_p, b, scored) => { for (const rb of shotRecordBatches(layout, b, scored, outcomeOf)) shots.write(rb); } : undefined,
    });
    shots?.finish();
  } catch (e) {
    shots?.abort();
    throw e;
  }
  if (shots) files.push('shots.arrow');
  provenance.engine = result.engine;
  const unit = first.signal.unit;
  writeFileAtomic(join(o.outDir, 'summary.arrow'), tableToIPC(summaryTable(result.points, unit, tableMetadata('summary', provenance)), 'file'));
  files.push('summary.arrow');
  writeFileAtomic(join(o.outDir, 'budget.arrow'), tableToIPC(budgetTable(result.points, tableMetadata('budget', provenance)), 'file'));
  files.push('budget.arrow');
  writeManifest(o.outDir, { complete: true, seed: first.seed, engine: result.engine, shard, files, scenario: loaded.canonical });
  return { result, provenance, files, warnings: loaded.warnings };
}
