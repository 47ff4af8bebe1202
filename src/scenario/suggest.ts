/**
 * "Did you mean …?" suggestions for misspelt keys and names.
 */

/** Levenshtein edit distance between two strings (insert, delete, substitute; cost 1 each). */
export function editDistance(a: string, b: string): number {
  const previous = new Array<number>(b.length + 1);
  const current = new Array<number>(b.length + 1);
  for (let j = 0; j <= b.length; j++) previous[j] = j;
  for (let i = 1; i <= a.length; i++) {
    current[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const substitute = previous[j - 1]! + (a[i - 1] === b[j - 1] ? 0 : 1);
      current[j] = Math.min(previous[j]! + 1, current[j - 1]! + 1, substitute);
    }
    for (let j = 0; j <= b.length; j++) previous[j] = current[j]!;
  }
  return previous[b.length]!;
}

/** Words longer than this get no suggestion. */
export const MAX_SUGGESTED_LENGTH = 64;

/**
 * The candidate closest to `word` (case-insensitive, ties by case), if it is close enough to be a likely
 * misspelling: at most a third of the word's letters changed (at least one), or differing only
 * in case.
 */
export function closest(word: string, candidates: readonly string[]): string | undefined {
  // long words are never misspellings of short names; the edit distance would cost |a|·|b|
  if (word.length > MAX_SUGGESTED_LENGTH) return undefined;
  const w = word.toLowerCase();
  let best: string | undefined;
  let bestDistance = Infinity;
  let bestExact = Infinity;
  for (const c of candidates) {
    const d = editDistance(w, c.toLowerCase());
    // Ties are broken by the case-sensitive distance ("MHZ" → "MHz", not "mHz").
    const exact = d <= bestDistance ? editDistance(word, c) : Infinity;
    if (d < bestDistance || (d === bestDistance && exact < bestExact)) {
      best = c;
      bestDistance = d;
      bestExact = exact;
    }
  }
  const allowed = Math.max(1, Math.floor(word.length / 3));
  return bestDistance <= allowed ? best : undefined;
}

/** ' (did you mean "x"?)' when a close candidate exists, else ''. */
export function didYouMean(word: string, candidates: readonly string[]): string {
  const c = closest(word, candidates);
  return c === undefined ? '' : ` (did you mean "${c}"?)`;
}
