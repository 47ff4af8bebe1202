/**
 * Fuzzed scenario documents (fast-check): valid scenarios (the starter and the demo) with one
 * to four mutations — hostile values, NaN/Infinity spelled as strings, huge and tiny numbers,
 * flipped signs, swapped units, missing and extra keys, deep wrapping, resized lists. Each
 * must either resolve to a Scenario with finite numbers that satisfies the engine's invariants,
 * or be refused with a one-line InputError naming the key path. Nothing else.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { loadScenarioDocument } from '../../src/scenario/load.ts';
import { anyMutation, FUZZ_SEED, inputErrorProblem, mildMutation, mutatedDoc, scenarioProblem, safeJson } from './harness.ts';

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
  ] as const)('%s: valid → finite Scenario, invalid → one-line InputError with a key path', (_name, mutation, numRuns) => {
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
