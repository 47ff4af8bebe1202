/**
 * A folder a command wrote must read back whole: run.json checked, every listed file against its
 * checksum, the tables' structure and metadata — a run folder's tables read as the report reads
 * them, an analysis folder checked as `report` checks it.
 */
import { openAnalysisFolder, openRunFolder } from '../../src/app/run-folder.ts';
import { readAnyManifest } from '../../src/io/manifest.ts';
import { readRunTables } from '../../src/io/report/read-run.ts';

export async function readsBackWhole(dir: string): Promise<void> {
  const m = readAnyManifest(dir);
  if ('kind' in m && m.kind === 'analysis') {
    await openAnalysisFolder(dir, m);
    return;
  }
  await openRunFolder(dir);
  readRunTables(dir);
}
