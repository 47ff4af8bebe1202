/**
 * Single-level sensor dot in sequential tunnelling (Beenakker, Phys. Rev. B 44, 1646 (1991)):
 * one level at detuning ε (J, measured from the leads' common Fermi level at zero bias), tunnel
 * rates Γ_L and Γ_R (1/s) to the two leads, electron temperature T (K, > 0) in both leads, and
 * a bias V (V) split symmetrically, μ_L = +eV/2 and μ_R = −eV/2. The stationary current of the
 * rate equations is
 *
 *   I(ε) = e · Γ_L Γ_R/(Γ_L + Γ_R) · [f(ε − μ_L) − f(ε − μ_R)],   f(x) = 1/(1 + e^(x/kT)),
 *
 * positive for V > 0 (net transfer left → right). The symmetric split makes I even in ε.
 * At small bias (eV ≪ kT) the conductance is G(ε) = e²Γ/(4kT) · cosh⁻²(ε/2kT), Γ = Γ_LΓ_R/(Γ_L+Γ_R),
 * the thermally broadened Coulomb peak of Beenakker's limit Γ ≪ kT/ħ (assumed here: no
 * lifetime broadening). A charge event nearby shifts ε by the lever-arm-scaled amount `shift`;
 * the readout signal is the current change at the operating point.
 *
 * Readout-induced relaxation that grows with bias is modelled phenomenologically (no source):
 * see {@link biasRelaxationRate}. Inputs are assumed valid (checked at the scenario edge).
 */
import { BOLTZMANN, ELEMENTARY_CHARGE } from './constants.ts';

/** Parameters of the sensor dot. */
export interface SensorParams {
  /** Tunnel rate to the left lead, 1/s. */
  gammaL: number;
  /** Tunnel rate to the right lead, 1/s. */
  gammaR: number;
  /** Electron temperature of the leads, K (> 0). */
  temperature: number;
  /** Source–drain bias V, volts (μ_L = +eV/2, μ_R = −eV/2). */
  bias: number;
}

/** Fermi–Dirac occupation 1/(1 + e^(x/kT)) for energy x (J) above the chemical potential. */
function fermi(x: number, kT: number): number {
  return 1 / (1 + Math.exp(x / kT));
}

/** −df/dx = (1/4kT) cosh⁻²(x/2kT), the thermal broadening function, 1/J. */
function thermalPeak(x: number, kT: number): number {
  const c = Math.cosh(x / (2 * kT));
  return 1 / (4 * kT * c * c);
}

/** e·Γ_LΓ_R/(Γ_L+Γ_R): the plateau current (A) when the level lies deep in the bias window. */
export function sensorPlateauCurrent(params: SensorParams): number {
  const { gammaL, gammaR } = params;
  return (ELEMENTARY_CHARGE * gammaL * gammaR) / (gammaL + gammaR);
}

/** Sensor current I(ε) in A at detuning ε (J): e·Γ_LΓ_R/(Γ_L+Γ_R)·[f_L(ε) − f_R(ε)] (Beenakker 1991). */
export function sensorCurrent(params: SensorParams, detuning: number): number {
  const kT = BOLTZMANN * params.temperature;
  const half = (ELEMENTARY_CHARGE * params.bias) / 2;
  return sensorPlateauCurrent(params) * (fermi(detuning - half, kT) - fermi(detuning + half, kT));
}

/** dI/dε in A/J at detuning ε (analytic derivative of {@link sensorCurrent}). */
export function sensorSlope(params: SensorParams, detuning: number): number {
  const kT = BOLTZMANN * params.temperature;
  const half = (ELEMENTARY_CHARGE * params.bias) / 2;
  return sensorPlateauCurrent(params) * (thermalPeak(detuning + half, kT) - thermalPeak(detuning - half, kT));
}

/**
 * Differential conductance dI/dV in S at detuning ε and the params' bias (analytic):
 * (e/2)·eΓ·[g(ε − eV/2) + g(ε + eV/2)] with g = (1/4kT)cosh⁻²(x/2kT).
 */
export function sensorConductance(params: SensorParams, detuning: number): number {
  const kT = BOLTZMANN * params.temperature;
  const half = (ELEMENTARY_CHARGE * params.bias) / 2;
  const g = thermalPeak(detuning - half, kT) + thermalPeak(detuning + half, kT);
  return (ELEMENTARY_CHARGE / 2) * sensorPlateauCurrent(params) * g;
}

/** Height and width of the small-bias conductance peak G(ε) = e²Γ/(4kT)·cosh⁻²(ε/2kT). */
export interface ConductancePeak {
  /** Peak conductance e²Γ_LΓ_R/((Γ_L+Γ_R)·4kT), S, at ε = 0. */
  height: number;
  /** Full width at half maximum in ε, J: 2·ln(3 + 2√2)·kT ≈ 3.5255 kT. */
  fwhm: number;
}

/**
 * Linear-response (eV ≪ kT) conductance peak of the sensor, ignoring `bias`: height e²Γ/(4kT)
 * and FWHM 2·ln(3 + 2√2)·kT, from cosh⁻²(x) = ½ at x = ln(1 + √2) (Beenakker 1991).
 */
export function sensorConductancePeak(params: SensorParams): ConductancePeak {
  const kT = BOLTZMANN * params.temperature;
  return {
    height: (ELEMENTARY_CHARGE * sensorPlateauCurrent(params)) / (4 * kT),
    fwhm: 2 * Math.log(3 + 2 * Math.SQRT2) * kT,
  };
}

const GOLDEN = (Math.sqrt(5) - 1) / 2;

/** Maximises a unimodal h on [a, b] by golden-section search; returns the argmax. */
function goldenMax(h: (x: number) => number, a: number, b: number, tolerance: number): number {
  let lo = a;
  let hi = b;
  let x1 = hi - GOLDEN * (hi - lo);
  let x2 = lo + GOLDEN * (hi - lo);
  let h1 = h(x1);
  let h2 = h(x2);
  while (hi - lo > tolerance) {
    if (h1 < h2) {
      lo = x1;
      x1 = x2;
      h1 = h2;
      x2 = lo + GOLDEN * (hi - lo);
      h2 = h(x2);
    } else {
      hi = x2;
      x2 = x1;
      h2 = h1;
      x1 = hi - GOLDEN * (hi - lo);
      h1 = h(x1);
    }
  }
  return (lo + hi) / 2;
}

/**
 * Operating point of maximum |dI/dε| on the positive-detuning flank (I is even in ε, so −ε* is
 * the mirror point with the opposite slope), in J. Found numerically: a grid over
 * [0, |eV|/2 + 30kT] locates the maximum, golden-section search refines it to 1e−9·kT.
 * At zero bias the slope vanishes everywhere; the small-bias limit is returned instead (the
 * maximum of |d²f/dε²|, whose value is kT·ln(2 + √3)).
 */
export function steepestDetuning(params: SensorParams): number {
  const kT = BOLTZMANN * params.temperature;
  const half = Math.abs((ELEMENTARY_CHARGE * params.bias) / 2);
  // |dI/dε| at zero bias is 0; its small-bias shape is |d/dε g(ε)|, maximised directly.
  const objective =
    half === 0
      ? (e: number) => Math.abs(thermalPeak(e + 1e-4 * kT, kT) - thermalPeak(e - 1e-4 * kT, kT))
      : (e: number) => Math.abs(thermalPeak(e + half, kT) - thermalPeak(e - half, kT));
  const top = half + 30 * kT;
  const steps = 3000;
  let best = 0;
  let bestValue = -1;
  for (let i = 0; i <= steps; i++) {
    const value = objective((top * i) / steps);
    if (value > bestValue) {
      bestValue = value;
      best = i;
    }
  }
  const a = (top * Math.max(0, best - 1)) / steps;
  const b = (top * Math.min(steps, best + 1)) / steps;
  return goldenMax(objective, a, b, 1e-9 * kT);
}

/** Current change (A) when a charge event shifts the detuning from ε0 to ε0 + shift (J). */
export function chargeSignal(params: SensorParams, operatingDetuning: number, shift: number): number {
  return sensorCurrent(params, operatingDetuning + shift) - sensorCurrent(params, operatingDetuning);
}

/**
 * A phenomenological law (no published source) for the relaxation rate that the readout itself
 * induces as a function of bias: `power` rate0·(|V|/bias0)^exponent, `exponential`
 * rate0·e^(|V|/scale). Rates in 1/s, bias0 and scale in V.
 */
export type BiasRelaxationLaw =
  | { kind: 'power'; rate0: number; bias0: number; exponent: number }
  | { kind: 'exponential'; rate0: number; scale: number };

/** Readout-induced relaxation rate (1/s) at bias V under a phenomenological law (no source). */
export function biasRelaxationRate(law: BiasRelaxationLaw, bias: number): number {
  const v = Math.abs(bias);
  switch (law.kind) {
    case 'power':
      return law.rate0 * Math.pow(v / law.bias0, law.exponent);
    case 'exponential':
      return law.rate0 * Math.exp(v / law.scale);
  }
}
