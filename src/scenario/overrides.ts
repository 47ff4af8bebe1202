/**
 * Command-line overrides of scenario keys.
 */

/** Values given on the command line that replace the file's. */
export interface ScenarioOverrides {
  shots?: number;
  seed?: number;
}

/**
 * A copy of `doc` with the given overrides set (the input is not changed). A document that is
 * not a mapping is returned unchanged; resolution reports it.
 */
export function applyOverrides(doc: unknown, o: ScenarioOverrides): unknown {
  if (doc === null || typeof doc !== 'object' || Array.isArray(doc)) return doc;
  const copy: Record<string, unknown> = structuredClone(doc as Record<string, unknown>);
  if (o.shots !== undefined) copy.shots = o.shots;
  if (o.seed !== undefined) copy.seed = o.seed;
  return copy;
}
