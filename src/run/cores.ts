/**
 * The cores a run may use: physical cores, not logical ones. Two hardware threads of one core
 * share its floating-point units, so a second simulation thread there adds little speed but
 * all the cost of a worker (start-up, a second copy of the point plans); on such machines the
 * automatic choice had made sweeps slower than one thread.
 */
import { availableParallelism } from 'node:os';
import { readFileSync } from 'node:fs';

/**
 * Distinct (package, core) pairs in a Linux /proc/cpuinfo text, or null when the text does not
 * say (other kernels, some containers and virtual machines).
 */
export function physicalCoresOf(cpuinfo: string): number | null {
  const cores = new Set<string>();
  for (const block of cpuinfo.split(/\n\s*\n/)) {
    const pkg = /^physical id\s*:\s*(\d+)/m.exec(block);
    const core = /^core id\s*:\s*(\d+)/m.exec(block);
    if (pkg && core) cores.add(`${pkg[1]}:${core[1]}`);
  }
  return cores.size > 0 ? cores.size : null;
}

/**
 * Physical cores this process may use: the physical core count where the system tells it, never
 * more than the logical processors the process may run on (its affinity and quota), at least 1.
 */
export function usableCores(): number {
  const logical = availableParallelism();
  let physical: number | null = null;
  try {
    physical = physicalCoresOf(readFileSync('/proc/cpuinfo', 'utf8'));
  } catch {
    // not Linux: the logical count is what we have
  }
  return Math.max(1, Math.min(logical, physical ?? logical));
}
