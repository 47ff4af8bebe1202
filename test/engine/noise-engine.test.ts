/**
 * The noise sources inside the engine: telegraph histograms, independence of batching, the
 * noise budget adding up, and the run's analytic σ being the prediction.
 */
import { describe, expect, it } from 'vitest';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { makeScratch, simulateBatch } from '../../src/engine/trace/batch.ts';
import { runPoints } from '../../src/run/run-points.ts';
import { chiSquareTest } from '../support/chi-square.ts';
import { wilsonInterval } from '../../src/analysis/intervals.ts';
import { gaussianTail, normalCdf } from '../../src/analysis/special.ts';
import { parseScenarioText } from '../../src/scenario/parse.ts';
import { resolveScenario } from '../../src/scenario/resolve.ts';
import type { Scenario } from '../../src/scenario/types.ts';
import { flicker, fluctuator, noiseScenario, runNoise } from '../support/noise-helpers.ts';

describe('telegraph noise through the engine (two-level fluctuator; Machlup, J. Appl. Phys. 25, 341 (1954))', () => {
  it('the histogram has the side peak at the amplitude with the weight the occupation predicts (χ², fixed seed)', () => {
    const up = 300, down = 700, a = 1; // π = 0.3
    const sigmaValue = 0.1; // σ of the integrated value from white noise: per-sample σ·/√200
    const sc = noiseScenario({
      carrier: 'none', white: sigmaValue * Math.sqrt(200), shotPeriod: 10e-3, levels: [0, 5],
      signal: { sources: [fluctuator('trap', a, up, down, 'amplifier')] },
    });
    sc.prepare = [1, 0]; // the ground state only: its histogram is the fluctuator's
    const run = runNoise(sc);
    const v = run.values[0]!;
    const pi = up / (up + down);
    const R = 20e-6;
    // no switch during the record: at 0 or at a; one switch (the rest, O((λR)²) neglected): the
    // value a·(time in the upper state)/R is uniform on [0, a]
    const p0 = (1 - pi) * Math.exp(-up * R), p1 = pi * Math.exp(-down * R), pSwitch = 1 - p0 - p1;
    const uniformCdf = (x: number) => {
      let s = 0;
      const m = 400;
      for (let i = 0; i < m; i++) s += normalCdf(x, ((i + 0.5) / m) * a, sigmaValue);
      return s / m;
    };
    const cdf = (x: number) => p0 * normalCdf(x, 0, sigmaValue) + p1 * normalCdf(x, a, sigmaValue) + pSwitch * uniformCdf(x);
    const edges = Array.from({ length: 41 }, (_, i) => -0.5 + i * 0.05);
    const observed = new Array<number>(edges.length + 1).fill(0);
    for (const x of v) {
      let b = 0;
      while (b < edges.length && x >= edges[b]!) b++;
      observed[b]!++;
    }
    const probabilities = observed.map((_, b) => (b === edges.length ? 1 : cdf(edges[b]!)) - (b === 0 ? 0 : cdf(edges[b - 1]!)));
    const test = chiSquareTest(observed, probabilities);
    expect(test.pValue, `χ² ${test.statistic} on ${test.dof} dof, p ${test.pValue} (need > 0.001)`).toBeGreaterThan(0.001);
    // the side peak's weight: P(value > a/2) = p1 + pSwitch/2
    const high = v.filter((x) => x > a / 2).length;
    const ci = wilsonInterval(high, v.length, 0.999);
    const expected = p1 + pSwitch / 2;
    expect(expected, `side peak ${high}/${v.length}, interval [${ci.low}, ${ci.high}]`).toBeGreaterThan(ci.low);
    expect(expected).toBeLessThan(ci.high);
  });
});

describe('the analytic budget with a slow fluctuator is a mixture, not a Gaussian (analysis/noise-budget.ts)', () => {
  it('per-state errors agree with the mixture budget and not with a Gaussian of the same σ', async () => {
    // levels 0 and 1, σ 0.2 from white noise, a fluctuator of 0.5 at π = 0.3 that never switches in a window
    const sc = noiseScenario({
      carrier: 'none', white: 0.2 * Math.sqrt(200), shotPeriod: 10e-3, levels: [0, 1],
      signal: { sources: [fluctuator('trap', 0.5, 30, 70, 'amplifier')] },
    });
    const result = await runPoints([{ parameters: {}, scenario: sc }]);
    const s = result.points[0]!.summaries[0]!;
    const sigma = Math.sqrt(0.2 ** 2 + 0.25 * 0.3 * 0.7);
    expect(s.analyticSigma).toBeCloseTo(sigma, 3);
    const gaussian = gaussianTail(0.5 / sigma); // Q(Δ/2σ) at the midpoint
    for (const st of s.states) {
      expect(st.agrees, `${st.state}: simulated ${st.error.rate} [${st.error.low}, ${st.error.high}], mixture ${st.analyticTotal}`).toBe(true);
    }
    // the lower state's errors come from the fluctuator's upper state: far above the Gaussian value
    const low = s.states[0]!;
    expect(low.error.low, `simulated ${low.error.rate}, Gaussian ${gaussian}`).toBeGreaterThan(gaussian);
  });
});

describe('slow noise does not depend on batching (continuous timelines, random access)', () => {
  it.each([true, false])('batch size 1024 and 4096 give identical values, scored and calibration shots (digitizer: %s)', (withDigitizer) => {
    const make = (batchSize: number): Scenario => noiseScenario({
      carrier: 'sine', white: 0.5, t1: 50e-6, shots: 4096, batchSize, shotPeriod: 37e-6,
      signal: {
        sources: [
          flicker('sensor', 1e-3, 50, 300e3), flicker('amplifier', 2e-3, 10, 100e3, 1.2),
          fluctuator('fast', 0.2, 2e4, 3e4, 'sensor'), fluctuator('slow', -0.3, 20, 50, 'amplifier'),
        ],
        response: { timeConstant: 0.3e-6, from: 'zero' },
        digitizer: withDigitizer ? { low: -4, high: 4, bits: 10 } : null,
      },
    });
    const collect = (sc: Scenario, purpose: 'score' | 'calibrate') => {
      const point = compilePoint(sc);
      const scratch = makeScratch(point);
      const inPhase: number[] = [], quadrature: number[] = [];
      for (let b = 0; b * sc.batchSize < sc.shots; b++) {
        const r = simulateBatch(point, 0, purpose, b, Math.min(sc.batchSize, sc.shots - b * sc.batchSize), scratch);
        inPhase.push(...r.values[0]!.inPhase);
        quadrature.push(...r.values[0]!.quadrature);
      }
      return [...inPhase, ...quadrature];
    };
    for (const purpose of ['score', 'calibrate'] as const) {
      const small = collect(make(1024), purpose);
      const large = collect(make(4096), purpose);
      expect(small.length).toBe(2 * 4096);
      let differ = 0;
      for (let i = 0; i < small.length; i++) if (small[i] !== large[i]) differ++;
      expect(differ, `${purpose}: values that differ between batch sizes`).toBe(0);
    }
  });

  it('keeping traces changes no value, and the kept records carry the 1/f noise', () => {
    const sc = noiseScenario({ carrier: 'sine', white: 0.05, shots: 1024, batchSize: 1024, shotPeriod: 50e-6, signal: { sources: [flicker('sensor', 1e-2, 100, 100e3)] } });
    const plain = simulateBatch(compilePoint(sc), 0, 'score', 0, 1024);
    const kept = simulateBatch(compilePoint(sc, { keepTraces: 'raw' }), 0, 'score', 0, 1024);
    expect(Array.from(kept.values[0]!.inPhase)).toEqual(Array.from(plain.values[0]!.inPhase));
    // each kept record integrates (Σ K·record, float32 samples) to the shot's value, 1/f included
    const point = compilePoint(sc);
    const k = point.pipelines[0]!.kernels;
    const n = point.grid.samples;
    let worst = 0;
    for (let i = 0; i < 64; i++) {
      let v = 0;
      for (let j = k.lo; j < k.hi; j++) v += k.inPhase[j]! * kept.traces!.data[i * n + j]!;
      worst = Math.max(worst, Math.abs(v - plain.values[0]!.inPhase[i]!));
    }
    const run = runNoise({ ...sc, shots: 1024 });
    expect(worst, `largest |Σ K·trace − value| over 64 shots; σ of the value ${run.sigma}`).toBeLessThan(1e-5 * (1 + run.sigma));
  });

  it('a batch run alone (a worker or shard) gives the values it gives in sequence', () => {
    const sc = noiseScenario({ carrier: 'none', shots: 8192, batchSize: 2048, shotPeriod: 50e-6, signal: { sources: [flicker('sensor', 1e-3, 5, 100e3)] } });
    const point = compilePoint(sc);
    const scratch = makeScratch(point);
    const sequence = [0, 1, 2, 3].map((b) => simulateBatch(point, 0, 'score', b, 2048, scratch).values[0]!.inPhase);
    const alone = simulateBatch(compilePoint(sc), 0, 'score', 3, 2048).values[0]!.inPhase;
    expect(Array.from(alone)).toEqual(Array.from(sequence[3]!));
  });
});

describe('noise budget from components', () => {
  const yaml = `
name: components
seed: 9
shots: 20480
calibrationShots: 4096
timing: { sampleRate: 10 MHz, recordLength: 20 us }
states:
  - { name: low, level: 0 nA, outcome: "0" }
  - { name: high, level: 1 nA, outcome: "1" }
signal:
  noise:
    white: { density: 10 fA/rtHz }
    components:
      senseResistor: 1 MOhm
      temperature: 4 K
      sensorCurrent: 1 nA
      amplifierVoltage: 8 nV/rtHz
      amplifierCurrent: 6 fA/rtHz
    flicker: { name: charge, density: 2 pA/rtHz, low: 100 Hz, high: 200 kHz, injection: sensor }
`;
  const scenario = resolveScenario(parseScenarioText(yaml, 'components.yaml'), 'components.yaml').scenario;

  it('Johnson and shot densities are those of CHECKS.md; the sources add up to the total', () => {
    const run = runNoise({ ...scenario, timing: { ...scenario.timing, shotPeriod: 100e-6 } });
    const by = Object.fromEntries(run.prediction.sources.map((s) => [s.name, s]));
    // Johnson, Phys. Rev. 32, 97 (1928): 1 MΩ at 4 K → 14.86 fA/√Hz; Schottky, Ann. Phys. 57, 541 (1918): 1 nA → 17.90 fA/√Hz
    expect(by.johnson!.density).toBeCloseTo(14.86e-15, 17);
    expect(by.shot!.density).toBeCloseTo(17.90e-15, 17);
    expect(by.amplifierVoltage!.density).toBeCloseTo(8e-15, 20); // 8 nV/√Hz over 1 MΩ
    expect(Object.keys(by).sort()).toEqual(['amplifierCurrent', 'amplifierVoltage', 'charge', 'johnson', 'shot', 'white']);
    const sum = run.prediction.sources.reduce((a, s) => a + s.variance, 0);
    const shares = run.prediction.sources.reduce((a, s) => a + s.share, 0);
    expect(Math.abs(sum / run.prediction.variance - 1)).toBeLessThan(1e-12);
    expect(Math.abs(shares - 1)).toBeLessThan(1e-12);
    // and the simulated σ with all of them on is their root-sum-square (3 %)
    expect(Math.abs(run.sigma / run.prediction.sigma - 1), `simulated ${run.sigma}, predicted ${run.prediction.sigma}`).toBeLessThan(0.03);
  });

  it('the run\'s analytic budget uses the predicted total σ', async () => {
    const sc = { ...scenario, timing: { ...scenario.timing, shotPeriod: 100e-6 } };
    const result = await runPoints([{ parameters: {}, scenario: sc }]);
    const s = result.points[0]!.summaries[0]!;
    const predicted = runNoise({ ...sc, shots: 1024 }).prediction.sigma;
    expect(Math.abs(s.analyticSigma / predicted - 1), `analytic σ ${s.analyticSigma}, prediction ${predicted}`).toBeLessThan(1e-9);
    expect(Math.abs(s.sigma / s.analyticSigma - 1), `simulated σ ${s.sigma}, analytic ${s.analyticSigma}`).toBeLessThan(0.03);
  });
});

describe('noise results in the outputs', () => {
  it('--json has noiseBudget and predictedSigma, summary.arrow one σ and one share column per source, clipping is counted and warned', async () => {
    const { mkdtempSync, writeFileSync, rmSync } = await import('node:fs');
    const { tmpdir } = await import('node:os');
    const { join } = await import('node:path');
    const { runToDirectory } = await import('../../src/app/run-to-directory.ts');
    const { resultToJson } = await import('../../src/app/result-json.ts');
    const { summaryColumns } = await import('../../src/io/tables/summary.ts');
    const dir = mkdtempSync(join(tmpdir(), 'noise-out-'));
    try {
      const file = join(dir, 'clip.yaml');
      writeFileSync(file, `
name: clipping
seed: 4
shots: 2048
calibrationShots: 2048
timing: { sampleRate: 10 MHz, recordLength: 10 us }
states:
  - { name: low, level: 0 pA, outcome: "0" }
  - { name: high, level: 100 pA, outcome: "1" }
signal:
  digitizer: { low: -150 pA, high: 150 pA, bits: 8 }
  noise:
    white: { perSample: 60 pA }
    flicker: { name: drift, density: 20 pA/rtHz, low: 10 Hz, high: 100 kHz, injection: sensor }
`);
      const warnings: string[] = [];
      const { result } = await runToDirectory({ scenarioPath: file, outDir: join(dir, 'out'), shotsTable: false, report: false, onWarning: (w) => warnings.push(w) });
      const json = resultToJson(result).points as Record<string, any>[];
      const p = json[0]!;
      expect(Object.keys(p.predictedSigma).sort()).toEqual(['drift', 'quantisation', 'total', 'white']);
      expect(p.predictedSigma.total).toBeCloseTo(p.analyticSigma, 20);
      expect(p.noiseBudget.map((b: any) => b.source)).toEqual(['white', 'drift', 'quantisation']);
      expect(p.noiseBudget.reduce((a: number, b: any) => a + b.share, 0)).toBeCloseTo(1, 12);
      // 100 pA + 60 pA per-sample noise against a ±150 pA range: some samples clip
      expect(p.clippedSamples).toBeGreaterThan(0);
      expect(warnings.some((w) => /clipped \d+ scored record samples/.test(w)), warnings.join('\n')).toBe(true);
      const names = summaryColumns(result.points, 'A').map((c) => c.name);
      for (const n of ['predicted_sigma', 'predicted_sigma_white', 'noise_share_white', 'predicted_sigma_drift', 'noise_share_drift', 'clipped_samples']) {
        expect(names, n).toContain(n);
      }
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
