/**
 * (3) Compiled model value + Jacobian vs a hand-written Float64Array loop of
 * the same formula (the floor): the four-parameter logistic
 * f = d + (a − d)/(1 + (x/c)^b) with its four partial derivatives, written as
 * a programmer would, sharing subexpressions (one pow, one log per row).
 */
import { compileModel } from '../../../engine/compile';
import { compare } from '../harness';
import { LOGISTIC_MODEL, modelSpec } from '../data';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

/** θ = [bottom, top, ec50, hill] as declared in the spec below. */
function handWritten(theta: Float64Array, x: Float64Array, n: number, out: Float64Array, jac: Float64Array): void {
  const bottom = theta[0];
  const top = theta[1];
  const c = theta[2];
  const b = theta[3];
  const amp = top - bottom;
  const j0 = 0;
  const j1 = n;
  const j2 = 2 * n;
  const j3 = 3 * n;
  for (let i = 0; i < n; i++) {
    const u = x[i] / c;
    const ub = Math.pow(u, b);
    const inv = 1 / (1 + ub);
    out[i] = bottom + amp * inv;
    const g = amp * ub * inv * inv;
    jac[j0 + i] = 1 - inv; // ∂f/∂bottom
    jac[j1 + i] = inv; // ∂f/∂top
    jac[j2 + i] = (g * b) / c; // ∂f/∂ec50
    jac[j3 + i] = -g * Math.log(u); // ∂f/∂hill
  }
}

export async function benchKernel(ctx: BenchContext): Promise<BenchRow> {
  const n = ctx.quick ? 10_000 : 1_000_000;
  const spec = modelSpec(LOGISTIC_MODEL, ['bottom = 0', 'top = 100', 'ec50 = 1', 'hill = 1']);
  const model = compileModel(spec.model, spec.params, ['x']);
  const x = Float64Array.from({ length: n }, (_, i) => 0.001 * 10 ** ((5 * i) / n));
  const theta = Float64Array.from([2, 98, 0.7, 1.3]);
  const out1 = new Float64Array(n);
  const jac1 = new Float64Array(4 * n);
  const out2 = new Float64Array(n);
  const jac2 = new Float64Array(4 * n);
  // same numbers (to rounding) before timing anything
  model.valueAndJacobian(theta, [x], n, out1, jac1);
  handWritten(theta, x, n, out2, jac2);
  let maxRel = 0;
  for (let i = 0; i < 4 * n; i++) maxRel = Math.max(maxRel, Math.abs(jac1[i] - jac2[i]) / (Math.abs(jac2[i]) + 1e-300));
  for (let i = 0; i < n; i++) maxRel = Math.max(maxRel, Math.abs(out1[i] - out2[i]) / (Math.abs(out2[i]) + 1e-300));
  const runs = ctx.quick ? 3 : 21;
  const cmp = await compare(
    () => model.valueAndJacobian(theta, [x], n, out1, jac1),
    () => handWritten(theta, x, n, out2, jac2),
    runs,
    3,
  );
  return {
    id: 3,
    name: 'Compiled model+Jacobian / hand-written loop (4PL)',
    value: cmp.ratio.median,
    unit: 'ratio',
    spread: [cmp.ratio.min, cmp.ratio.max],
    text: `${fmt(cmp.ratio.median)} (${fmt(cmp.ours.median)} vs ${fmt(cmp.other.median)} ms at n=${fmt(n, 1)}; max rel. difference ${fmt(maxRel, 2)})`,
    goal: '≤ 1.5×',
    met: cmp.ratio.median <= 1.5,
    details: { n, compiledMs: cmp.ours, handWrittenMs: cmp.other, ratio: cmp.ratio, maxRelativeDifference: maxRel },
  };
}
