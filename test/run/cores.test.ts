import { describe, expect, it } from 'vitest';
import { physicalCoresOf, usableCores } from '../../src/run/cores.ts';
import { availableParallelism } from 'node:os';

/** A /proc/cpuinfo text: one block per logical processor, with its package and core ids. */
const cpuinfo = (pairs: readonly [number, number][]): string =>
  pairs.map(([pkg, core], i) => `processor\t: ${i}\nvendor_id\t: GenuineIntel\nphysical id\t: ${pkg}\nsiblings\t: 4\ncore id\t\t: ${core}\ncpu cores\t: 2\n`).join('\n');

describe('physical cores', () => {
  it('counts two hardware threads of one core once', () => {
    // 2 cores × 2 threads (Linux lists the threads of a core under the same core id)
    expect(physicalCoresOf(cpuinfo([[0, 0], [0, 1], [0, 0], [0, 1]]))).toBe(2);
  });

  it('counts the same core id in two packages twice', () => {
    expect(physicalCoresOf(cpuinfo([[0, 0], [1, 0], [0, 1], [1, 1]]))).toBe(4);
  });

  it('says nothing when the text has no core ids (some kernels and virtual machines)', () => {
    expect(physicalCoresOf('processor\t: 0\nmodel name\t: ARMv8\n\nprocessor\t: 1\nmodel name\t: ARMv8\n')).toBeNull();
    expect(physicalCoresOf('')).toBeNull();
  });

  it('never exceeds the logical processors this process may use, nor falls below 1', () => {
    const n = usableCores();
    expect(n).toBeGreaterThanOrEqual(1);
    expect(n).toBeLessThanOrEqual(availableParallelism());
  });
});
