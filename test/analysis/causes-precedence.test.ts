/**
 * The cause of a wrong shot (analysis/causes.ts): attributeCause follows CAUSE_PRECEDENCE —
 * preparation before mapping before the first jump before noise — and the WebAssembly kernels'
 * cause function, generated from the same rules (engine/wasm/source/causes.ts), gives the same
 * cause in every case: intended, prepared and initial state in 0 … 2, first-jump cause 0 … 7.
 * Exactness: common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import {
  attributeCause, CAUSE_EXCITATION, CAUSE_MAPPING, CAUSE_NOISE, CAUSE_PREPARATION, CAUSE_RELAXATION, CAUSES,
} from '../../src/analysis/causes.ts';
import { instantiateKernels } from '../../src/engine/wasm/memory.ts';

describe('cause precedence', () => {
  it.each([
    ['a preparation error first', [0, 1, 0, true, CAUSE_RELAXATION], CAUSE_PREPARATION],
    ['a mapping error next', [1, 1, 0, true, CAUSE_RELAXATION], CAUSE_MAPPING],
    ['then the first jump', [1, 1, 1, true, CAUSE_RELAXATION], CAUSE_RELAXATION],
    ['then the first jump (another cause)', [0, 0, 0, true, CAUSE_EXCITATION], CAUSE_EXCITATION],
    ['else noise', [1, 1, 1, false, 0], CAUSE_NOISE],
    ['a preparation error that mapping undid', [2, 1, 2, false, 0], CAUSE_PREPARATION],
  ] as const)('%s', (_what, [intended, prepared, initial, jumped, jc], want) => {
    expect(attributeCause(intended, prepared, initial, jumped, jc)).toBe(want);
  });

  it("the kernels' cause function equals attributeCause on every case", () => {
    const causeOf = instantiateKernels(0).exports.causeOf as (intended: number, prepared: number, initial: number, jc: number) => number;
    let cases = 0;
    for (let intended = 0; intended <= 2; intended++) {
      for (let prepared = 0; prepared <= 2; prepared++) {
        for (let initial = 0; initial <= 2; initial++) {
          for (let jc = 0; jc < CAUSES.length; jc++) {
            const want = attributeCause(intended, prepared, initial, jc !== 0, jc);
            expect(causeOf(intended, prepared, initial, jc), `intended ${intended}, prepared ${prepared}, initial ${initial}, jump cause ${jc}`).toBe(want);
            cases++;
          }
        }
      }
    }
    expect(cases).toBe(27 * CAUSES.length);
  });
});
