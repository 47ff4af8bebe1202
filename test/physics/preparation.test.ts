import { describe, expect, it } from 'vitest';
import { thermalPopulation } from '../../src/physics/preparation.ts';
import { BOLTZMANN, ELEMENTARY_CHARGE } from '../../src/physics/constants.ts';

// Boltzmann population of an excited manifold: p = g·e^(−E/kT) / (1 + g·e^(−E/kT))
// (two-level Boltzmann statistics; k_B = 1.380649e-23 J/K and e = 1.602176634e-19 C exact,
// SI Brochure, 9th ed., 2019). Expected values are hand computations written out below.
const ueV = 1e-6 * ELEMENTARY_CHARGE;

describe('thermalPopulation (Boltzmann)', () => {
  it.each([
    // E = 0: p = g/(1+g).
    { what: 'E = 0, g = 1 → 1/2', E: 0, T: 0.1, g: 1, expected: 0.5 },
    { what: 'E = 0, g = 3 → 3/4', E: 0, T: 0.1, g: 3, expected: 0.75 },
    // E = kT exactly: p = e^-1/(1+e^-1) = 1/(1+e) = 1/3.718281828459045 = 0.2689414213699951.
    { what: 'E = kT → 1/(1+e)', E: BOLTZMANN * 1, T: 1, g: 1, expected: 0.2689414213699951 },
    // E/kT = (100e-6 · 1.602176634e-19) / (1.380649e-23 · 0.1) = 1.602176634e-23 / 1.380649e-24
    //      = 11.60451812155008; e^-11.60451812155008 = 9.1247676e-6; p = 9.1247676e-6/(1 + 9.1247676e-6)
    //      = 9.124684391962118e-6.
    { what: '100 µeV at 100 mK', E: 100 * ueV, T: 0.1, g: 1, expected: 9.124684391962118e-6 },
    // E/kT = 2.403264951e-23 / (1.380649e-23 · 0.12) = 2.403264951e-23 / 1.6567788e-24 = 14.505647651937602;
    // e^-x = 5.015073e-7; g = 4: p = 4 · 5.015073e-7 / (1 + 4 · 5.015073e-7) = 2.0060252187471726e-6.
    { what: '150 µeV at 120 mK, g = 4', E: 150 * ueV, T: 0.12, g: 4, expected: 2.0060252187471726e-6 },
  ])('$what', ({ E, T, g, expected }) => {
    const actual = thermalPopulation(E, T, g);
    const tol = 1e-12 * expected;
    expect(Math.abs(actual - expected), `E=${E} T=${T} g=${g}: actual ${actual}, expected ${expected}, tol ${tol}`).toBeLessThanOrEqual(tol);
  });

  it('underflows to 0 (not NaN) when E ≫ kT', () => {
    // e^-(1 eV / (k · 10 mK)) = e^-1160.45 underflows double precision.
    expect(thermalPopulation(ELEMENTARY_CHARGE, 0.01, 1)).toBe(0);
  });

  it('defaults to degeneracy 1', () => {
    expect(thermalPopulation(100 * ueV, 0.1)).toBe(thermalPopulation(100 * ueV, 0.1, 1));
  });
});
