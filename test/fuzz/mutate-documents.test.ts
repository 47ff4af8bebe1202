/**
 * Fuzzed scenario documents (fast-check): valid scenarios (the starter and the demo) with one
 * to four mutations — hostile values, NaN/Infinity spelled as strings, huge and tiny numbers,
 * flipped signs, swapped units, missing and extra keys, deep wrapping, resized lists. Each
 * must either resolve to a Scenario with finite numbers that satisfies the engine's invariants,
 * or be refused with an InputError of one line per problem, each naming its key path. Nothing else.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { loadScenarioDocument } from '../../src/scenario/load.ts';
import { anyMutation, BASES, FUZZ_SEED, inputErrorProblem, mildMutation, mutatedDoc, scenarioProblem, safeJson } from './harness.ts';

const FILE = 'fuzzed.yaml';

/** Outcome of one case: 'valid', 'invalid', or a description of what went wrong. */
function judge(doc: unknown): { kind: 'valid' | 'invalid' } | { kind: 'bug'; problem: string } {
  let loaded;
  try {
    loaded = loadScenarioDocument(doc, FILE);
  } catch (e) {
    const problem = inputErrorProblem(e, FILE, doc);
    return problem ? { kind: 'bug', problem } : { kind: 'invalid' };
  }
  const problem = scenarioProblem(loaded.scenario);
  if (problem) return { kind: 'bug', problem };
  for (const w of loaded.warnings) {
    if (/[\r\n]/.test(w) || !w.startsWith(`${FILE}: `)) return { kind: 'bug', problem: `bad warning ${JSON.stringify(w)}` };
  }
  return { kind: 'valid' };
}

describe('fuzzed scenario documents', () => {
  // 5000 + 2000 cases, resolution only (about 1 ms each)
  it.each([
    ['any mutation', anyMutation, 5000],
    ['mild mutations (mostly still valid)', mildMutation, 2000],
  ] as const)('%s: valid → finite Scenario, invalid → InputError, one line per problem, each with a key path', (_name, mutation, numRuns) => {
    const counts = { valid: 0, invalid: 0 };
    fc.assert(
      fc.property(mutatedDoc(mutation), ({ base, doc, labels }) => {
        const verdict = judge(doc);
        if (verdict.kind === 'bug') throw new Error(`${base} with ${labels.join('; ')}: ${verdict.problem}\ndoc: ${safeJson(doc)}`);
        counts[verdict.kind]++;
      }),
      { seed: FUZZ_SEED, numRuns, endOnFailure: true },
    );
    // the generator must exercise both sides, or the test proves little
    expect(counts.valid, JSON.stringify(counts)).toBeGreaterThan(numRuns / 50);
    expect(counts.invalid, JSON.stringify(counts)).toBeGreaterThan(numRuns / 50);
  }, 60_000);
});

describe('cases the fuzzer found (regressions)', () => {
  const starter = () => structuredClone(BASES.starter) as Record<string, unknown>;
  it.each([
    // a prefix overflowed a finite number to Infinity, which then passed as a quantity
    ['a quantity that overflows once its prefix is applied', () => ({ ...starter(), timing: { sampleRate: '1e308 GHz', recordLength: '20 us' } }), 'timing.sampleRate', /too large once the unit is applied/],
    // the "did you mean" search compared a megabyte-long word with every unit spelling
    ['a megabyte-long unknown unit', () => ({ ...starter(), timing: { sampleRate: `5 ${'x'.repeat(1_000_000)}`, recordLength: '20 us' } }), 'timing.sampleRate', /unknown unit/],
    // one outcome never prepared: the calibration had no shots of it and threw a plain Error
    ['an outcome with prepare weight 0', () => ({ ...starter(), prepare: { empty: 1, loaded: 0 } }), 'prepare', /calibration needs shots of both outcomes/],
  ])('%s is an InputError at its key', (_what, make, path, message) => {
    let error: unknown;
    try {
      loadScenarioDocument(make(), FILE);
    } catch (e) {
      error = e;
    }
    expect(inputErrorProblem(error, FILE, make())).toBeNull();
    expect((error as { path: string }).path).toBe(path);
    expect((error as Error).message).toMatch(message);
  });
});
