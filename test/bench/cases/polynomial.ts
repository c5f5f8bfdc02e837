/**
 * (2) Linear least squares, cubic polynomial, n = 1e4, 1e5, 1e6: ours
 * (compiled model → `solveLinear`: pivoted Householder QR plus iterative
 * refinement, the default path of a linear fit) vs ml-matrix
 * (`new QrDecomposition(X).solve(y)`). Both timings include building the
 * design matrix from x; compiling the model is outside (done once per fit).
 * Accuracy: LRE of each coefficient against the exact least-squares solution
 * (`exact.ts`), minimum over the four coefficients.
 */
import { Matrix, QrDecomposition } from 'ml-matrix';
import { compileModel } from '../../../engine/compile';
import { modelProblem, solveLinear } from '../../../engine/solve';
import { compare } from '../harness';
import { modelSpec } from '../data';
import { exactCubic, lre } from '../exact';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

function ours(model: ReturnType<typeof compileModel>, x: Float64Array, y: Float64Array, refine = true): Float64Array {
  const problem = modelProblem({ model, columns: [x], response: y, n: x.length });
  return solveLinear(problem, { refine }).theta;
}

function theirs(x: Float64Array, y: Float64Array): Float64Array {
  const n = x.length;
  const X = new Matrix(n, 4);
  const Y = new Matrix(n, 1);
  // ml-matrix keeps one Float64Array per row in `data` (not in its typings); filling it directly is its fastest path
  const xRows = (X as unknown as { data: Float64Array[] }).data;
  const yRows = (Y as unknown as { data: Float64Array[] }).data;
  for (let i = 0; i < n; i++) {
    const v = x[i];
    const row = xRows[i];
    row[0] = 1;
    row[1] = v;
    row[2] = v * v;
    row[3] = v * v * v;
    yRows[i][0] = y[i];
  }
  const b = new QrDecomposition(X).solve(Y);
  return Float64Array.from({ length: 4 }, (_, j) => b.get(j, 0));
}

export async function benchPolynomial(ctx: BenchContext): Promise<BenchRow> {
  const sizes = ctx.quick ? [1000, 5000] : [1e4, 1e5, 1e6];
  const spec = modelSpec('c0 + c1 * x + c2 * x^2 + c3 * x^3', ['c0', 'c1', 'c2', 'c3']);
  const model = compileModel(spec.model, spec.params, ['x']);
  const details: Record<string, unknown> = {};
  const parts: string[] = [];
  let met = true;
  let worst: { median: number; min: number; max: number } | null = null;
  for (const n of sizes) {
    ctx.log(`  (2) n = ${n}`);
    const data = exactCubic(n);
    const lreOf = (theta: Float64Array) => Math.min(...data.beta.map((b, j) => lre(theta[j], b)));
    const lreOurs = lreOf(ours(model, data.x, data.y));
    const lreNoRefine = lreOf(ours(model, data.x, data.y, false));
    const lreTheirs = lreOf(theirs(data.x, data.y));
    const runs = ctx.quick ? 1 : n >= 1e6 ? 5 : 9;
    const cmp = await compare(() => ours(model, data.x, data.y), () => theirs(data.x, data.y), runs);
    details[`n=${n}`] = { oursMs: cmp.ours, mlMatrixMs: cmp.other, ratio: cmp.ratio, lreOurs, lreOursWithoutRefinement: lreNoRefine, lreMlMatrix: lreTheirs };
    parts.push(`n=${fmt(n, 1)}: ${fmt(cmp.ratio.median)} (${fmt(cmp.ours.median)} vs ${fmt(cmp.other.median)} ms; LRE ${fmt(lreOurs)} vs ${fmt(lreTheirs)})`);
    // equal accuracy within 0.1 digit, or better
    if (!(cmp.ratio.median <= 1 && lreOurs >= lreTheirs - 0.1)) met = false;
    if (!worst || cmp.ratio.median > worst.median) worst = { median: cmp.ratio.median, min: cmp.ratio.min, max: cmp.ratio.max };
  }
  return {
    id: 2,
    name: 'Cubic linear LS: ours / ml-matrix QR (time ratio, LRE)',
    value: worst!.median,
    unit: 'ratio',
    spread: [worst!.min, worst!.max],
    text: parts.join('; '),
    goal: 'ratio ≤ 1.0 at equal or better LRE',
    met,
    details,
  };
}
