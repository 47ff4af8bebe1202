/**
 * Rates of a two-state chain from its step matrix (src/fit/rates.ts) against the matrix
 * exponential P = exp(Q·Δt) (src/classify/matrix-exponential.ts, itself checked against
 * scipy.linalg.expm in test/classify/matrix-exponential.test.ts).
 */
import { describe, expect, it } from 'vitest';
import { matrixExponential } from '../../src/classify/matrix-exponential.ts';
import { ratesFromStep, stepFromRates } from '../../src/fit/rates.ts';

describe('two-state rates and step matrices', () => {
  it.each([[0, 1e4, 1.6e-6], [2e3, 1e4, 1.6e-6], [5e5, 3e5, 1e-6], [0, 0, 1e-6]])('rates up %s, down %s /s over %s s', (up, down, dt) => {
    const p = matrixExponential(Float64Array.from([-up * dt, up * dt, down * dt, -down * dt]), 2);
    const step = stepFromRates(up, down, dt);
    for (let i = 0; i < 4; i++) expect(Math.abs(step[i]! - p[i]!)).toBeLessThan(1e-14);
    const back = ratesFromStep(p[1]!, p[2]!, dt);
    expect(Math.abs(back.up - up)).toBeLessThanOrEqual(1e-9 * Math.max(1, up));
    expect(Math.abs(back.down - down)).toBeLessThanOrEqual(1e-9 * Math.max(1, down));
  });
});
