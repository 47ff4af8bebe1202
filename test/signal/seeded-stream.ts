/**
 * Test-only seeded stream over seedrandom (ARC4-based), with Box–Muller normals.
 * Gives the `NoiseStream` shape the generators expect; the engine uses its own stream.
 */
import seedrandom from 'seedrandom';
import type { NoiseStream } from '../../src/signal/stream.ts';

/** A NoiseStream seeded by a string; Box–Muller normals, both values of each pair used. */
export function seededStream(seed: string): NoiseStream {
  const rng = seedrandom(seed);
  let spare = 0;
  let hasSpare = false;
  return {
    nextUint32: () => rng.int32() >>> 0,
    nextDouble: () => rng.double(),
    nextNormal: () => {
      if (hasSpare) {
        hasSpare = false;
        return spare;
      }
      // Box–Muller (Box & Muller, Ann. Math. Stat. 29, 610 (1958)); 1 − u avoids log(0).
      const r = Math.sqrt(-2 * Math.log(1 - rng.double()));
      const phi = 2 * Math.PI * rng.double();
      spare = r * Math.sin(phi);
      hasSpare = true;
      return r * Math.cos(phi);
    },
  };
}
