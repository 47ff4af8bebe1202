/**
 * The random stream the noise generators draw from: any seeded object with these three
 * methods (the project's `RandomStream` satisfies it). Generators never create randomness.
 */

/** A seeded source of uniform integers, uniform doubles and standard normals. */
export interface NoiseStream {
  /** Uniform integer in [0, 2^32). */
  nextUint32(): number;
  /** Uniform double in [0, 1) or (0, 1); generators accept either. */
  nextDouble(): number;
  /** Standard normal variate N(0, 1). */
  nextNormal(): number;
  /**
   * Optional bulk form: writes `count` standard normals into out[start …]. Generators use it when
   * present (faster); the values then differ from `count` calls of nextNormal, deterministically.
   */
  fillNormals?(out: Float64Array, start: number, count: number): void;
}
