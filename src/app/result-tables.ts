/**
 * The tables computed from a run's finished points (summary, budget, pipeline comparisons),
 * written the same way by `run` and by `merge`, so a merged folder matches an unsharded run.
 */
import { join } from 'node:path';
import { tableToIPC } from 'apache-arrow';
import type { PointResult } from '../run/point-result.ts';
import { writeFileAtomic } from '../io/atomic-file.ts';
import { tableMetadata, type RunProvenance } from '../io/metadata.ts';
import { summaryTable } from '../io/tables/summary.ts';
import { budgetTable } from '../io/tables/budget.ts';
import { comparisonsTable } from '../io/tables/comparisons.ts';

/** Writes summary.arrow, budget.arrow and (with two or more pipelines) comparisons.arrow; returns the file names. */
export function writeResultTables(
  outDir: string, points: readonly PointResult[], provenance: RunProvenance, unit: string, sweptUnits: Record<string, string>,
): string[] {
  const files: string[] = [];
  writeFileAtomic(join(outDir, 'summary.arrow'), tableToIPC(summaryTable(points, unit, tableMetadata('summary', provenance), sweptUnits), 'file'));
  files.push('summary.arrow');
  writeFileAtomic(join(outDir, 'budget.arrow'), tableToIPC(budgetTable(points, tableMetadata('budget', provenance), sweptUnits), 'file'));
  files.push('budget.arrow');
  if (points.some((p) => p.comparisons.length > 0)) {
    writeFileAtomic(join(outDir, 'comparisons.arrow'), tableToIPC(comparisonsTable(points, tableMetadata('comparisons', provenance)), 'file'));
    files.push('comparisons.arrow');
  }
  return files;
}
