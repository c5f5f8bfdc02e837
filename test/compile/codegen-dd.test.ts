import { describe, it, expect } from 'vitest';
import { compileModel } from '../../engine/compile/index';
import { infix } from '../strd/infix';
import { exact, withinRelative, SCALE_BITS } from '../linalg/exact';

describe('engine/compile/codegen-dd double-double kernels (exact rational oracle)', () => {
  it('design-matrix entries x^k are exact to ~2^-98 where double rounding gives ~2^-53', () => {
    const params = ['b0', 'b5', 'b10'];
    const m = compileModel(infix('b0 + b5*x^5 + b10*x^10', params), params, ['x']);
    const ints = [1, 3, 7_000_001, 9_437_183, 5_123_457];
    const x = Float64Array.from(ints, (k) => -k / 2 ** 20);
    const n = x.length;
    const [h, l, jh, jl] = [new Float64Array(n), new Float64Array(n), new Float64Array(3 * n), new Float64Array(3 * n)];
    m.valueAndJacobianExtended(Float64Array.from([1, 2, 3]), [x], n, h, l, jh, jl);
    let doubleWorse = 0;
    const dj = new Float64Array(3 * n);
    m.valueAndJacobian(Float64Array.from([1, 2, 3]), [x], n, new Float64Array(n), dj);
    ints.forEach((k, i) => {
      const want10 = (BigInt(-k) ** 10n) << (SCALE_BITS - 200n);
      expect(withinRelative(exact(jh[2 * n + i]) + exact(jl[2 * n + i]), want10, 98)).toBe(true);
      const want5 = (BigInt(-k) ** 5n) << (SCALE_BITS - 100n);
      expect(withinRelative(exact(jh[n + i]) + exact(jl[n + i]), want5, 98)).toBe(true);
      if (!withinRelative(exact(dj[2 * n + i]), want10, 60)) doubleWorse++;
    });
    // The plain double kernel is accurate only to double precision.
    expect(doubleWorse).toBeGreaterThan(0);
  });

  it('quotients and square roots in the value are double-double accurate', () => {
    const m = compileModel(infix('a*x/3 + sqrt(x)', ['a']), ['a'], ['x']);
    const x = Float64Array.from([2, 10, 1e-3]);
    const [h, l, jh, jl] = [new Float64Array(3), new Float64Array(3), new Float64Array(3), new Float64Array(3)];
    m.valueAndJacobianExtended(Float64Array.from([1]), [x], 3, h, l, jh, jl);
    for (let i = 0; i < 3; i++) {
      // ∂/∂a = x/3: check 3·q ≈ x
      const q = exact(jh[i]) + exact(jl[i]);
      expect(withinRelative(3n * q, exact(x[i]), 100)).toBe(true);
    }
  });
});
