/**
 * The stable sorting order of rows by one or more numeric keys, in linear
 * time: a least-significant-digit radix sort (Knuth, The Art of Computer
 * Programming vol. 3, §5.2.5, "Sorting by distribution") on the IEEE 754 bit
 * patterns of the keys, made order-preserving by flipping the sign bit of
 * non-negative numbers and every bit of negative ones (common practice). Six
 * passes of 11 bits per key column, each stable, columns from last to first,
 * so the result is the lexicographic order with ties in row order: exactly
 * what a comparison sort with the comparator "keys, then row index" gives,
 * without its O(n·log n) calls of a JavaScript comparator (measured
 * 2026-12-03 on 1e6 shuffled rows: the comparator sorts of the residual tests
 * and of the lack-of-fit settings took about 0.6 s and 0.3 s of a 4-parameter
 * fit on a quiet machine).
 *
 * Keys must be numbers other than NaN; −0 is read as +0 (the comparator sees
 * them equal). Callers map what they sort last (NaN, ±∞) to +∞ first.
 */

const BITS = 11;
const BUCKETS = 1 << BITS;
const MASK = BUCKETS - 1;

/** Row indices 0…n−1 in ascending lexicographic order of `columns` (first column first), ties in row order. */
export function radixOrder(columns: readonly ArrayLike<number>[], n: number): Int32Array {
  let idx = new Int32Array(n);
  for (let i = 0; i < n; i++) idx[i] = i;
  if (n < 2 || columns.length === 0) return idx;
  let lo = new Uint32Array(n);
  let hi = new Uint32Array(n);
  let idx2 = new Int32Array(n);
  let lo2 = new Uint32Array(n);
  let hi2 = new Uint32Array(n);
  const cell = new Float64Array(1);
  const bits = new Uint32Array(cell.buffer);
  const count = new Int32Array(BUCKETS);
  for (let c = columns.length - 1; c >= 0; c--) {
    const col = columns[c];
    // order-preserving unsigned 64-bit keys of this column, in the current order
    for (let k = 0; k < n; k++) {
      cell[0] = col[idx[k]] + 0; // −0 → +0
      let l = bits[0];
      let h = bits[1];
      if (h & 0x80000000) {
        h = ~h >>> 0;
        l = ~l >>> 0;
      } else h = (h | 0x80000000) >>> 0;
      lo[k] = l;
      hi[k] = h;
    }
    for (let pass = 0; pass < 6; pass++) {
      const shift = (pass * BITS) % 32;
      const digit = pass < 2 ? (k: number) => (lo[k] >>> shift) & MASK
        : pass === 2 ? (k: number) => ((lo[k] >>> 22) | (hi[k] << 10)) & MASK // bits 22–32 straddle the halves
          : (k: number) => (hi[k] >>> (((pass - 3) * BITS) + 1)) & MASK;
      count.fill(0);
      for (let k = 0; k < n; k++) count[digit(k)]++;
      let same = false;
      for (let b = 0; b < BUCKETS; b++) if (count[b] === n) same = true;
      if (same) continue; // every key has this digit: the pass would not move anything
      let sum = 0;
      for (let b = 0; b < BUCKETS; b++) {
        const t = count[b];
        count[b] = sum;
        sum += t;
      }
      for (let k = 0; k < n; k++) {
        const at = count[digit(k)]++;
        idx2[at] = idx[k];
        lo2[at] = lo[k];
        hi2[at] = hi[k];
      }
      [idx, idx2] = [idx2, idx];
      [lo, lo2] = [lo2, lo];
      [hi, hi2] = [hi2, hi];
    }
  }
  return idx;
}
