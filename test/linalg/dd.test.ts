import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { DD_OUT, twoProd, ddAdd, ddSub, ddMul, ddDiv, ddSqrt, ddPowInt } from '../../engine/linalg/dd';
import { exact, withinRelative, SCALE_BITS } from './exact';

/** A normalised double-double (hi, lo) with |lo| ≤ ulp(hi)/2. */
const ddArb = fc.tuple(
  fc.double({ min: 1e-3, max: 1e3, noNaN: true }),
  fc.boolean(),
  fc.double({ min: -0.5, max: 0.5, noNaN: true }),
).map(([m, negative, f]) => {
  const h = negative ? -m : m;
  const l = f * 2 ** (Math.floor(Math.log2(Math.abs(h))) - 53);
  const s = h + l;
  return [s, l - (s - h)] as const;
});

const val = (h: number, l: number) => exact(h) + exact(l);

describe('engine/linalg/dd double-double arithmetic (exact rational oracle)', () => {
  it('twoProd is an exact product (Dekker 1971)', () => {
    fc.assert(fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.double({ min: -1e6, max: 1e6, noNaN: true }), (a, b) => {
      // Exclude products that underflow (the error term would not be representable).
      fc.pre(a === 0 || b === 0 || Math.abs(a * b) > 1e-200);
      twoProd(a, b);
      expect((exact(DD_OUT[0]) + exact(DD_OUT[1])) << SCALE_BITS).toBe(exact(a) * exact(b));
    }), { numRuns: 500, seed: 1 });
  });

  it('add, subtract and multiply are accurate to about 2^-104', () => {
    fc.assert(fc.property(ddArb, ddArb, ([ah, al], [bh, bl]) => {
      const a = val(ah, al);
      const b = val(bh, bl);
      ddAdd(ah, al, bh, bl);
      const sum = a + b;
      if (sum !== 0n) expect(withinRelative(val(DD_OUT[0], DD_OUT[1]), sum, 102)).toBe(true);
      ddSub(ah, al, bh, bl);
      const diff = a - b;
      if (diff !== 0n) expect(withinRelative(val(DD_OUT[0], DD_OUT[1]), diff, 102)).toBe(true);
      ddMul(ah, al, bh, bl);
      expect(withinRelative(val(DD_OUT[0], DD_OUT[1]) << SCALE_BITS, a * b, 102)).toBe(true);
    }), { numRuns: 500, seed: 2 });
  });

  it('divide and square root are accurate to about 2^-100', () => {
    fc.assert(fc.property(ddArb, ddArb, ([ah, al], [bh, bl]) => {
      const a = val(ah, al);
      const b = val(bh, bl);
      ddDiv(ah, al, bh, bl);
      expect(withinRelative(val(DD_OUT[0], DD_OUT[1]) * b, a << SCALE_BITS, 100)).toBe(true);
      const [sh, sl] = ah > 0 ? [ah, al] : [-ah, -al];
      ddSqrt(sh, sl);
      const r = val(DD_OUT[0], DD_OUT[1]);
      expect(withinRelative(r * r, val(sh, sl) << SCALE_BITS, 99)).toBe(true);
    }), { numRuns: 500, seed: 3 });
  });

  it('integer powers by binary powering: x^k to about 2^-98', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 1 << 22 }), fc.integer({ min: 0, max: 12 }), (m, k) => {
      const x = m / 2 ** 20;
      ddPowInt(x, 0, k);
      // x^k = m^k / 2^(20k) exactly.
      const want = (BigInt(m) ** BigInt(k)) << (SCALE_BITS - BigInt(20 * k));
      expect(withinRelative(val(DD_OUT[0], DD_OUT[1]), want, 98)).toBe(true);
    }), { numRuns: 300, seed: 4 });
    ddPowInt(2, 0, -3);
    expect(DD_OUT[0]).toBe(0.125);
    expect(DD_OUT[1]).toBe(0);
  });
});
