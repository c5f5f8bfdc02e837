import { describe, expect, it } from 'vitest';
import { MAX_CARVED, SLAB_BYTES, workArray } from '../../engine/linalg/work-array';

describe('engine/linalg/work-array', () => {
  it('gives zero-filled arrays of the length asked for, whose elements no other array shares', () => {
    const arrays = Array.from({ length: 400 }, (_, k) => workArray(9 + (k % 40)));
    arrays.forEach((a, k) => {
      expect(a).toBeInstanceOf(Float64Array);
      expect(a.length).toBe(9 + (k % 40));
      expect(a.every((v) => v === 0)).toBe(true);
      a.fill(k + 1);
    });
    // every array still holds only its own value: no two overlap
    arrays.forEach((a, k) => expect(a.every((v) => v === k + 1)).toBe(true));
    // more than one slab was used, none reused from the start
    expect(new Set(arrays.map((a) => a.buffer)).size).toBeGreaterThan(1);
    for (const a of arrays) expect(a.buffer.byteLength).toBe(SLAB_BYTES);
  });

  it('allocates short, long and odd lengths as plain arrays of their own', () => {
    for (const n of [0, 1, 8, MAX_CARVED + 1, 100_000]) {
      const a = workArray(n);
      expect(a.length).toBe(n);
      expect(a.buffer.byteLength).toBe(n * 8);
    }
    expect(() => workArray(-1)).toThrow(RangeError);
    // a carved array after odd requests still starts on an element boundary
    const after = workArray(10);
    expect(after.byteOffset % 8).toBe(0);
    expect(after.length).toBe(10);
  });
});
