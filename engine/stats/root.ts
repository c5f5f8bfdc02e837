/**
 * Brent's root finder (Brent 1973, Algorithms for Minimization without
 * Derivatives, ch. 4, procedure "zero"): bisection safeguarded inverse
 * quadratic / secant steps on a sign-changing bracket [a, b].
 *
 * Tolerance: stops when the bracket half-width ≤ 2·ε·|b| + tol/2 (ε = 2⁻⁵²),
 * `tol` default 1e-12·max(1, |a|, |b|), or f(b) = 0; at most 200 iterations.
 */

export function brentRoot(f: (x: number) => number, a: number, b: number, tol?: number): number | null {
  let fa = f(a);
  let fb = f(b);
  if (!Number.isFinite(fa) || !Number.isFinite(fb)) return null;
  if (fa === 0) return a;
  if (fb === 0) return b;
  if (Math.sign(fa) === Math.sign(fb)) return null;
  const t = tol ?? 1e-12 * Math.max(1, Math.abs(a), Math.abs(b));
  const eps = 2 ** -52;
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let iter = 0; iter < 200; iter++) {
    if (Math.sign(fb) === Math.sign(fc)) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol1 = 2 * eps * Math.abs(b) + t / 2;
    const m = (c - b) / 2;
    if (Math.abs(m) <= tol1 || fb === 0) return b;
    if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
      let p: number;
      let q: number;
      const s = fb / fa;
      if (a === c) {
        p = 2 * m * s;
        q = 1 - s;
      } else {
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * m * q - Math.abs(tol1 * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = m;
        e = d;
      }
    } else {
      d = m;
      e = d;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol1 ? d : m > 0 ? tol1 : -tol1;
    fb = f(b);
    if (!Number.isFinite(fb)) return null;
  }
  return b;
}
