/**
 * The stable sorting order of rows by one or more numeric keys, in linear
 * time: a least-significant-digit radix sort (Knuth, The Art of Computer
 * Programming vol. 3, §5.2.5, "Sorting by distribution") on the IEEE 754 bit
 * patterns of the keys, made order-preserving by flipping the sign bit of
 * non-negative numbers and every bit of negative ones (common practice). Six
 * passes of 11 bits per key column, each stable, columns from last to first,
 * so the result is the lexicographic order with ties in row order: exactly
 * what a comparison sort with the comparator "keys, then row index" gives,
 * without its O(n·log n) calls of a JavaScript comparator. Measured
 * 2026-12-03 in process on 1e6 shuffled values, 2 cores under heavy sharing
 * (load average about 20): the comparator sort 5.1–11.1 s, this 1.7–3.5 s,
 * the same order each time; in a CLI fit of 1e6 shuffled rows the two
 * comparator sorts (residual tests, lack-of-fit settings) had taken 6.8 s of
 * 38 s under that load.
 *
 * Keys must be numbers other than NaN; −0 is read as +0 (the comparator sees
 * them equal). Callers map what they sort last (NaN, ±∞) to +∞ first.
 */

const BITS = 11;
const BUCKETS = 1 << BITS;
const MASK = BUCKETS - 1;

/** The 11-bit digit `pass` (0 = least significant) of each 64-bit key (hi·2³² + lo) into `out`. */
function digits(lo: Uint32Array, hi: Uint32Array, pass: number, out: Uint16Array, n: number): void {
  if (pass < 2) {
    const shift = pass * BITS;
    for (let k = 0; k < n; k++) out[k] = (lo[k] >>> shift) & MASK;
  } else if (pass === 2) {
    // bits 22–32 straddle the two halves
    for (let k = 0; k < n; k++) out[k] = ((lo[k] >>> 22) | (hi[k] << 10)) & MASK;
  } else {
    const shift = (pass - 3) * BITS + 1;
    for (let k = 0; k < n; k++) out[k] = (hi[k] >>> shift) & MASK;
  }
}

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
  const dig = new Uint16Array(n);
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
      digits(lo, hi, pass, dig, n);
      count.fill(0);
      for (let k = 0; k < n; k++) count[dig[k]]++;
      if (count[dig[0]] === n) continue; // every key has this digit: the pass would not move anything
      let sum = 0;
      for (let b = 0; b < BUCKETS; b++) {
        const t = count[b];
        count[b] = sum;
        sum += t;
      }
      for (let k = 0; k < n; k++) {
        const at = count[dig[k]]++;
        idx2[at] = idx[k];
        lo2[at] = lo[k];
        hi2[at] = hi[k];
      }
      let t32 = lo;
      lo = lo2;
      lo2 = t32;
      t32 = hi;
      hi = hi2;
      hi2 = t32;
      const ti = idx;
      idx = idx2;
      idx2 = ti;
    }
  }
  return idx;
}
