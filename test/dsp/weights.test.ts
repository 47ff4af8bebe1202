import { describe, expect, it } from 'vitest';
import {
  boxcarWeights,
  choleskyFactor,
  choleskySolve,
  matchedWeights,
  noiseCovariance,
  optimalLinearWeights,
} from '../../src/dsp/weights.ts';
import { makeSeededSource } from '../classify/seeded-normal.ts';

const dot = (a: Float64Array, b: Float64Array): number => {
  let s = 0;
  for (let k = 0; k < a.length; k++) s += a[k]! * b[k]!;
  return s;
};
const sum = (a: Float64Array): number => a.reduce((s, v) => s + v, 0);

/** wᵀ·C·w for an n×n row-major C. */
function quadratic(w: Float64Array, c: Float64Array): number {
  const n = w.length;
  let s = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) s += w[i]! * c[i * n + j]! * w[j]!;
  return s;
}

/** Fisher criterion (separation over noise, squared) of weights w: (wᵀΔμ)² / (wᵀCw). */
const fisher = (w: Float64Array, dm: Float64Array, c: Float64Array): number => dot(w, dm) ** 2 / quadratic(w, c);

/** Stationary AR(1) covariance σ²·ρ^|i−j|. */
function ar1Covariance(n: number, variance: number, rho: number): Float64Array {
  const c = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) c[i * n + j] = variance * rho ** Math.abs(i - j);
  return c;
}

function close(label: string, actual: number, expected: number, tolerance: number): void {
  const delta = Math.abs(actual - expected);
  if (!(delta <= tolerance)) throw new Error(`${label}: actual ${actual}, expected ${expected}, Δ ${delta}, tol ${tolerance}`);
}

describe('boxcarWeights', () => {
  it('is 1/length on the window and sums to one', () => {
    expect(Array.from(boxcarWeights(8, 2, 4))).toEqual([0, 0, 0.25, 0.25, 0.25, 0.25, 0, 0]);
    expect(sum(boxcarWeights(1000, 100, 300))).toBeCloseTo(1, 13);
  });
  it('writes into a given output, clearing it first', () => {
    const out = new Float64Array(4).fill(7);
    expect(boxcarWeights(4, 0, 2, out)).toBe(out);
    expect(Array.from(out)).toEqual([0.5, 0.5, 0, 0]);
  });
  it.each([
    [8, -1, 2],
    [8, 6, 3],
    [8, 0, 0],
  ])('rejects n %s, start %s, length %s', (n, start, length) => {
    expect(() => boxcarWeights(n, start, length)).toThrow(RangeError);
  });
});

describe('matchedWeights', () => {
  it.each([
    ['decaying', Float64Array.from({ length: 50 }, (_, k) => 2e-9 * Math.exp(-k / 12))],
    ['negative separation', Float64Array.from({ length: 20 }, (_, k) => -0.3 - 0.01 * k)],
    ['ring-up', Float64Array.from({ length: 30 }, (_, k) => 1 - Math.exp(-k / 4))],
  ])('%s: w ∝ Δμ and Σ w·Δμ = mean(Δμ)', (name, dm) => {
    const w = matchedWeights(dm);
    const boxcarSeparation = sum(dm) / dm.length;
    close(`${name} Σ w·Δμ`, dot(w, dm), boxcarSeparation, 1e-13 * Math.abs(boxcarSeparation));
    const last = dm.length - 1;
    const ratio = w[last]! / dm[last]!;
    for (let k = 0; k < dm.length; k++) close(`${name} w[${k}]`, w[k]!, ratio * dm[k]!, 1e-13 * Math.abs(w[last]!));
  });
  it('rejects a zero mean difference', () => {
    expect(() => matchedWeights(new Float64Array(5))).toThrow(RangeError);
  });

  it('on a demodulated sine carrier with white noise, the noise-weighted template is the boxcar; Δμ alone keeps 3/√10 of its SNR (the algebra in dsp/weights.ts)', () => {
    // 200 samples over whole carrier periods: Δμ_k = 2·cos²θ_k (ΔL = 1), v_k = 4σ²·cos²θ_k (σ = 3)
    const n = 200, theta = (k: number) => (2 * Math.PI * k) / 20 + 0.3;
    const dm = Float64Array.from({ length: n }, (_, k) => 2 * Math.cos(theta(k)) ** 2);
    const v = Float64Array.from({ length: n }, (_, k) => 36 * Math.cos(theta(k)) ** 2);
    const snr = (w: Float64Array) => dot(w, dm) / Math.sqrt(dot(w, Float64Array.from(w, (x, k) => x * v[k]!)));
    const boxcar = snr(new Float64Array(n).fill(1 / n));
    close('noise-weighted / boxcar', snr(matchedWeights(dm, v)) / boxcar, 1, 1e-12);
    close('Δμ alone / boxcar', snr(matchedWeights(dm)) / boxcar, 3 / Math.sqrt(10), 1e-12);
  });
});

describe('choleskyFactor and choleskySolve', () => {
  it('factors a 2×2 by hand: [[4, 2], [2, 3]] = L·Lᵀ with L = [[2, 0], [1, √2]]', () => {
    const l = choleskyFactor(Float64Array.of(4, 2, 2, 3), 2);
    expect(Array.from(l)).toEqual([2, 0, 1, Math.SQRT2]);
  });
  it('rejects a matrix that is not positive definite', () => {
    expect(() => choleskyFactor(Float64Array.of(1, 2, 2, 1), 2)).toThrow(RangeError);
  });
  it('solves a random 60×60 SPD system to a small residual', () => {
    const n = 60;
    const source = makeSeededSource('spd');
    const g = Float64Array.from({ length: n * n }, () => source.normal());
    const c = new Float64Array(n * n); // C = G·Gᵀ/n + I
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        let s = 0;
        for (let k = 0; k < n; k++) s += g[i * n + k]! * g[j * n + k]!;
        c[i * n + j] = s / n + (i === j ? 1 : 0);
      }
    }
    const b = Float64Array.from({ length: n }, () => source.normal());
    const x = choleskySolve(choleskyFactor(c, n), b);
    for (let i = 0; i < n; i++) {
      let r = -b[i]!;
      for (let j = 0; j < n; j++) r += c[i * n + j]! * x[j]!;
      expect(Math.abs(r), `residual row ${i}`).toBeLessThan(1e-12);
    }
  });
});

describe('optimalLinearWeights', () => {
  it('equals the matched filter for white noise', () => {
    const n = 40;
    const dm = Float64Array.from({ length: n }, (_, k) => Math.exp(-k / 10) + 0.2);
    const c = new Float64Array(n * n);
    for (let i = 0; i < n; i++) c[i * n + i] = 2.5;
    const w = optimalLinearWeights(dm, c);
    const m = matchedWeights(dm);
    for (let k = 0; k < n; k++) close(`w[${k}]`, w[k]!, m[k]!, 1e-14);
  });

  // AR(1) covariance σ²ρ^|i−j| has the tridiagonal inverse (1/(σ²(1−ρ²)))·tridiag(−ρ; 1, 1+ρ², …,
  // 1+ρ², 1; −ρ) (from memory; the residual C·u = Δμ is checked too).
  it.each([0.3, 0.8, 0.95])('AR(1) noise, ρ = %s: direction C⁻¹Δμ in closed form', (rho) => {
    const n = 80;
    const variance = 4;
    const dm = Float64Array.from({ length: n }, (_, k) => Math.exp(-k / 25));
    const c = ar1Covariance(n, variance, rho);
    const w = optimalLinearWeights(dm, c);
    const u = new Float64Array(n);
    for (let k = 0; k < n; k++) {
      const diagonal = k === 0 || k === n - 1 ? 1 : 1 + rho * rho;
      u[k] = (diagonal * dm[k]! - rho * (k > 0 ? dm[k - 1]! : 0) - rho * (k < n - 1 ? dm[k + 1]! : 0)) / (variance * (1 - rho * rho));
    }
    const scale = dot(w, dm) / dot(u, dm);
    for (let k = 0; k < n; k++) close(`ρ ${rho} w[${k}]`, w[k]!, scale * u[k]!, 1e-10 * Math.max(...w.map(Math.abs)));
    close(`ρ ${rho} Σ w·Δμ`, dot(w, dm), sum(dm) / n, 1e-12);
    // Fisher (Ann. Eugen. 7, 179, 1936): C⁻¹Δμ maximises (wᵀΔμ)²/(wᵀCw), the maximum being ΔμᵀC⁻¹Δμ.
    close(`ρ ${rho} Fisher criterion`, fisher(w, dm, c), dot(u, dm), 1e-9 * dot(u, dm));
    expect(fisher(matchedWeights(dm), dm, c)).toBeLessThan(fisher(w, dm, c));
    expect(fisher(boxcarWeights(n, 0, n), dm, c)).toBeLessThan(fisher(w, dm, c));
  });

  // Gambetta et al., Phys. Rev. A 76, 012325 (2007): with white noise the optimal linear weights
  // decay as e^(−t/T1). Derivation of the mean difference: the ground state stays at μ0 (no
  // excitation); the excited state survives to time t with probability e^(−t/T1) and is at μ0
  // afterwards, so its mean trace is μ0 + Δ·e^(−t/T1) and Δμ(t) = Δ·e^(−t/T1). Sampled at bin
  // centres t_k = (k + ½)·dt (a bin average only multiplies every bin by the same factor
  // (T1/dt)·(e^(dt/2T1) − e^(−dt/2T1))). With C = σ²·I, w ∝ C⁻¹Δμ ∝ e^(−t/T1).
  it.each([
    // [T1 over window, bins]
    [0.2, 100],
    [1, 200],
    [5, 50],
  ])('T1 = %s × window, %s bins: fitted decay time within 1 %', (ratio, n) => {
    const dt = 10e-9;
    const t1 = ratio * n * dt;
    const separation = 3e-10;
    const sigma = 2e-9;
    const t = Float64Array.from({ length: n }, (_, k) => (k + 0.5) * dt);
    const dm = t.map((tk) => separation * Math.exp(-tk / t1));
    const c = new Float64Array(n * n);
    for (let i = 0; i < n; i++) c[i * n + i] = sigma * sigma;
    const w = optimalLinearWeights(dm, c);
    // Least-squares line through (t_k, ln w_k): slope −1/T1.
    let st = 0, sl = 0, stt = 0, stl = 0;
    for (let k = 0; k < n; k++) {
      const l = Math.log(w[k]!);
      st += t[k]!;
      sl += l;
      stt += t[k]! * t[k]!;
      stl += t[k]! * l;
    }
    const slope = (n * stl - st * sl) / (n * stt - st * st);
    const fitted = -1 / slope;
    const relative = Math.abs(fitted / t1 - 1);
    expect(relative, `fitted T1 ${fitted} s, expected ${t1} s, tolerance 1 %`).toBeLessThan(0.01);
  });

  it('rejects a covariance of the wrong size', () => {
    expect(() => optimalLinearWeights(new Float64Array(3).fill(1), new Float64Array(4))).toThrow(RangeError);
  });
});

describe('noiseCovariance', () => {
  // By hand: records (1, 2), (3, 6), (5, 4) about mean (3, 4) → deviations (−2, −2), (0, 2), (2, 0);
  // Σ outer products = [[8, 4], [4, 8]]; divided by R − ddof.
  it.each([
    [1, [4, 2, 2, 4]],
    [0, [8 / 3, 4 / 3, 4 / 3, 8 / 3]],
  ])('hand example, ddof %s', (ddof, expected) => {
    const c = noiseCovariance(Float64Array.of(1, 2, 3, 6, 5, 4), Float64Array.of(3, 4), ddof);
    for (let k = 0; k < 4; k++) close(`ddof ${ddof} entry ${k}`, c[k]!, expected[k]!, 1e-15);
  });

  it.each([
    ['a partial record', Float64Array.of(1, 2, 3), 1],
    ['one record with ddof 1', Float64Array.of(1, 2), 1],
  ])('rejects %s', (_name, records, ddof) => {
    expect(() => noiseCovariance(records, Float64Array.of(0, 0), ddof)).toThrow(RangeError);
  });

  // Monte Carlo: stationary AR(1) noise of variance σ² and correlation ρ per bin, R records.
  // Each entry of the sample covariance (Wishart) has variance (C_ij² + C_ii·C_jj)/(R − 1)
  // (from memory); every entry must lie within 5 standard deviations.
  const n = 30;
  const records = 6000;
  const variance = 2.25;
  const rho = 0.6;
  const source = makeSeededSource('ar1 noise');
  const data = new Float64Array(n * records);
  const innovation = Math.sqrt(variance * (1 - rho * rho));
  for (let r = 0; r < records; r++) {
    let x = Math.sqrt(variance) * source.normal();
    for (let k = 0; k < n; k++) {
      if (k > 0) x = rho * x + innovation * source.normal();
      data[r * n + k] = 2 + 0.1 * k + x; // a mean trace that is not zero
    }
  }
  const mean = new Float64Array(n);
  for (let r = 0; r < records; r++) for (let k = 0; k < n; k++) mean[k]! += data[r * n + k]! / records;
  const estimate = noiseCovariance(data, mean);
  const truth = ar1Covariance(n, variance, rho);

  it(`AR(1) noise, ${records} records of ${n} bins (seed "ar1 noise"): every entry within 5 sd`, () => {
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const sd = Math.sqrt((truth[i * n + j]! ** 2 + variance * variance) / (records - 1));
        close(`C[${i}][${j}]`, estimate[i * n + j]!, truth[i * n + j]!, 5 * sd);
      }
    }
  });

  it('weights from the estimated covariance keep ≥ 97 % of the optimal Fisher criterion', () => {
    // The expected loss with an estimated covariance is about n/R = 0.5 % (common practice, no source);
    // no linear weights can exceed the optimum (Fisher 1936).
    const dm = Float64Array.from({ length: n }, (_, k) => Math.exp(-k / 8));
    const best = fisher(optimalLinearWeights(dm, truth), dm, truth);
    const achieved = fisher(optimalLinearWeights(dm, estimate), dm, truth);
    expect(achieved, `achieved ${achieved}, optimum ${best}`).toBeLessThanOrEqual(best * (1 + 1e-12));
    expect(achieved, `achieved ${achieved}, optimum ${best}`).toBeGreaterThan(0.97 * best);
  });
});
