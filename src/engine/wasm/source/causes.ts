/**
 * The cause of a wrong shot as WebAssembly text, generated from analysis/causes.ts
 * CAUSE_PRECEDENCE (the rules in order, nested), so that the kernels and attributeCause share
 * one statement of it. Exported as "causeOf" for a test that compares the two on every case.
 */
import { CAUSE_PRECEDENCE, FIRST_JUMP_CAUSE, type CauseRule } from '../../../analysis/causes.ts';

/** The rule's test on the function's parameters ($jc ≠ 0: the chain jumped before the window ended). */
function test(rule: CauseRule): string {
  if (rule.when === 'jumped') return '(local.get $jc)';
  if (!rule.stage || !rule.from) throw new Error(`cause rule ${rule.cause}: a 'differs' rule needs its two stages`);
  return `(i32.ne (local.get $${rule.stage}) (local.get $${rule.from}))`;
}

const causeCode = (cause: number): string => (cause === FIRST_JUMP_CAUSE ? '(local.get $jc)' : `(i32.const ${cause})`);

export function causeFunction(): string {
  const { rules, otherwise } = CAUSE_PRECEDENCE;
  const body = rules.reduceRight(
    (rest, rule) => `(if (result i32) ${test(rule)}\n      (then ${causeCode(rule.cause)})\n      (else ${rest}))`,
    causeCode(otherwise),
  );
  return `
  ;; the cause of a wrong shot (analysis/causes.ts CAUSE_PRECEDENCE); $jc: its first jump's
  ;; cause if the chain jumped before the window ended, else 0
  (func $causeOf (export "causeOf") (param $intended i32) (param $prepared i32) (param $initial i32) (param $jc i32) (result i32)
    ${body})
`;
}
