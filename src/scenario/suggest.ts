/**
 * "Did you mean …?" suggestions for misspelt keys and names.
 */

/**
 * Edit distance between two strings counting an insertion, a deletion, a substitution or a swap
 * of two neighbouring letters as one edit (optimal string alignment: Damerau, Commun. ACM 7, 171
 * (1964)), so that "nmae" is one edit from "name", as a typing slip is.
 */
export function editDistance(a: string, b: string): number {
  let before = new Array<number>(b.length + 1).fill(0);
  let previous = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const current = new Array<number>(b.length + 1);
    current[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const substitute = previous[j - 1]! + (a[i - 1] === b[j - 1] ? 0 : 1);
      let d = Math.min(previous[j]! + 1, current[j - 1]! + 1, substitute);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d = Math.min(d, before[j - 2]! + 1);
      current[j] = d;
    }
    before = previous;
    previous = current;
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

/**
 * Words people write for a key, by the key they mean: a name from the trade is no misspelling
 * of a short key ("T1" is one edit from "to", but means the lifetime). Suggested only where
 * the key exists.
 */
const KEY_SYNONYMS: Readonly<Record<string, readonly string[]>> = {
  lifetime: ['t1', 't_1', 'tau', 'relaxationtime', 'decaytime', 'relaxation', 'time'],
  rate: ['gamma', 'relaxationrate', 'decayrate'],
  sampleRate: ['fs', 'samplingrate', 'samplingfrequency', 'samplefrequency', 'adcrate'],
  frequency: ['freq', 'f', 'carrierfrequency'],
  temperature: ['temp', 't', 'te'],
  level: ['current', 'amplitude', 'mean', 'signal'],
  density: ['psd', 'asd', 'noisedensity', 'spectraldensity'],
  recordLength: ['duration', 'recordduration', 'recordtime'],
  splitting: ['energy', 'zeeman', 'gap'],
};

/**
 * The key that `word` (an unknown key) most likely means among `keys`: the key it names in the
 * trade's words (KEY_SYNONYMS), else the closest spelling (`closest`).
 */
export function suggestKey(word: string, keys: readonly string[]): string | undefined {
  const w = word.toLowerCase();
  const meant = keys.find((k) => KEY_SYNONYMS[k]?.includes(w));
  return meant ?? closest(word, keys);
}
