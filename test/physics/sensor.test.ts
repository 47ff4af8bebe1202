import { describe, expect, it } from 'vitest';
import { BOLTZMANN, ELEMENTARY_CHARGE } from '../../src/physics/constants.ts';
import {
  biasRelaxationRate,
  chargeSignal,
  sensorConductance,
  sensorConductancePeak,
  sensorCurrent,
  sensorPlateauCurrent,
  sensorSlope,
  steepestDetuning,
  type SensorParams,
} from '../../src/physics/sensor.ts';

// Demo sensor (invented): Γ_L = 2 GHz, Γ_R = 3 GHz, 100 mK.
const temperature = 0.1;
const kT = BOLTZMANN * temperature;
const base: SensorParams = { gammaL: 2e9, gammaR: 3e9, temperature, bias: 0 };
/** Bias (V) for a given eV in units of kT. */
const biasFor = (evOverKT: number) => (evOverKT * kT) / ELEMENTARY_CHARGE;

/** Conductance by central finite difference of the current in V. */
function numericConductance(p: SensorParams, detuning: number): number {
  const dv = biasFor(1e-4);
  return (
    (sensorCurrent({ ...p, bias: p.bias + dv }, detuning) - sensorCurrent({ ...p, bias: p.bias - dv }, detuning)) /
    (2 * dv)
  );
}

describe('sensor dot current (Beenakker, Phys. Rev. B 44, 1646 (1991))', () => {
  it('carries no current at zero bias, at any detuning', () => {
    for (const e of [-10, -1, 0, 0.3, 5, 40]) expect(sensorCurrent(base, e * kT)).toBe(0);
  });

  it('reaches the plateau e·Γ_LΓ_R/(Γ_L+Γ_R) with the level deep in the bias window', () => {
    const p = { ...base, bias: biasFor(200) };
    const plateau = (ELEMENTARY_CHARGE * 2e9 * 3e9) / 5e9; // e·Γ_LΓ_R/(Γ_L+Γ_R) = 1.2e9·e ≈ 192 pA
    expect(sensorPlateauCurrent(p)).toBeCloseTo(plateau, 25);
    expect(Math.abs(sensorCurrent(p, 0) / plateau - 1)).toBeLessThan(1e-12);
    // reversed bias reverses the current; I is even in ε
    expect(sensorCurrent({ ...p, bias: -p.bias }, 3 * kT)).toBeCloseTo(-sensorCurrent(p, 3 * kT), 25);
    expect(sensorCurrent(p, -30 * kT)).toBe(sensorCurrent(p, 30 * kT));
  });

  it('small-bias conductance has FWHM 3.53 kT within 1 % (Beenakker 1991)', () => {
    // G ∝ cosh⁻²(ε/2kT); cosh⁻²(x) = ½ ⇔ cosh x = √2 ⇔ x = ln(1 + √2), so the FWHM in ε is
    // 2·2kT·ln(1 + √2) = 2·ln((1 + √2)²)·kT = 2·ln(3 + 2√2)·kT = 3.5255 kT.
    const p = { ...base, bias: biasFor(1e-3) }; // eV = 0.001 kT ≪ kT
    const peak = numericConductance(p, 0);
    let lo = 0;
    let hi = 10 * kT;
    for (let i = 0; i < 100; i++) {
      const mid = (lo + hi) / 2;
      if (numericConductance(p, mid) > peak / 2) lo = mid;
      else hi = mid;
    }
    const fwhm = (2 * (lo + hi)) / 2 / kT;
    expect(Math.abs(fwhm / 3.53 - 1), `FWHM ${fwhm} kT, published ≈ 3.53 kT, tol 1 %`).toBeLessThan(0.01);
    expect(sensorConductancePeak(p).fwhm / kT).toBeCloseTo(3.5255, 4);
    // the helper's height is the linear-response peak e²Γ/(4kT)
    const height = sensorConductancePeak(p).height;
    expect(Math.abs(peak / height - 1), `numeric peak ${peak} S vs e²Γ/4kT ${height} S`).toBeLessThan(1e-6);
  });

  it.each([0, 0.5, 3, 20])('analytic dI/dV and dI/dε match finite differences, eV = %f kT', (ev) => {
    const p = { ...base, bias: biasFor(ev) };
    for (const e of [-4, -1, 0.2, 1.5, 6]) {
      const eps = e * kT;
      const g = sensorConductance(p, eps);
      const gn = numericConductance(p, eps);
      expect(Math.abs(g - gn), `ε=${e}kT: G ${g} vs numeric ${gn}`).toBeLessThan(1e-6 * sensorConductancePeak(p).height);
      const de = 1e-4 * kT;
      const sn = (sensorCurrent(p, eps + de) - sensorCurrent(p, eps - de)) / (2 * de);
      const s = sensorSlope(p, eps);
      expect(Math.abs(s - sn), `ε=${e}kT: dI/dε ${s} vs numeric ${sn}`).toBeLessThan(1e-6 * (sensorPlateauCurrent(p) / kT));
    }
  });
});

describe('operating point and charge signal', () => {
  it('small bias: the steepest point is kT·ln(2 + √3) ≈ 1.317 kT', () => {
    // dI/dε ∝ f'(ε − eV/2) − f'(ε + eV/2) ≈ −eV·f''(ε); |f''| ∝ cosh⁻²u·tanh u (u = ε/2kT) peaks at
    // tanh u = 1/√3, i.e. ε = 2kT·artanh(1/√3) = kT·ln(2 + √3) (exact, derived here).
    const expected = Math.log(2 + Math.sqrt(3));
    for (const ev of [0, 1e-3]) {
      const got = steepestDetuning({ ...base, bias: biasFor(ev) }) / kT;
      expect(Math.abs(got - expected), `eV=${ev}kT: ${got} kT vs ${expected} kT`).toBeLessThan(1e-5);
    }
  });

  it('large bias: the steepest point is at the bias window edge eV/2', () => {
    // For eV ≫ kT the far edge contributes e^(−eV/kT): I ≈ eΓ·f(ε − eV/2), steepest where f' is, at ε = eV/2.
    const got = steepestDetuning({ ...base, bias: biasFor(40) }) / kT;
    expect(Math.abs(got - 20), `got ${got} kT, expected 20 kT`).toBeLessThan(1e-4);
    // and it is a maximum of |dI/dε|
    const p = { ...base, bias: biasFor(40) };
    const s0 = Math.abs(sensorSlope(p, got * kT));
    expect(s0).toBeGreaterThan(Math.abs(sensorSlope(p, (got + 0.05) * kT)));
    expect(s0).toBeGreaterThan(Math.abs(sensorSlope(p, (got - 0.05) * kT)));
  });

  it('signal at a fixed operating point rises, peaks and falls with bias', () => {
    // Operating point fixed at the small-bias steepest point, fixed charge shift 0.2 kT.
    const operating = steepestDetuning({ ...base, bias: biasFor(1e-3) });
    const shift = 0.2 * kT;
    const biases: number[] = [];
    for (let i = 0; i <= 60; i++) biases.push(0.01 * 10 ** (i / 15)); // eV from 0.01 kT to 100 kT
    const signal = biases.map((ev) => Math.abs(chargeSignal({ ...base, bias: biasFor(ev) }, operating, shift)));
    let peak = 0;
    for (let i = 1; i < signal.length; i++) if (signal[i]! > signal[peak]!) peak = i;
    const table = biases.map((b, i) => `${b.toPrecision(3)}:${signal[i]!.toExponential(2)}`).join(' ');
    expect(peak, `interior maximum expected; eV/kT:|ΔI| ${table}`).toBeGreaterThan(5);
    expect(peak).toBeLessThan(signal.length - 5);
    for (let i = 1; i <= peak; i++) expect(signal[i]!, `rising at eV=${biases[i]} kT`).toBeGreaterThan(signal[i - 1]!);
    // falling (non-increasing: deep in the window both currents round to the same plateau value)
    for (let i = peak + 1; i < signal.length; i++) expect(signal[i]!, `falling at eV=${biases[i]} kT`).toBeLessThanOrEqual(signal[i - 1]!);
    expect(signal[peak + 5]!, 'strictly lower a little past the peak').toBeLessThan(0.9 * signal[peak]!);
    expect(signal[0]!).toBeLessThan(0.01 * signal[peak]!);
    expect(signal[signal.length - 1]!).toBeLessThan(0.01 * signal[peak]!);
    // The peak sits where the window edge eV/2 passes the operating point (ε0 ≈ 1.3 kT): eV of a few kT.
    expect(biases[peak]!).toBeGreaterThan(1);
    expect(biases[peak]!).toBeLessThan(10);
  });

  it('charge signal is the current difference I(ε0 + shift) − I(ε0)', () => {
    const p = { ...base, bias: biasFor(2) };
    const e0 = 1.1 * kT;
    expect(chargeSignal(p, e0, 0.3 * kT)).toBe(sensorCurrent(p, e0 + 0.3 * kT) - sensorCurrent(p, e0));
    expect(chargeSignal(p, e0, 0)).toBe(0);
  });
});

describe('readout-induced relaxation law (phenomenological, no source)', () => {
  // Values follow from the definitions rate0·(|V|/V0)^n and rate0·e^(|V|/Vs).
  it.each([
    { law: { kind: 'power', rate0: 100, bias0: 1e-3, exponent: 2 } as const, bias: 1e-3, expected: 100 },
    { law: { kind: 'power', rate0: 100, bias0: 1e-3, exponent: 2 } as const, bias: -2e-3, expected: 400 },
    { law: { kind: 'power', rate0: 100, bias0: 1e-3, exponent: 0.5 } as const, bias: 4e-3, expected: 200 },
    { law: { kind: 'power', rate0: 100, bias0: 1e-3, exponent: 3 } as const, bias: 0, expected: 0 },
    { law: { kind: 'exponential', rate0: 10, scale: 2e-4 } as const, bias: 0, expected: 10 },
    { law: { kind: 'exponential', rate0: 10, scale: 2e-4 } as const, bias: -2e-4, expected: 10 * Math.E },
    { law: { kind: 'exponential', rate0: 10, scale: 2e-4 } as const, bias: 1e-3, expected: 10 * Math.exp(5) },
  ])('$law.kind law at V = $bias V', ({ law, bias, expected }) => {
    const got = biasRelaxationRate(law, bias);
    expect(Math.abs(got - expected), `got ${got}, expected ${expected}`).toBeLessThanOrEqual(1e-12 * expected);
  });
});
