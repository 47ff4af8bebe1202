import { describe, expect, it } from 'vitest';
import { landauZenerProbability } from '../../src/physics/mapping.ts';
import { ELEMENTARY_CHARGE, PLANCK, REDUCED_PLANCK } from '../../src/physics/constants.ts';

// Landau–Zener: P = exp(−2π Δ² / (ħ v)) (Landau, Phys. Z. Sowjetunion 2, 46 (1932); Zener,
// Proc. R. Soc. A 137, 696 (1932)); ħ = h/2π with h = 6.62607015e-34 J·s exact (SI Brochure 2019).
// Expected values are hand computations written out below.
const ueV = 1e-6 * ELEMENTARY_CHARGE;
const meVPerNs = (1e-3 * ELEMENTARY_CHARGE) / 1e-9;

describe('landauZenerProbability', () => {
  it('uses ħ = h/2π = 1.0545718176461565e-34 J·s', () => {
    // 6.62607015e-34 / 6.283185307179586 = 1.0545718176461565e-34
    expect(Math.abs(REDUCED_PLANCK - 1.0545718176461565e-34)).toBeLessThan(1e-48);
    expect(REDUCED_PLANCK).toBe(PLANCK / (2 * Math.PI));
  });

  it.each([
    // Δ = 0: always diabatic, P = exp(0) = 1.
    { what: 'no coupling → 1', D: 0, v: meVPerNs, expected: 1 },
    // v = 2πΔ²/ħ makes the exponent exactly −1: P = e^-1 = 0.36787944117144233.
    { what: 'exponent −1 → 1/e', D: 10 * ueV, v: (2 * Math.PI * (10 * ueV) ** 2) / REDUCED_PLANCK, expected: 0.36787944117144233 },
    // Δ = 3 µeV = 4.806529902e-25 J, Δ² = 2.310273e-49 J²; v = 2 meV/ns = 3.204353268e-13 J/s;
    // ħv = 1.0545718e-34 · 3.204353268e-13 = 3.379219e-47; 2πΔ²/(ħv) = 0.04295627507784245;
    // P = e^-0.04295627507784245 = 0.957953275583709.
    { what: '3 µeV at 2 meV/ns', D: 3 * ueV, v: 2 * meVPerNs, expected: 0.957953275583709 },
    // Δ = 20 µeV: Δ² = 1.0268e-47 J²; v = 0.5 meV/ns = 8.01088317e-14 J/s; 2πΔ²/(ħv) = 7.6366711249497685;
    // P = e^-7.6366711249497685 = 4.8243173698291655e-4.
    { what: '20 µeV at 0.5 meV/ns', D: 20 * ueV, v: 0.5 * meVPerNs, expected: 4.8243173698291655e-4 },
  ])('$what', ({ D, v, expected }) => {
    const actual = landauZenerProbability(D, v);
    const tol = 1e-12 * expected;
    expect(Math.abs(actual - expected), `Δ=${D} v=${v}: actual ${actual}, expected ${expected}, tol ${tol}`).toBeLessThanOrEqual(tol);
  });

  it('falls as the sweep slows (more adiabatic)', () => {
    expect(landauZenerProbability(5 * ueV, 0.1 * meVPerNs)).toBeLessThan(landauZenerProbability(5 * ueV, 1 * meVPerNs));
  });
});
