/**
 * Compiles resolved plan expressions into fast evaluators: the model value
 * and its exact Jacobian (symbolic differentiation with simplification and
 * shared subexpressions, `derive.ts`), and column expressions (response,
 * sigma, weight, filter). Generated code comes only from the whitelisted
 * graph (`lower.ts`, `emit.ts`); see `codegen.ts` for the kernel layout.
 */
import type { Expr } from '../../parser/plan';
import { Graph } from './graph';
import { Differentiator } from './derive';
import { lower, slotMap, CompileError } from './lower';
import { kernelSource, instantiate, type Kernel } from './codegen';
import { kernelSourceDD, instantiateDD, type KernelDD } from './codegen-dd';

export { CompileError } from './lower';
export { erf, erfc } from './special';

export interface CompiledModel {
  readonly params: readonly string[];
  readonly columns: readonly string[];
  /** out[i] = f(θ; row i) for i < n */
  value(theta: Float64Array, cols: readonly Float64Array[], n: number, out: Float64Array): void;
  /** out[i] = f, jac[j*n + i] = ∂f/∂θ_j (column-major, n×p) */
  valueAndJacobian(theta: Float64Array, cols: readonly Float64Array[], n: number, out: Float64Array, jac: Float64Array): void;
  /**
   * The same in double-double arithmetic (value ≈ hi + lo, see `codegen-dd.ts`):
   * exact to ~1e-32 relative for + − × ÷, integer powers and sqrt; other
   * functions in double. Compiled on first use.
   */
  valueAndJacobianExtended(
    theta: Float64Array, cols: readonly Float64Array[], n: number,
    outHi: Float64Array, outLo: Float64Array, jacHi: Float64Array, jacLo: Float64Array,
  ): void;
  /** The value alone in double-double (as `valueAndJacobianExtended` without the Jacobian). Compiled on first use. */
  valueExtended(theta: Float64Array, cols: readonly Float64Array[], n: number, outHi: Float64Array, outLo: Float64Array): void;
  /** True when every ∂f/∂θⱼ is independent of θ (see `isLinearInParameters`). */
  readonly linear: boolean;
  /** Generated source of the value and value+Jacobian kernels (for inspection and tests). */
  readonly source: { readonly value: string; readonly valueAndJacobian: string };
}

export interface ColumnEvaluator {
  (cols: readonly Float64Array[], n: number, out: Float64Array): void;
  readonly source: string;
}

/** Argument checks outside the row loop (allocation-free: called on every evaluation). */
function checkArgs(p: number, k: number, theta: Float64Array, cols: readonly Float64Array[], n: number, out1: Float64Array, out2: Float64Array | null, jac1: Float64Array | null, jac2: Float64Array | null): void {
  if (!Number.isInteger(n) || n < 0) throw new RangeError('row count must be a non-negative integer');
  if (theta.length !== p) throw new RangeError(`expected ${p} parameter values, got ${theta.length}`);
  if (cols.length < k) throw new RangeError(`expected ${k} columns, got ${cols.length}`);
  for (let j = 0; j < k; j++) if (cols[j].length < n) throw new RangeError('column shorter than row count');
  if (out1.length < n || (out2 !== null && out2.length < n)) throw new RangeError('output shorter than row count');
  if ((jac1 !== null && jac1.length < n * p) || (jac2 !== null && jac2.length < n * p)) throw new RangeError('Jacobian buffer shorter than n·p');
}

interface Built { g: Graph; root: number; derivs: number[] }

function build(expr: Expr, params: readonly string[], columns: readonly string[] | null): Built & { columnMap: Map<string, number> } {
  const g = new Graph();
  const paramMap = slotMap(params, 'parameter');
  const columnMap = columns ? slotMap(columns, 'column') : new Map<string, number>();
  const root = lower(g, expr, { params: paramMap, columns: columnMap, autoColumns: columns === null });
  const derivs = params.map((_, j) => new Differentiator(g, j).d(root));
  return { g, root, derivs, columnMap };
}

function linearIn(b: Built): boolean {
  if (b.derivs.some((d) => b.g.param[d])) return false;
  // A parameter inside a condition makes f jump with θ even where ∂f/∂θ is constant.
  for (const id of b.g.reachable([b.root])) {
    const op = b.g.nodes[id].op;
    if ((op === 'cmp' || op === 'and' || op === 'or' || op === 'not') && b.g.param[id]) return false;
  }
  return true;
}

export function compileModel(expr: Expr, params: readonly string[], columns: readonly string[]): CompiledModel {
  const b = build(expr, params, columns);
  const p = params.length;
  const k = columns.length;
  const valueSrc = kernelSource(b.g, { value: b.root });
  const fullSrc = kernelSource(b.g, { value: b.root, derivatives: b.derivs });
  const valueKernel: Kernel = instantiate(valueSrc);
  const fullKernel: Kernel = instantiate(fullSrc);
  let ddKernel: KernelDD | null = null;
  let ddValueKernel: KernelDD | null = null;
  const none = new Float64Array(0);
  const model: CompiledModel = {
    params: Object.freeze([...params]),
    columns: Object.freeze([...columns]),
    linear: linearIn(b),
    source: Object.freeze({ value: valueSrc, valueAndJacobian: fullSrc }),
    value(theta: Float64Array, cols: readonly Float64Array[], n: number, out: Float64Array): void {
      checkArgs(p, k, theta, cols, n, out, null, null, null);
      valueKernel(theta, cols, n, out, none);
    },
    valueAndJacobian(theta: Float64Array, cols: readonly Float64Array[], n: number, out: Float64Array, jac: Float64Array): void {
      checkArgs(p, k, theta, cols, n, out, null, jac, null);
      fullKernel(theta, cols, n, out, jac);
    },
    valueAndJacobianExtended(theta, cols, n, outHi, outLo, jacHi, jacLo): void {
      checkArgs(p, k, theta, cols, n, outHi, outLo, jacHi, jacLo);
      ddKernel ??= instantiateDD(kernelSourceDD(b.g, b.root, b.derivs));
      ddKernel(theta, cols, n, outHi, outLo, jacHi, jacLo);
    },
    valueExtended(theta, cols, n, outHi, outLo): void {
      checkArgs(p, k, theta, cols, n, outHi, outLo, null, null);
      ddValueKernel ??= instantiateDD(kernelSourceDD(b.g, b.root, []));
      ddValueKernel(theta, cols, n, outHi, outLo, none, none);
    },
  };
  return Object.freeze(model);
}

/**
 * Compiled models shared by the fits of one thread that compile the same
 * model (the groups of a per-group fit, their bands and queries): compiling
 * a 4-parameter logistic costs about 0.2 ms, more than fitting one 12-point
 * group, and a kernel compiled once is also the one V8 has already
 * optimised. A CompiledModel is immutable apart from its double-double
 * kernels, which are compiled on first use and then the same for every
 * caller, so sharing it changes no value.
 *
 * Looked up by the expression object first (a plan's expression is not
 * modified after checking), then by its structure (`exprKey`), so the copies
 * of one plan that reach a worker thread with each chunk of groups share a
 * model too. At most MODEL_CACHE_SIZE structures are kept (the oldest goes
 * first): a spec has a few models, a long editor session many versions.
 */
export const MODEL_CACHE_SIZE = 64;
const byExpr = new WeakMap<Expr, Map<string, CompiledModel>>();
const byStructure = new Map<string, CompiledModel>();

/**
 * A key of the expression's structure: its JSON without source ranges, every
 * number written as its shortest round-trip text with −0 told from 0 (plain
 * JSON would write −0 as 0 and NaN, ±Infinity as null).
 */
export function exprKey(expr: Expr): string {
  return JSON.stringify(expr, (k, v: unknown) => (k === 'range' ? undefined : typeof v === 'number' ? `#${Object.is(v, -0) ? '-0' : String(v)}` : v));
}

/** `compileModel` through the shared cache (see above); the same arguments give the same (frozen) model. */
export function sharedModel(expr: Expr, params: readonly string[], columns: readonly string[]): CompiledModel {
  const slots = `${params.join('\u0000')}\u0001${columns.join('\u0000')}`;
  let forExpr = byExpr.get(expr);
  if (!forExpr) {
    forExpr = new Map();
    byExpr.set(expr, forExpr);
  }
  let model = forExpr.get(slots);
  if (model) return model;
  const key = `${exprKey(expr)}\u0002${slots}`;
  model = byStructure.get(key);
  if (!model) {
    model = compileModel(expr, params, columns);
    if (byStructure.size >= MODEL_CACHE_SIZE) byStructure.delete(byStructure.keys().next().value!);
    byStructure.set(key, model);
  }
  forExpr.set(slots, model);
  return model;
}

/**
 * Evaluator of a parameter-free expression over columns (response, sigma,
 * weight, filter). Comparisons and logic give 1 (true) or 0 (false); a
 * condition value is true when it is neither 0 nor NaN.
 */
export function compileColumnExpr(expr: Expr, columns: readonly string[]): ColumnEvaluator {
  const g = new Graph();
  const root = lower(g, expr, { params: null, columns: slotMap(columns, 'column') });
  const source = kernelSource(g, { value: root });
  const kernel = instantiate(source);
  const k = columns.length;
  const none = new Float64Array(0);
  const f = (cols: readonly Float64Array[], n: number, out: Float64Array): void => {
    checkArgs(0, k, none, cols, n, out, null, null, null);
    kernel(none, cols, n, out, none);
  };
  return Object.assign(f, { source }) as ColumnEvaluator;
}

/**
 * Symbolic linearity test: true when every ∂f/∂θⱼ (after simplification) is
 * free of parameters and no comparison or logical operator reads a
 * parameter. Then f(θ) = f(0) + Σⱼ θⱼ·∂f/∂θⱼ exactly, and the linear solver
 * applies. Column names need not be known in advance.
 */
export function isLinearInParameters(expr: Expr, params: readonly string[]): boolean {
  try {
    return linearIn(build(expr, params, null));
  } catch (e) {
    if (e instanceof CompileError) return false;
    throw e;
  }
}
