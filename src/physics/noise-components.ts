/**
 * White-noise components of a current readout, as one-sided amplitude densities in A/√Hz,
 * and their root-sum-square combination. Independent sources add in power (variance).
 */
import { BOLTZMANN, ELEMENTARY_CHARGE } from './constants.ts';

/**
 * Johnson–Nyquist current noise of a resistor, √(4kT/R) in A/√Hz (one-sided)
 * (Johnson, Phys. Rev. 32, 97 (1928); Nyquist, Phys. Rev. 32, 110 (1928); classical limit
 * hf ≪ kT). `resistance` in Ω (> 0), `temperature` in K (≥ 0).
 */
export function johnsonCurrentDensity(resistance: number, temperature: number): number {
  return Math.sqrt((4 * BOLTZMANN * temperature) / resistance);
}

/**
 * Shot noise of a current, √(2e|I|·F) in A/√Hz (one-sided) (Schottky, Ann. Phys. 57, 541
 * (1918)); F is the Fano factor (1 for Poissonian transfer, < 1 for sub-Poissonian).
 */
export function shotCurrentDensity(current: number, fano = 1): number {
  return Math.sqrt(2 * ELEMENTARY_CHARGE * Math.abs(current) * fano);
}

/** Amplifier input voltage noise e_n (V/√Hz) referred to current through a resistance R: e_n/R (A/√Hz). */
export function amplifierVoltageToCurrent(voltageDensity: number, resistance: number): number {
  return voltageDensity / resistance;
}

/** One named white-noise component (amplitude density, e.g. A/√Hz). */
export interface NoiseComponent {
  name: string;
  density: number;
}

/** The combined density and each component's share of the total variance. */
export interface CombinedNoise {
  /** Root-sum-square density √(Σ dᵢ²). */
  density: number;
  /** Variance fractions dᵢ²/Σ dⱼ², in the input order (they add to 1; all 0 when the total is 0). */
  shares: { name: string; share: number }[];
}

/** Combines independent white components: total = √(Σ dᵢ²), shares = dᵢ²/Σ dⱼ². */
export function combineWhite(components: readonly NoiseComponent[]): CombinedNoise {
  let power = 0;
  for (const c of components) power += c.density * c.density;
  const shares = components.map((c) => ({
    name: c.name,
    share: power > 0 ? (c.density * c.density) / power : 0,
  }));
  return { density: Math.sqrt(power), shares };
}
