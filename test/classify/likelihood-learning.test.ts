/**
 * The likelihood classifier learns its model from the calibration records (classify/hmm-learning.ts,
 * Baum–Welch: Baum et al., Ann. Math. Stat. 41, 164 (1970); Rabiner, Proc. IEEE 77, 257 (1989)):
 * with a constant offset of the record that the device model does not know (a fluctuator stuck in
 * its upper state — rateDown 0, so it starts and stays there — adds +0.25 or +0.5 per sample), levels 0/1, σ = 1.5 per sample, T1 = 20 µs and
 * a 10 µs window, its error stays within 10 % of its error without the offset, and below the
 * calibrated boxcar's on the same shots; the learned means and σ are within 2 % of the truth.
 */
import { describe, expect, it } from 'vitest';
import { loadScenarioText } from '../../src/scenario/load.ts';
import { runPoints } from '../../src/run/run-points.ts';
import type { HmmClassifierSpec } from '../../src/classify/likelihood.ts';
import { learnHmm } from '../../src/classify/hmm-learning.ts';

const SHOTS = 100_000;

function scenario(offset: number): string {
  return `
name: learning
seed: 2024
shots: ${SHOTS}
calibrationShots: 16384
batchSize: 16384
timing: { sampleRate: 10 MHz, recordLength: 10 us, window: { start: 0 us, length: 10 us } }
states:
  - { name: ground, level: 0, outcome: "0" }
  - { name: excited, level: 1, outcome: "1" }
transitions:
  - { from: excited, to: ground, lifetime: 20 us }
signal:
  carrier: none
  noise:
    white: { perSample: 1.5 }
${offset > 0 ? `    telegraph: { name: offset, amplitude: ${offset}, rateUp: 0.001, rateDown: 0, injection: amplifier }` : ''}
pipelines:
  - { name: boxcar, threshold: optimal }
  - { name: likelihood, classifier: likelihood, decimate: 10 }
`;
}

async function run(offset: number) {
  const loaded = loadScenarioText(scenario(offset), 'learning.yaml');
  return (await runPoints([{ parameters: {}, scenario: loaded.scenario }], { engine: 'traces' })).points[0]!;
}

describe('the likelihood classifier learns its means and σ from the calibration records', () => {
  it('a constant offset of 0, +0.25 or +0.5 per sample leaves its error within 10 %, below the boxcar\'s; means and σ within 2 %', async () => {
    const errors: number[] = [];
    for (const offset of [0, 0.25, 0.5]) {
      const p = await run(offset);
      const [boxcar, likelihood] = p.summaries;
      errors.push(likelihood!.meanError.rate);
      const c = p.comparisons.find((x) => x.a === 'boxcar' && x.b === 'likelihood')!;
      expect(c.errorB, `offset ${offset}: likelihood ${c.errorB}, boxcar ${c.errorA}`).toBeLessThan(c.errorA);
      const model = p.calibrations[1]!.model as HmmClassifierSpec;
      // truth per bin: the level plus the offset (a block average of 10 samples), σ = 1.5/√10
      const separation = 1;
      for (const [s, level] of [[0, 0], [1, 1]] as const) {
        for (const m of model.means[s]!) expect(Math.abs(m - (level + offset)), `offset ${offset}, state ${s}: mean ${m}`).toBeLessThan(0.02 * separation);
      }
      expect(Math.abs(model.sigma / (1.5 / Math.sqrt(10)) - 1), `offset ${offset}: σ ${model.sigma}`).toBeLessThan(0.02);
      void boxcar;
    }
    for (const e of errors.slice(1)) expect(Math.abs(e / errors[0]! - 1), `errors ${errors.join(', ')}`).toBeLessThan(0.1);
  }, 120_000);
});

describe('learning from records alone (no device model): two levels, σ and the decay', () => {
  it('recovers a two-state model from synthetic labelled records (levels, σ and the per-bin decay within their errors)', () => {
    // 4000 records of 20 bins: state 1 decays to 0 with probability 0.05 per bin; σ = 0.3
    const bins = 20, count = 4000, sigma = 0.3, p = 0.05;
    let seed = 7;
    const uniform = () => { seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0; return (seed + 0.5) / 4294967296; };
    const normal = () => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
    const projected = new Float64Array(count * bins), outcome = new Uint8Array(count);
    for (let i = 0; i < count; i++) {
      outcome[i] = i % 2;
      let state = outcome[i]!;
      for (let b = 0; b < bins; b++) {
        if (b > 0 && state === 1 && uniform() < p) state = 0;
        projected[i * bins + b] = 2 + 1.5 * state + sigma * normal();
      }
    }
    const zero = new Float64Array(bins);
    const learned = learnHmm({ bins, count, projected, outcome, cleanState: new Uint8Array(count).fill(255) }, {
      shapes: [zero, zero], offsets: [1.9, 3.6], sigma: 0.5, transition: Float64Array.of(0.999, 0.001, 0.01, 0.99),
      priorsByLabel: [Float64Array.of(0.98, 0.02), Float64Array.of(0.02, 0.98)], learnTransitions: true, learnPriors: true, iterations: 200,
    });
    expect(Math.abs(learned.offsets[0]! - 2)).toBeLessThan(0.01);
    expect(Math.abs(learned.offsets[1]! - 3.5)).toBeLessThan(0.01);
    expect(Math.abs(learned.sigma / sigma - 1)).toBeLessThan(0.01);
    // ~1900 decays observed: p to within ~3 standard errors of its binomial estimate
    expect(Math.abs(learned.transition[2]! - p)).toBeLessThan(3 * Math.sqrt(p / 1900) * p + 0.005);
    expect(learned.priorsByLabel[1][1]!).toBeGreaterThan(0.97);
  });
});
