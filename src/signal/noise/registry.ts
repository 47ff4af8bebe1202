/**
 * The kinds of noise source beyond white noise, in the order the program visits them: the
 * scenario reads them in this order, the noise budget lists their sources in it, and the trace
 * engine adds the kinds without a linear path to the record before those with one. A new kind is
 * a file beside this one (contract.ts) and a line here.
 */
import type { NoiseSourceSpec } from '../../scenario/types.ts';
import type { NoiseSourceKind } from './contract.ts';
import { flickerKind } from './flicker.ts';
import { telegraphKind } from './telegraph.ts';
import { correlatedKind } from './correlated.ts';

export const NOISE_KINDS: readonly NoiseSourceKind[] = [
  flickerKind,
  telegraphKind,
  correlatedKind,
];

/** The kind of a source (a spec of a kind not registered is a bug). */
export function noiseKind(spec: NoiseSourceSpec): NoiseSourceKind {
  const kind = NOISE_KINDS.find((k) => k.kind === spec.kind);
  if (!kind) throw new Error(`noise source "${spec.name}" of unknown kind "${spec.kind}"`);
  return kind;
}

/** The sources of each registered kind present in `sources`, in registry order. */
export function sourcesByKind(sources: readonly NoiseSourceSpec[] | undefined): { kind: NoiseSourceKind; specs: NoiseSourceSpec[] }[] {
  const list = sources ?? [];
  return NOISE_KINDS.map((kind) => ({ kind, specs: list.filter((s) => s.kind === kind.kind) })).filter((k) => k.specs.length > 0);
}
