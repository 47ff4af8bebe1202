/**
 * Which level each label means, and the preparation error: the fraction of the records labelled ℓ
 * that start at the other level, with a Wilson interval (Wilson, J. Am. Stat. Assoc. 22, 209
 * (1927); analysis/intervals.ts).
 *
 * The model reads a record's start from its first bin, which shows the state about half a bin
 * (Δt/2) after the record starts; a record may leave its state in between. With q_s the
 * probability that state s is left within Δt/2 (1 − e^(−γ_s·Δt/2), γ_s its fitted rate out), a
 * record labelled ℓ (prepared in state s, else in o with probability p) starts its first bin
 * elsewhere with probability P = (1 − p)·q_s + p·(1 − q_o), so p = (P − q_s)/(1 − q_s − q_o);
 * the interval's ends are mapped the same way. A mapping error before the record looks the same
 * as a preparation error and is counted with it.
 */
import { wilsonInterval } from '../analysis/intervals.ts';
import { InputError } from '../errors.ts';

/** Confidence of the interval written beside the estimate. */
export const PREPARATION_CONFIDENCE = 0.95;

/** The preparation error of one label. */
export interface PreparationError {
  /** Label index and the state it means. */
  label: number;
  state: number;
  /** Records with this label, and how many started at the other level. */
  records: number;
  startedElsewhere: number;
  probability: number;
  low: number;
  high: number;
}

/** The state each label means: the level most of its records start at. */
export function statesOfLabels(startState: Uint8Array, labels: Uint8Array, source: string, names: readonly string[]): [number, number] {
  const counts = [[0, 0], [0, 0]];
  for (let i = 0; i < startState.length; i++) if (labels[i]! < 2) counts[labels[i]!]![startState[i]!]!++;
  const total = counts.map((c) => c[0]! + c[1]!);
  const pick = (l: number) => (counts[l]![1]! > counts[l]![0]! ? 1 : 0);
  if (total[0] === 0 && total[1] === 0) throw new InputError(source, '', 'labels of 0 or 1 (the two outcomes) for the records', 'no usable label');
  if (total[0] === 0) return [1 - pick(1), pick(1)] as [number, number];
  if (total[1] === 0) return [pick(0), 1 - pick(0)] as [number, number];
  if (pick(0) === pick(1)) {
    throw new InputError(source, '', `labels that tell the two levels apart`,
      `records labelled "${names[0]}" and "${names[1]}" mostly starting at the same level (${counts[0]![pick(0)]} of ${total[0]} and ${counts[1]![pick(1)]} of ${total[1]})`);
  }
  return [pick(0), pick(1)];
}

/** The preparation error of each label (see the file comment); `leave[s]` is q_s. */
export function preparationErrors(startState: Uint8Array, labels: Uint8Array, stateOfLabel: [number, number], leave: [number, number]): PreparationError[] {
  return [0, 1].map((label) => {
    const state = stateOfLabel[label]!, other = 1 - state;
    let records = 0, elsewhere = 0;
    for (let i = 0; i < startState.length; i++) {
      if (labels[i] !== label) continue;
      records++;
      if (startState[i] !== state) elsewhere++;
    }
    const w = wilsonInterval(elsewhere, records, PREPARATION_CONFIDENCE);
    const qs = leave[state]!, qo = leave[other]!;
    const correct = (x: number) => Math.min(1, Math.max(0, (x - qs) / (1 - qs - qo)));
    return { label, state, records, startedElsewhere: elsewhere, probability: correct(w.rate), low: correct(w.low), high: correct(w.high) };
  });
}
