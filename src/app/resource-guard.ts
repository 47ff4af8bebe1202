/**
 * The resource guard: before a run starts, compare its estimate (plan/estimate.ts) with the
 * free memory (os.freemem) and the free disk space of the output folder (fs.statfs), and refuse
 * what does not fit, with the estimate in the message, unless the user forces it.
 */
import { statfsSync } from 'node:fs';
import { freemem } from 'node:os';
import { dirname, resolve } from 'node:path';
import { InputError } from '../errors.ts';
import { describeParts, formatBytes, formatDuration, type RunEstimate } from '../run/estimate.ts';

/** What the machine has free for the run. */
export interface FreeResources {
  memoryBytes: number;
  diskBytes: number;
}

/** A run refused because its estimate exceeds what is free (exit 2, like any input problem). */
export class ResourceError extends InputError {}

/** Free bytes on the file system that holds `dir` (or its nearest existing parent). */
export function freeDiskBytes(dir: string): number {
  let at = resolve(dir);
  for (;;) {
    try {
      const s = statfsSync(at);
      return Number(s.bavail) * Number(s.bsize);
    } catch (e) {
      const parent = dirname(at);
      if (parent === at) throw e;
      at = parent;
    }
  }
}

/** Free memory and free disk space for a run writing into `outDir`. */
export function freeResources(outDir: string): FreeResources {
  return { memoryBytes: freemem(), diskBytes: freeDiskBytes(outDir) };
}

/** One line summing up an estimate: "about 1.2 GiB of memory, 3.4 GiB of disk, 12 min". */
export function describeEstimate(e: RunEstimate): string {
  return `about ${formatBytes(e.memoryBytes)} of memory, ${formatBytes(e.diskBytes)} of disk and ${formatDuration(e.seconds)}`;
}

/**
 * Throws ResourceError when the estimate exceeds the free memory or disk (memory first); does
 * nothing when `force` is set. `file` names the scenario in the message.
 */
export function guardResources(file: string, e: RunEstimate, free: FreeResources, force: boolean): void {
  if (force) return;
  const hint = 'lower shots, calibrationShots, batchSize or the record length, or add --force to try anyway';
  if (e.memoryBytes > free.memoryBytes) {
    throw new ResourceError(file, '', `a run that fits in the free memory (${formatBytes(free.memoryBytes)})`,
      `an estimated ${formatBytes(e.memoryBytes)} (${describeParts(e.memory)}); ${hint}`);
  }
  if (e.diskBytes > free.diskBytes) {
    throw new ResourceError(file, '', `a run that fits in the free disk space (${formatBytes(free.diskBytes)})`,
      `an estimated ${formatBytes(e.diskBytes)} (${describeParts(e.disk)}); ${hint}, or --no-shots-table`);
  }
}
