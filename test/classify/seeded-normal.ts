/**
 * Tiny seeded random source for tests: seedrandom's ARC4 stream for uniforms, Box–Muller for
 * standard normals (Box & Muller, Ann. Math. Stat. 29, 610 (1958)), inversion for exponentials.
 */
import seedrandom from 'seedrandom';

/** A seeded source of uniforms in [0, 1), standard normals and exponential times. */
export interface SeededSource {
  uniform(): number;
  normal(): number;
  exponential(mean: number): number;
}

/** Makes a seeded source; the same seed gives the same sequence. */
export function makeSeededSource(seed: string): SeededSource {
  const rng = seedrandom(seed);
  let spare = 0;
  let hasSpare = false;
  return {
    uniform: () => rng(),
    normal(): number {
      if (hasSpare) {
        hasSpare = false;
        return spare;
      }
      const u1 = 1 - rng(); // (0, 1]: log is finite
      const u2 = rng();
      const r = Math.sqrt(-2 * Math.log(u1));
      spare = r * Math.sin(2 * Math.PI * u2);
      hasSpare = true;
      return r * Math.cos(2 * Math.PI * u2);
    },
    exponential: (mean: number) => -mean * Math.log(1 - rng()),
  };
}
