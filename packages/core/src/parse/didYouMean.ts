/**
 * Spelling suggestions for unknown keys and values in a design file.
 */

/**
 * Edit distance with adjacent transpositions (optimal string alignment): the number of
 * single-character insertions, deletions, substitutions or swaps turning `a` into `b`.
 * Standard dynamic programme (Damerau 1964's operations, Levenshtein 1966's distance).
 *
 * @param a first word
 * @param b second word
 * @returns the distance, a whole number >= 0
 * @example editDistance('tial', 'tail') // 1
 */
export function editDistance(a: string, b: string): number {
  const s = [...a];
  const t = [...b];
  const cols = t.length + 1;
  // Three rolling rows: two back (for transpositions), previous, current.
  let prev2 = new Array<number>(cols).fill(0);
  let prev = Array.from({ length: cols }, (_, j) => j);
  let cur = new Array<number>(cols).fill(0);
  for (let i = 1; i <= s.length; i += 1) {
    cur[0] = i;
    for (let j = 1; j <= t.length; j += 1) {
      const cost = s[i - 1] === t[j - 1] ? 0 : 1;
      let d = Math.min((prev[j] ?? 0) + 1, (cur[j - 1] ?? 0) + 1, (prev[j - 1] ?? 0) + cost);
      if (i > 1 && j > 1 && s[i - 1] === t[j - 2] && s[i - 2] === t[j - 1]) {
        d = Math.min(d, (prev2[j - 2] ?? 0) + 1);
      }
      cur[j] = d;
    }
    [prev2, prev, cur] = [prev, cur, prev2];
  }
  return prev[t.length] ?? 0;
}

/** Words people type for a field under another name (common practice, no source). */
const ALIASES: Readonly<Record<string, string>> = {
  width: 'w',
  length: 'l',
  vt: 'vt0',
  vth: 'vt0',
  vth0: 'vt0',
  threshold: 'vt0',
  temp: 'temperature',
  bias: 'tail',
  ibias: 'tail',
  itail: 'tail',
  instance: 'instances',
  count: 'instances',
  type: 'polarity',
  // The old spellings of the process's smallest drawn width and length.
  wmin: 'min_w',
  lmin: 'min_l',
};

/**
 * The candidate closest to `word`, if it is close enough to be a likely typo: compared without
 * case; one- and two-letter words only when they differ in case, longer ones within about one
 * edit per three letters (at least one).
 *
 * @param word what the user wrote
 * @param candidates the accepted spellings
 * @returns the suggestion, or undefined when none is plausible
 * @example closestWord('inptu', ['input', 'load']) // 'input'
 */
export function closestWord(word: string, candidates: readonly string[]): string | undefined {
  const lower = word.toLowerCase();
  const alias = Object.hasOwn(ALIASES, lower) ? ALIASES[lower] : undefined;
  if (alias !== undefined && candidates.includes(alias)) return alias;
  let best: string | undefined;
  let bestDistance = Number.POSITIVE_INFINITY;
  for (const c of candidates) {
    const d = editDistance(lower, c.toLowerCase());
    if (d < bestDistance) {
      best = c;
      bestDistance = d;
    }
  }
  if (best === undefined) return undefined;
  // One- and two-letter words are all within one edit of each other: only a case slip counts.
  const shortest = Math.min([...best].length, [...lower].length);
  const allowed = shortest < 3 ? 0 : Math.max(1, Math.floor(Math.max([...best].length, [...lower].length) / 3));
  return bestDistance <= allowed ? best : undefined;
}
