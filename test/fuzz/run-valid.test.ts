/**
 * Fuzzed scenarios that stay valid must also RUN: mildly mutated starter and demo scenarios
 * (numbers scaled by up to 10^±12, signs flipped, keys dropped) are resolved, cut down to 1024
 * scored and 64 calibration shots, and the first 50 that the resource estimate calls cheap are
 * run to completion through the library. Every integrated value must be finite, and the summary
 * may hold NaN or ±∞ only where documented (see ALLOWED_NON_FINITE). Scenarios the estimate
 * calls expensive must be refused by the resource guard when the machine lacks the resources,
 * never attempted blindly.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { loadScenarioDocument } from '../../src/scenario/load.ts';
import { InputError, ScenarioProblem } from '../../src/errors.ts';
import { runPoints } from '../../src/run/run-points.ts';
import { estimateRun } from '../../src/run/estimate.ts';
import { guardResources, ResourceError } from '../../src/app/resource-guard.ts';
import type { Scenario } from '../../src/scenario/types.ts';
import { FUZZ_SEED, mildMutation, mutatedDoc, nonFiniteNumbers, safeJson } from './harness.ts';

const CANDIDATES = 1500;
const RUNS = 50;
/** Estimated seconds above which a candidate is too slow to run in a unit test. */
const CHEAP_SECONDS = 0.4;

/**
 * Summary fields that may be NaN or ±∞, and when (documented in reliability-docs.md):
 * - a state with no scored shots has no error rate, interval or assignment row (NaN);
 * - sigma and snr need two noise-only ("clean") shots per state; without them they are NaN;
 *   with zero noise sigma is 0 and snr (and analyticSnr) is +∞;
 * - analyticSnr/analyticSigma likewise when the analytic noise is zero;
 * - the optimal threshold is ±∞ (never NaN) when the best rule reports one outcome for every
 *   calibration shot (e.g. a mapping error of probability 1), as optimalThreshold documents.
 */
const ALLOWED_NON_FINITE = /^(states\.\d+\.(error\.(rate|low|high)|assignment\.\d+|causes\.\d+\.(simulated|wide)\.(rate|low|high))|(snr|sigma|analyticSnr|analyticSigma)|outcomeValues\.\d+\.(mean|sigma))$/;

/** Paths of non-finite summary numbers that the rules above do not explain. */
function unexplainedNonFinite(summary: object, zeroShot: Set<number>, noiseFree: boolean, fewClean: boolean): string[] {
  return nonFiniteNumbers(summary)
    .filter((entry) => !/^threshold = -?Infinity$/.test(entry))
    .map((entry) => entry.split(' = ')[0]!)
    .filter((path) => {
      if (!ALLOWED_NON_FINITE.test(path)) return true;
      const state = /^states\.(\d+)\./.exec(path);
      if (state) return !zeroShot.has(Number(state[1]));
      // an outcome whose states have fewer than two clean shots has no clean centre or spread
      if (path === 'snr' || path === 'sigma' || path.startsWith('outcomeValues.')) return !(noiseFree || fewClean);
      return !noiseFree;
    });
}

describe('valid fuzzed scenarios run to completion', () => {
  it(`${RUNS} cheap ones run on 1024 shots with finite values; expensive ones are refused by the guard`, async () => {
    const candidates = fc.sample(mutatedDoc(mildMutation, 3), { seed: FUZZ_SEED, numRuns: CANDIDATES });
    const cheap: { scenario: Scenario; labels: string[] }[] = [];
    let expensive = 0;
    let refusedAtRun = 0;
    for (const { doc, labels, base } of candidates) {
      if (doc === null || typeof doc !== 'object' || Array.isArray(doc)) continue;
      Object.assign(doc, { shots: 1024, calibrationShots: 64, batchSize: 1024 });
      let scenario: Scenario;
      try {
        scenario = loadScenarioDocument(doc, 'fuzzed.yaml').scenario;
      } catch (e) {
        expect(e, `${base} ${labels.join('; ')}`).toBeInstanceOf(InputError);
        continue;
      }
      const estimate = estimateRun([scenario]);
      if (estimate.seconds <= CHEAP_SECONDS && estimate.memoryBytes < 512 * 2 ** 20) {
        if (cheap.length < RUNS) cheap.push({ scenario, labels: [base, ...labels] });
        continue;
      }
      expensive++;
      // on a machine with less than the estimate, the guard refuses (not forced) and says why
      const tight = { memoryBytes: estimate.memoryBytes / 2, diskBytes: estimate.diskBytes / 2 };
      expect(() => guardResources('fuzzed.yaml', estimate, tight, false)).toThrow(ResourceError);
    }
    expect(cheap.length, `only ${cheap.length} cheap valid scenarios among ${CANDIDATES}`).toBe(RUNS);

    for (const { scenario, labels } of cheap) {
      const where = `${labels.join('; ')}`;
      const badValues: string[] = [];
      const run = runPoints([{ parameters: {}, scenario }], {
        onScoredBatch: (_point, batch, scored) => {
          for (const v of batch.values) badValues.push(...nonFiniteNumbers(v.inPhase, 'inPhase'), ...nonFiniteNumbers(v.quadrature, 'quadrature'));
          for (const s of scored) badValues.push(...nonFiniteNumbers(s.projected, 'projected'));
        },
      });
      let result;
      try {
        result = await run;
      } catch (e) {
        // a rare outcome may get no calibration shot: that must be a problem of the scenario, which
        // the use cases report as an InputError naming the file (runPoints knows no file)
        expect(e instanceof InputError || e instanceof ScenarioProblem, `${where}: ${String(e)}`).toBe(true);
        refusedAtRun++;
        continue;
      }
      expect(badValues, where).toEqual([]);
      const noiseFree = !(scenario.signal.white !== null && scenario.signal.white.density > 0);
      for (const point of result.points) {
        for (const [p, summary] of point.summaries.entries()) {
          const zeroShot = new Set(summary.states.flatMap((st, i) => (st.shots === 0 ? [i] : [])));
          const fewClean = point.tallies[p]!.clean.some((m) => m.n < 2);
          const unexplained = unexplainedNonFinite(summary, zeroShot, noiseFree, fewClean);
          expect(unexplained, `${where}: ${safeJson(summary.states.map((s) => s.shots))}`).toEqual([]);
          expect(summary.shots, where).toBe(1024);
        }
      }
    }
    // record how the candidates split, so a generator change that stops producing either kind shows
    expect(expensive, 'no expensive candidate reached the guard').toBeGreaterThan(0);
    expect(refusedAtRun, 'most cheap scenarios must run').toBeLessThan(RUNS / 5);
  }, 120_000);
});
