import { describe, expect, it } from 'vitest';
import {
  amplifierVoltageToCurrent,
  combineWhite,
  johnsonCurrentDensity,
  shotCurrentDensity,
} from '../../src/physics/noise-components.ts';

describe('white-noise components', () => {
  it.each([
    // published: Johnson, Phys. Rev. 32, 97 (1928); Nyquist, Phys. Rev. 32, 110 (1928): √(4kT/R)
    { resistance: 1e6, temperature: 4, expected: 14.86e-15, tol: 0.005e-15 },
  ])('Johnson current noise, R = $resistance Ω at $temperature K', ({ resistance, temperature, expected, tol }) => {
    const got = johnsonCurrentDensity(resistance, temperature);
    expect(Math.abs(got - expected), `R=${resistance} T=${temperature}: ${got} vs ${expected} ± ${tol}`).toBeLessThan(tol);
  });

  it('Johnson noise vanishes at 0 K (classical law)', () => {
    expect(johnsonCurrentDensity(1e6, 0)).toBe(0);
  });

  it.each([
    // published: Schottky, Ann. Phys. 57, 541 (1918): √(2eI), I = 1 nA → 17.90 fA/√Hz
    { current: 1e-9, fano: 1, expected: 17.90e-15, tol: 0.005e-15 },
    { current: -1e-9, fano: 1, expected: 17.90e-15, tol: 0.005e-15 },
    // Schottky's law with a Fano factor ½ (power × ½): 17.90/√2 = 12.657 fA/√Hz
    { current: 1e-9, fano: 0.5, expected: 12.657e-15, tol: 0.005e-15 },
  ])('shot noise, I = $current A, F = $fano', ({ current, fano, expected, tol }) => {
    const got = shotCurrentDensity(current, fano);
    expect(Math.abs(got - expected), `I=${current} F=${fano}: ${got} vs ${expected} ± ${tol}`).toBeLessThan(tol);
  });

  it('amplifier voltage noise referred to current is e_n/R', () => {
    // 1 nV/√Hz across 100 kΩ → 10 fA/√Hz (Ohm's law)
    expect(amplifierVoltageToCurrent(1e-9, 1e5)).toBeCloseTo(1e-14, 28);
  });

  it('combines in root-sum-square; shares are variance fractions adding to 1', () => {
    const parts = [
      { name: 'johnson', density: johnsonCurrentDensity(1e6, 4) },
      { name: 'shot', density: shotCurrentDensity(1e-9) },
      { name: 'amplifier', density: amplifierVoltageToCurrent(1e-9, 1e5) },
    ];
    const combined = combineWhite(parts);
    const rss = Math.sqrt(parts.reduce((a, p) => a + p.density ** 2, 0));
    expect(combined.density).toBeCloseTo(rss, 28);
    const sum = combined.shares.reduce((a, s) => a + s.share, 0);
    expect(Math.abs(sum - 1), `shares sum to ${sum}`).toBeLessThan(1e-15);
    expect(combined.shares.map((s) => s.name)).toEqual(['johnson', 'shot', 'amplifier']);
    // 3-4-5: densities 3 and 4 give 5, shares 9/25 and 16/25 (Pythagoras)
    const pyth = combineWhite([{ name: 'a', density: 3 }, { name: 'b', density: 4 }]);
    expect(pyth.density).toBe(5);
    expect(pyth.shares[0]!.share).toBeCloseTo(0.36, 15);
    expect(pyth.shares[1]!.share).toBeCloseTo(0.64, 15);
  });

  it('an empty or all-zero set gives density 0 and zero shares, not NaN', () => {
    expect(combineWhite([])).toEqual({ density: 0, shares: [] });
    const zero = combineWhite([{ name: 'x', density: 0 }]);
    expect(zero.density).toBe(0);
    expect(zero.shares[0]!.share).toBe(0);
  });
});
