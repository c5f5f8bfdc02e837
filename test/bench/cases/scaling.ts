/**
 * (8) Scaling of a linear fit (compiled model → `solveLinear`, the default
 * path with refinement) with the number of rows n (1e3…1e6, p = 4) and of
 * parameters p (2…20, n = 1e5). Model: a cosine series
 * c0 + Σ c_j·cos(j·x) on x ∈ [0, π] (well conditioned at every p).
 * Exponents are log-log least-squares slopes. Householder QR costs
 * 2np² − 2p³/3 flops (Golub & Van Loan, Matrix Computations, 4th ed., §5.2.2)
 * and the model and Jacobian evaluation O(np), so time ∝ n·p^b with b ≤ 2.
 */
import { compileModel } from '../../../engine/compile';
import { modelProblem, solveLinear } from '../../../engine/solve';
import { logLogSlope, measure } from '../harness';
import { modelSpec } from '../data';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

function cosineSeries(p: number) {
  const terms = ['c0', ...Array.from({ length: p - 1 }, (_, j) => `c${j + 1} * cos(${j + 1} * x)`)];
  const spec = modelSpec(terms.join(' + '), Array.from({ length: p }, (_, j) => `c${j}`));
  return compileModel(spec.model, spec.params, ['x']);
}

function dataFor(n: number, p: number) {
  const x = Float64Array.from({ length: n }, (_, i) => (Math.PI * i) / (n - 1));
  const y = x.map((v, i) => {
    let s = 1;
    for (let j = 1; j < p; j++) s += Math.cos(j * v) / j;
    return s + 0.01 * Math.sin(977 * i);
  });
  return { x, y };
}

async function timeFit(n: number, p: number, runs: number): Promise<number> {
  const model = cosineSeries(p);
  const { x, y } = dataFor(n, p);
  const t = await measure(() => solveLinear(modelProblem({ model, columns: [x], response: y, n })), runs);
  return t.median;
}

export async function benchScaling(ctx: BenchContext): Promise<BenchRow> {
  const ns = ctx.quick ? [1000, 3000, 10_000] : [1e3, 1e4, 1e5, 1e6];
  const ps = ctx.quick ? [2, 4, 8] : [2, 4, 8, 12, 16, 20];
  const nFixed = ctx.quick ? 10_000 : 1e5;
  const byN: number[] = [];
  for (const n of ns) {
    ctx.log(`  (8) n = ${n}`);
    byN.push(await timeFit(n, 4, ctx.quick ? 1 : n >= 1e6 ? 5 : 15));
  }
  const byP: number[] = [];
  for (const p of ps) {
    ctx.log(`  (8) p = ${p}`);
    byP.push(await timeFit(nFixed, p, ctx.quick ? 1 : 9));
  }
  const a = logLogSlope(ns, byN);
  const b = logLogSlope(ps, byP);
  // upper half of the p range, where the O(np²) factorisation dominates fixed and O(np) costs
  const half = Math.floor(ps.length / 2);
  const bHigh = logLogSlope(ps.slice(half), byP.slice(half));
  const table = (xs: number[], ts: number[], label: string) => xs.map((v, i) => `${label}=${fmt(v, 2)}: ${fmt(ts[i])} ms`).join(', ');
  return {
    id: 8,
    name: 'Scaling of a linear fit: time ∝ n^a · p^b',
    value: a,
    unit: 'exponent a',
    spread: null,
    text: `a = ${fmt(a)} (p = 4), b = ${fmt(b)} over p ${ps[0]}–${ps[ps.length - 1]} (b = ${fmt(bHigh)} for p ≥ ${ps[half]}, n = ${fmt(nFixed, 1)})`,
    goal: 'n·p²: 0.8 ≤ a ≤ 1.2, b ≤ 2.2',
    met: a >= 0.8 && a <= 1.2 && b <= 2.2 && bHigh <= 2.2,
    details: { byN: table(ns, byN, 'n'), byP: table(ps, byP, 'p'), n: ns, msByN: byN, p: ps, msByP: byP, exponentN: a, exponentP: b, exponentPUpperHalf: bHigh },
  };
}
