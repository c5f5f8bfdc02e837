/**
 * Exact rational checks for double-double arithmetic: every finite double is
 * an integer multiple of 2⁻¹⁰⁷⁴, so v·2¹⁰⁷⁴ is an exact BigInt.
 */
export const SCALE_BITS = 1074n;

/** v·2¹⁰⁷⁴ exactly. */
export function exact(v: number): bigint {
  if (!Number.isFinite(v)) throw new RangeError('finite values only');
  if (v === 0) return 0n;
  const view = new DataView(new ArrayBuffer(8));
  view.setFloat64(0, v);
  const hi = view.getUint32(0);
  const lo = view.getUint32(4);
  const expBits = (hi >>> 20) & 0x7ff;
  let mant = (BigInt(hi & 0xfffff) << 32n) | BigInt(lo);
  let e: number;
  if (expBits === 0) e = -1074;
  else {
    mant |= 1n << 52n;
    e = expBits - 1075;
  }
  const r = mant << BigInt(e + 1074);
  return hi >>> 31 ? -r : r;
}

export const abs = (x: bigint) => (x < 0n ? -x : x);

/** |got − want| ≤ 2^−bits·|want| for BigInts on the same scale. */
export function withinRelative(got: bigint, want: bigint, bits: number): boolean {
  return abs(got - want) << BigInt(bits) <= abs(want);
}
