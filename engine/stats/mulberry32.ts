/**
 * mulberry32: a small fixed-seed generator of uniform numbers on [0, 1)
 * (public-domain 32-bit algorithm by Tommy Ettinger; common practice for
 * reproducible test data and fixed-seed trial points). One implementation for
 * the engine (the nesting check's trial parameters) and the tests
 * (`test/fixtures/random.ts` re-exports it), so a seed gives the same sequence
 * wherever it is drawn. Not for statistics that need long independent
 * streams: the bootstrap has its own generator (`engine/run/bootstrap-rng.ts`).
 */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
