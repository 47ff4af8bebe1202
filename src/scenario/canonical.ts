/**
 * Canonical JSON of a scenario document, for output metadata.
 */

function sortKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map((v) => (v === undefined ? null : sortKeys(v)));
  if (value !== null && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const key of Object.keys(value).sort()) {
      const v = (value as Record<string, unknown>)[key];
      if (v !== undefined) out[key] = sortKeys(v);
    }
    return out;
  }
  return value;
}

/**
 * Deterministic compact JSON: object keys sorted by code unit at every level, arrays kept in
 * order, undefined members dropped. Equal documents give equal strings.
 */
export function canonicalJson(doc: unknown): string {
  return JSON.stringify(sortKeys(doc));
}
