/**
 * Random streams of the bootstrap: one independent stream per replicate, so a
 * replicate's sample depends only on (seed, replicate index), never on which
 * thread draws it or in which order (results are bit-identical for any number
 * of threads).
 *
 * Generator: xoshiro128** (Blackman & Vigna 2021, "Scrambled linear
 * pseudorandom number generators", ACM TOMS 47(4), §4), 128 bits of state,
 * period 2¹²⁸ − 1. Its state for replicate b is filled by SplitMix32-style
 * mixing of (seed, b): the finaliser of MurmurHash3 (Appleby 2008, fmix32)
 * applied to a Weyl sequence, the seeding Blackman & Vigna recommend (§5: fill
 * the state from a different generator) so nearby seeds and indices give
 * unrelated streams. Written here rather than taken from a package: it is 30
 * lines, and the streams must be bit-identical on every platform and thread.
 *
 * Uniform indices: ⌊u·n⌋ with u a 53-bit uniform in [0, 1) from two outputs;
 * its bias is below n·2⁻⁵³ (negligible for any n that fits in memory).
 */

const GOLDEN = 0x9e3779b9;

function fmix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

export interface Stream {
  /** A uniform 32-bit unsigned integer. */
  next32(): number;
  /** A uniform number in [0, 1) with 53 random bits. */
  uniform(): number;
  /** A uniform whole number in [0, n). */
  index(n: number): number;
}

/** The stream of replicate `replicate` under `seed` (both whole numbers 0 … 2³² − 1; larger indices wrap). */
export function replicateStream(seed: number, replicate: number): Stream {
  // SplitMix32-style: a Weyl sequence over (seed, replicate) through fmix32
  let w = (fmix32((seed >>> 0) ^ 0x5bd1e995) ^ Math.imul(replicate >>> 0, 0x27d4eb2f)) >>> 0;
  const fill = () => {
    w = (w + GOLDEN) >>> 0;
    return fmix32(w);
  };
  let s0 = fill();
  let s1 = fill();
  let s2 = fill();
  let s3 = fill();
  if ((s0 | s1 | s2 | s3) === 0) s0 = 1; // the all-zero state is a fixed point
  const rotl = (x: number, k: number) => ((x << k) | (x >>> (32 - k))) >>> 0;
  const next32 = (): number => {
    const result = Math.imul(rotl(Math.imul(s1, 5) >>> 0, 7), 9) >>> 0;
    const t = (s1 << 9) >>> 0;
    s2 = (s2 ^ s0) >>> 0;
    s3 = (s3 ^ s1) >>> 0;
    s1 = (s1 ^ s2) >>> 0;
    s0 = (s0 ^ s3) >>> 0;
    s2 = (s2 ^ t) >>> 0;
    s3 = rotl(s3, 11);
    return result;
  };
  const uniform = (): number => ((next32() >>> 5) * 67108864 + (next32() >>> 6)) / 9007199254740992;
  return { next32, uniform, index: (n) => Math.floor(uniform() * n) };
}
