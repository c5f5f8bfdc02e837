/**
 * "Did you mean" suggestions by edit distance.
 *
 * Distance is the optimal string alignment distance (Levenshtein distance
 * plus transposition of two adjacent characters; Damerau 1964,
 * "A technique for computer detection and correction of spelling errors"),
 * compared case-insensitively. A candidate qualifies when
 * distance <= max(1, floor(length / 3)) of the longer word, so short names
 * allow one slip and longer ones a few.
 *
 * Bounded cost (the editor checks on every keystroke, and a header may have
 * 10,000 columns): only candidates whose length is within the allowed
 * distance are compared (the distance is at least the length difference);
 * each comparison fills only the diagonal band of width 2k + 1 of the table
 * and stops as soon as two rows exceed k (Ukkonen 1985, "Algorithms for
 * approximate string matching", the cutoff for a distance bounded by k);
 * results are kept per word and candidate list within one check; and a
 * `Suggester` stops suggesting once it has spent its budget of table cells
 * (`MAX_SUGGEST_CELLS`), so a spec with thousands of unknown names still checks
 * in a fraction of a second. The suggestions themselves never change, only
 * whether the later ones are looked for.
 */
import { MAX_SUGGEST_CELLS } from './limits';

export function editDistance(a: string, b: string): number {
  const s = a.toLowerCase();
  const t = b.toLowerCase();
  return bandedDistance(s, t, Math.max(s.length, t.length)).d;
}

/**
 * min(distance(a, b), k + 1) for lower-cased `s`, `t`, with the number of
 * table cells it filled. Rows i = 1…m, columns j within [i − k, i + k]; cells
 * outside the band are worth more than k and read as k + 1.
 */
function bandedDistance(s: string, t: string, k: number): { d: number; cells: number } {
  const m = s.length;
  const n = t.length;
  const over = k + 1;
  if (Math.abs(m - n) > k) return { d: over, cells: 0 };
  if (m === 0 || n === 0) return { d: Math.max(m, n), cells: 0 };
  let prev2 = new Array<number>(n + 1).fill(over);
  let prev = new Array<number>(n + 1).fill(over);
  let cur = new Array<number>(n + 1).fill(over);
  for (let j = 0; j <= Math.min(n, k); j++) prev[j] = j;
  let cells = 0;
  let lastMin = 0;
  for (let i = 1; i <= m; i++) {
    const lo = Math.max(1, i - k);
    const hi = Math.min(n, i + k);
    cur[lo - 1] = lo === 1 && i <= k ? i : over;
    let rowMin = cur[lo - 1];
    for (let j = lo; j <= hi; j++) {
      const cost = s.charCodeAt(i - 1) === t.charCodeAt(j - 1) ? 0 : 1;
      let d = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost);
      if (i > 1 && j > 1 && s.charCodeAt(i - 1) === t.charCodeAt(j - 2) && s.charCodeAt(i - 2) === t.charCodeAt(j - 1)) d = Math.min(d, prev2[j - 2] + 1);
      cur[j] = d > over ? over : d;
      if (cur[j] < rowMin) rowMin = cur[j];
    }
    if (hi < n) cur[hi + 1] = over;
    cells += hi - lo + 1;
    // A transposition reads two rows back, so stop only when this row and the one before exceed k.
    if (rowMin > k && lastMin > k) return { d: over, cells };
    lastMin = rowMin;
    [prev2, prev, cur] = [prev, cur, prev2];
  }
  return { d: prev[n], cells };
}

/** min(distance(a, b), k + 1), case-insensitive: the distance when it is at most k. */
export function boundedDistance(a: string, b: string, k: number): number {
  return bandedDistance(a.toLowerCase(), b.toLowerCase(), Math.max(0, Math.floor(k))).d;
}

/** The largest distance at which `c` is suggested for `word`. */
const allowedFor = (wordLength: number, candidateLength: number): number => Math.max(1, Math.floor(Math.max(wordLength, candidateLength) / 3));

interface Scored {
  name: string;
  d: number;
}

/**
 * Suggestions within one check: a budget of table cells shared by every
 * lookup, and a memo of the candidates of a word per candidate collection
 * (a header's column set is the same object for every name checked against it).
 */
export class Suggester {
  private spent = 0;
  private readonly memo = new WeakMap<object, Map<string, Scored[]>>();

  constructor(private readonly budget = MAX_SUGGEST_CELLS) {}

  /** Work done so far, in the units of the budget. */
  get spentCells(): number {
    return this.spent;
  }

  /** True once the budget is spent (later lookups return no suggestions). */
  get exhausted(): boolean {
    return this.spent >= this.budget;
  }

  /**
   * Up to `limit` candidates closest to `word`, nearest first (ties keep
   * candidate order, across `sources` in turn); never `word` itself, never an empty name.
   * Each source is a collection of candidate names.
   */
  suggest(word: string, sources: Iterable<string> | readonly Iterable<string>[], limit = 3): string[] {
    const lists = isListOfSources(sources) ? sources : [sources];
    const scored: Scored[] = [];
    const seen = new Set<string>();
    for (const src of lists) {
      const found = this.score(word, src);
      if (!found) return []; // budget spent part way: no suggestion rather than one that may not be the nearest
      for (const s of found) {
        if (seen.has(s.name)) continue;
        seen.add(s.name);
        scored.push(s);
      }
    }
    // Array.prototype.sort is stable: ties keep candidate order.
    scored.sort((x, y) => x.d - y.d);
    return scored.slice(0, limit).map((s) => s.name);
  }

  /**
   * Candidates of `src` within their allowed distance of `word`, in candidate
   * order (memoised for object sources); null when the budget ran out first.
   */
  private score(word: string, src: Iterable<string>): Scored[] | null {
    const byWord = typeof src === 'object' && src !== null ? this.memo.get(src) : undefined;
    const hit = byWord?.get(word);
    if (hit) return hit;
    const out: Scored[] = [];
    const w = word.toLowerCase();
    for (const c of src) {
      if (this.exhausted) return null;
      this.spent++;
      if (c === word || c === '') continue; // (an empty header cell is no name to suggest)
      const lc = c.toLowerCase();
      const k = allowedFor(w.length, lc.length);
      if (Math.abs(w.length - lc.length) > k) continue;
      const r = bandedDistance(w, lc, k);
      this.spent += r.cells;
      if (r.d <= k) out.push({ name: c, d: r.d });
    }
    if (typeof src === 'object' && src !== null) {
      let m = this.memo.get(src);
      if (!m) this.memo.set(src, (m = new Map()));
      m.set(word, out);
    }
    return out;
  }
}

function isListOfSources(x: Iterable<string> | readonly Iterable<string>[]): x is readonly Iterable<string>[] {
  return Array.isArray(x) && x.length > 0 && typeof x[0] !== 'string';
}

/** Up to `limit` candidates closest to `word`, nearest first (ties keep candidate order); never `word` itself. */
export function suggest(word: string, candidates: Iterable<string>, limit = 3): string[] {
  return new Suggester(Infinity).suggest(word, candidates, limit);
}
