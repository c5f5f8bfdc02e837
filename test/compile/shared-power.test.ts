import { describe, it, expect } from 'vitest';
import { compileModel } from '../../engine/compile/index';
import { infix } from '../strd/infix';

/**
 * engine/compile codegen: d(u^b)/dc = b·u^(b−1)·u′ is computed as b·(u^b/u)
 * from the value's own power when that is safe, else by pow (guarded path).
 * Reference: the textbook rule written with Math.pow (calculus, from memory),
 * with the limit rule of derive.ts: a zero inner derivative u′ (x = 0) gives 0.
 */
describe('engine/compile codegen shared powers', () => {
  const P = ['c', 'b'];
  const m = compileModel(infix('(x/c)^b', P), P, ['x']);

  it('emits one division from the shared power, with pow only as the guarded fallback', () => {
    const src = m.source.valueAndJacobian;
    expect(src).toMatch(/\? v\d+ \/ v\d+ : M\.pow\(v\d+, v\d+\)/);
    // the value's own pow is still one call per row
    expect(src.match(/= M\.pow\(/g)).toHaveLength(1);
  });

  it('agrees with the pow form, including zero, subnormal, overflowing and negative bases', () => {
    const cases: [number, number][] = [[0.7, 1.3], [2, 2], [1e-3, 0.5], [1, 3], [3, -1.5]];
    const x = Float64Array.from([0, 1e-300, 1e-200, 1e200, 1e300, -3, -0.5, 0.25, 1, 7.5, 1e-310]);
    const n = x.length;
    for (const [c, b] of cases) {
      const out = new Float64Array(n);
      const jac = new Float64Array(2 * n);
      m.valueAndJacobian(Float64Array.from([c, b]), [x], n, out, jac);
      for (let i = 0; i < n; i++) {
        const u = x[i] / c;
        // ∂/∂c (x/c)^b = b·u^(b−1)·(−x/c²)
        const inner = -(u / c);
        const ref = inner === 0 ? 0 : b * Math.pow(u, b - 1) * inner;
        const got = jac[i];
        if (!Number.isFinite(ref) || ref === 0) {
          // same non-finite or zero outcome as the pow form
          expect(Number.isNaN(got)).toBe(Number.isNaN(ref));
          // (the sign of a zero is not part of the contract)
          if (!Number.isNaN(ref)) expect(got === 0 ? 0 : got).toBe(ref === 0 ? 0 : ref);
        } else {
          expect(Math.abs(got - ref) / Math.abs(ref)).toBeLessThan(1e-14);
        }
      }
    }
  });
});
