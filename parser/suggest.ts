/**
 * "Did you mean" suggestions by edit distance.
 *
 * Distance is the optimal string alignment distance (Levenshtein distance
 * plus transposition of two adjacent characters; Damerau 1964,
 * "A technique for computer detection and correction of spelling errors"),
 * compared case-insensitively. A candidate qualifies when
 * distance <= max(1, floor(length / 3)) of the longer word, so short names
 * allow one slip and longer ones a few.
 */

export function editDistance(a: string, b: string): number {
  const s = a.toLowerCase();
  const t = b.toLowerCase();
  const m = s.length;
  const n = t.length;
  if (m === 0) return n;
  if (n === 0) return m;
  // Three rolling rows: i-2, i-1, i.
  let prev2 = new Array<number>(n + 1).fill(0);
  let prev = Array.from({ length: n + 1 }, (_, j) => j);
  let cur = new Array<number>(n + 1).fill(0);
  for (let i = 1; i <= m; i++) {
    cur[0] = i;
    for (let j = 1; j <= n; j++) {
      const cost = s[i - 1] === t[j - 1] ? 0 : 1;
      let d = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost);
      if (i > 1 && j > 1 && s[i - 1] === t[j - 2] && s[i - 2] === t[j - 1]) d = Math.min(d, prev2[j - 2] + 1);
      cur[j] = d;
    }
    [prev2, prev, cur] = [prev, cur, prev2];
  }
  return prev[n];
}

/** Up to `limit` candidates closest to `word`, nearest first (ties keep candidate order); never `word` itself. */
export function suggest(word: string, candidates: Iterable<string>, limit = 3): string[] {
  const scored: { name: string; d: number; i: number }[] = [];
  const seen = new Set<string>();
  let i = 0;
  for (const c of candidates) {
    if (c === word || seen.has(c)) continue;
    seen.add(c);
    const d = editDistance(word, c);
    const allowed = Math.max(1, Math.floor(Math.max(word.length, c.length) / 3));
    if (d <= allowed) scored.push({ name: c, d, i: i++ });
  }
  scored.sort((x, y) => x.d - y.d || x.i - y.i);
  return scored.slice(0, limit).map((s) => s.name);
}
