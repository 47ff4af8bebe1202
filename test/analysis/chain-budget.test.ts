/**
 * The analytic budget of chains beyond one jump (analysis/chain-values.ts) against the
 * simulation, 4·10⁵ scored shots per point (exact engine):
 * - a stochastic turn-on: the signal turns on at an exponential time and off at a later one
 *   (D'Anjou & Coish, Phys. Rev. A 89, 012313 (2014));
 * - chains of 2 and 3 intermediate states, whose signal lasts an Erlang-distributed time
 *   (D'Anjou & Coish, Phys. Rev. A 96, 052321 (2017));
 * - two-state relaxation, where the budget keeps Barthel's closed form (Barthel et al., Phys.
 *   Rev. Lett. 103, 160503 (2009)) and the path recursion must reproduce it;
 * - three states with transitions both ways and leakage, behind an analog response (the jumps'
 *   transients by superposition), settled and ringing up from zero.
 * Every state's simulated error must contain the analytic value in its 99.9 % Wilson interval
 * (the run's own agreement flag), with a negative control: the first-jump model on the turn-on
 * chain falls outside.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { loadScenarioText } from '../../src/scenario/load.ts';
import { runPoints } from '../../src/run/run-points.ts';
import { compilePoint } from '../../src/engine/compile-point.ts';
import { analyticBudget } from '../../src/analysis/budget.ts';
import { chainValues, onlyTerminalJumps } from '../../src/analysis/chain-values.ts';
import { gaussianTail } from '../../src/analysis/special.ts';
import { wilsonInterval } from '../../src/analysis/intervals.ts';
import type { PointResult } from '../../src/run/point-result.ts';

const SHOTS = 400_000;

/** A baseband readout at 10 MS/s, 10 µs records, window 1–9 µs, σ = 2 per sample (σ of the boxcar 0.224). */
function scenario(states: string, transitions: string, prepare: string): string {
  return `
name: chain
seed: 31
shots: ${SHOTS}
calibrationShots: 4096
batchSize: 65536
timing: { sampleRate: 10 MHz, recordLength: 10 us, window: { start: 1 us, length: 8 us } }
states:
${states}
prepare: ${prepare}
transitions:
${transitions}
signal:
  carrier: none
  noise: { white: { perSample: 2 } }
processing:
  referencePhase: 0 deg
  threshold: { fixed: 0.5 }
`;
}

async function run(text: string): Promise<PointResult> {
  const loaded = loadScenarioText(text, 'chain.yaml');
  const r = await runPoints([{ parameters: {}, scenario: loaded.scenario }], { engine: 'exact' });
  return r.points[0]!;
}

/** Each state's simulated error against its analytic total, within the 99.9 % Wilson interval. */
function expectAgreement(p: PointResult, what: string): void {
  const s = p.summaries[0]!;
  for (const st of s.states) {
    const w = wilsonInterval(st.errors, st.shots, 0.999);
    expect(st.analyticTotal, `${what}, state ${st.state}: simulated ${st.error.rate} [${w.low}, ${w.high}] (${st.shots} shots), analytic ${st.analyticTotal}`)
      .toBeGreaterThanOrEqual(w.low);
    expect(st.analyticTotal).toBeLessThanOrEqual(w.high);
  }
  expect(s.agreement, `${what}: the run's own agreement flag`).toBe(true);
}

const TURN_ON_STATES = `
  - { name: down, level: 0, outcome: "0" }
  - { name: up, level: 0, outcome: "1" }
  - { name: out, level: 1, outcome: "1" }
  - { name: back, level: 0, outcome: "1" }`;
const TURN_ON_TRANSITIONS = `
  - { from: up, to: out, lifetime: 2 us, kind: leakage }
  - { from: out, to: back, lifetime: 3 us, kind: relaxation }`;

describe('budget of a chain beyond one jump against the simulation (4·10⁵ shots per point)', () => {
  it.each([['settled', ''], ['ringing up from zero', ', from: zero']])('three states, both directions, an analog response (%s): every pipeline agrees (the transients by superposition)', async (_what, from) => {
    const text = readFileSync('test/fixtures/scenarios/fused-mix.yaml', 'utf8').replace('response: { bandwidth: 3 MHz }', `response: { bandwidth: 3 MHz${from} }`);
    const loaded = loadScenarioText(text, 'fused-mix.yaml', { shots: SHOTS });
    const r = await runPoints([{ parameters: {}, scenario: loaded.scenario }], { engine: 'exact' });
    for (const s of r.points[0]!.summaries) {
      expect(s.agreement, `${s.pipeline}: simulated ${s.meanError.rate} [${s.meanError.low}, ${s.meanError.high}], analytic ${s.analyticMean}`).toBe(true);
    }
  }, 60_000);

  it('a stochastic turn-on: the signal turns on at an exponential time and off later (D\'Anjou & Coish 2014)', async () => {
    const p = await run(scenario(TURN_ON_STATES, TURN_ON_TRANSITIONS, '{ down: 0.5, up: 0.5 }'));
    // relative half-width of the 99.9 % interval on the up state's error (~0.3): about 1.5 %
    expectAgreement(p, 'turn-on');
    expect(p.summaries[0]!.states[1]!.error.rate).toBeGreaterThan(0.05);
  }, 60_000);

  it.each([2, 3])('a chain of %i intermediate states: an Erlang-distributed signal duration (D\'Anjou & Coish 2017)', async (stages) => {
    const names = Array.from({ length: stages }, (_, i) => `stage${i + 1}`);
    const states = [
      '  - { name: ground, level: 0, outcome: "0" }',
      '  - { name: excited, level: 1, outcome: "1" }',
      ...names.map((n) => `  - { name: ${n}, level: 1, outcome: "1" }`),
      '  - { name: relaxed, level: 0, outcome: "1" }',
    ].join('\n');
    const path = ['excited', ...names, 'relaxed'];
    const transitions = path.slice(0, -1).map((from, i) => `  - { from: ${from}, to: ${path[i + 1]}, lifetime: ${(6 / (stages + 1)).toFixed(3)} us, kind: relaxation }`).join('\n');
    const p = await run(scenario(states, transitions, '{ ground: 0.5, excited: 0.5 }'));
    expectAgreement(p, `${stages} stages`);
  }, 60_000);

  it('two-state relaxation keeps the closed form, and the path recursion reproduces it (Barthel et al. 2009)', async () => {
    const text = scenario(`
  - { name: ground, level: 0, outcome: "0" }
  - { name: excited, level: 1, outcome: "1" }`, `
  - { from: excited, to: ground, lifetime: 12 us }`, '{ ground: 0.5, excited: 0.5 }');
    expectAgreement(await run(text), 'relaxation');
    const point = compilePoint(loadScenarioText(text, 'chain.yaml').scenario);
    const k = point.pipelines[0]!.kernels;
    const input = {
      kernel: k.inPhase, lo: k.lo, hi: k.hi, sampleRate: point.grid.sampleRate, waveforms: point.waveforms, rate: point.chain.rate,
      jumpCause: point.jumpCause, prepare: [0.5, 0.5], outcomeOf: [0, 1], preparation: [null, null], mapping: [null, null],
      threshold: 0.5, highIsOne: true, noiseVariance: 2 ** 2 / 80,
    };
    expect(onlyTerminalJumps(input.rate, 2)).toBe(true);
    const closed = analyticBudget(input).perState[1]!.total;
    const sigma = Math.sqrt(input.noiseVariance);
    let recursion = 0;
    for (const { values, mass } of chainValues(input, 1, sigma / 16).values()) {
      for (let i = 0; i < values.length; i++) recursion += mass[i]! * gaussianTail((values[i]! - 0.5) / sigma);
    }
    // the grid's error on a Gaussian tail: far below 1e-3 relative (common practice, no source)
    expect(Math.abs(recursion / closed - 1), `recursion ${recursion}, closed form ${closed}`).toBeLessThan(1e-3);
  }, 60_000);

  it('negative control: the first-jump model misses the turn-on chain (outside the interval)', async () => {
    const p = await run(scenario(TURN_ON_STATES, TURN_ON_TRANSITIONS, '{ down: 0.5, up: 0.5 }'));
    const point = compilePoint(loadScenarioText(scenario(TURN_ON_STATES, TURN_ON_TRANSITIONS, '{ down: 0.5, up: 0.5 }'), 'chain.yaml').scenario);
    const k = point.pipelines[0]!.kernels;
    // the signal never turns off again: what a model of the first jump alone assumes
    const rate = Float64Array.from(point.chain.rate);
    rate[2 * 4 + 3] = 0;
    const firstJumpOnly = analyticBudget({
      kernel: k.inPhase, lo: k.lo, hi: k.hi, sampleRate: point.grid.sampleRate, waveforms: point.waveforms, rate,
      jumpCause: point.jumpCause, prepare: [0.5, 0.5, 0, 0], outcomeOf: [0, 1, 1, 1], preparation: [null, null, null, null],
      mapping: [null, null, null, null], threshold: 0.5, highIsOne: true, noiseVariance: p.budgets[0]!.sigma ** 2,
    }).perState[1]!.total;
    const up = p.summaries[0]!.states[1]!;
    const w = wilsonInterval(up.errors, up.shots, 0.999);
    expect(firstJumpOnly < w.low || firstJumpOnly > w.high, `first-jump model ${firstJumpOnly}, interval [${w.low}, ${w.high}]`).toBe(true);
  }, 60_000);
});
