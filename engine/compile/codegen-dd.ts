/**
 * Double-double code generation (see `linalg/dd.ts`): the same graph as
 * `codegen.ts`, evaluated with about 32 significant digits for + − × ÷,
 * integer powers and square roots. Other functions (exp, ln, trigonometric,
 * erf…) and non-integer powers are evaluated in double on hi + lo, so their
 * results carry double accuracy only; comparisons use hi + lo.
 *
 * Used for design matrices of linear models, where the rounding of entries
 * such as x¹⁰ (≈1e-16 relative each) otherwise limits the attainable accuracy
 * of ill-conditioned fits (NIST StRD Filip), and for residuals in iterative
 * refinement. Generated signature:
 *   (t, c, n, outHi, outLo, jacHi, jacLo); jac*[j·n + i] = ∂f/∂θⱼ at row i.
 * Very large graphs keep their temporaries in two arrays `H`, `L` (as in
 * `codegen.ts`, where the reason is given).
 */
import { Graph } from './graph';
import { literal, ident, rowKernel, UNARY_MEMBER, BINARY_MEMBER, COMPARE_JS } from './emit';
import { isLeaf, jacobianIndex, kernelFrame, leafRef, MATH_HELPERS, placeInterior } from './codegen';
import { UNARY_RULES } from './functions';
import { DD_OUT, ddAdd, ddSub, ddMul, ddDiv, ddSqrt, ddPowInt } from '../linalg/dd';

/** The strong-zero product of derivative rules (graph.ts `mulz`) in double-double: a = ah + al = 0 exactly when ah = 0. */
function ddMulStrongZero(ah: number, al: number, bh: number, bl: number): void {
  if (ah === 0) {
    DD_OUT[0] = 0;
    DD_OUT[1] = 0;
  } else ddMul(ah, al, bh, bl);
}

/** Helpers injected as `M` into double-double kernels (frozen). */
export const DD_HELPERS = Object.freeze({
  ...MATH_HELPERS,
  R: DD_OUT, add: ddAdd, sub: ddSub, mul: ddMul, mulz: ddMulStrongZero, div: ddDiv, sqrt2: ddSqrt, powi: ddPowInt,
});

/** Largest |k| for which x^k is evaluated by double-double binary powering. */
const MAX_INT_POWER = 1024;

type Temps = ReadonlyMap<number, number> | null;

/** High part of node `id`: a leaf is its own high part (codegen.ts `leafRef`). */
function hi(g: Graph, id: number, temps: Temps): string {
  return leafRef(g, id) ?? (temps ? `H[${literal(temps.get(id)!)}]` : ident('h', id));
}
/** Low part of node `id`: 0 for a leaf (a double). */
function lo(g: Graph, id: number, temps: Temps): string {
  if (isLeaf(g, id)) return '0';
  return temps ? `L[${literal(temps.get(id)!)}]` : ident('l', id);
}

/** Statements defining the high and low parts of interior node `id`. */
function define(g: Graph, id: number, temps: Temps): string {
  const n = g.nodes[id];
  const H = hi(g, id, temps);
  const L = lo(g, id, temps);
  const set = (h: string, l: string) => (temps ? `${H} = ${h}; ${L} = ${l};` : `const ${H} = ${h}, ${L} = ${l};`);
  const viaR = (call: string) => `${call}; ${set('M.R[0]', 'M.R[1]')}`;
  const dbl = (expr: string) => set(expr, '0');
  const sum = (k: number) => `(${hi(g, k, temps)} + ${lo(g, k, temps)})`;
  const pair = (k: number) => `${hi(g, k, temps)}, ${lo(g, k, temps)}`;
  switch (n.op) {
    case 'add': return viaR(`M.add(${pair(n.a)}, ${pair(n.b)})`);
    case 'sub': return viaR(`M.sub(${pair(n.a)}, ${pair(n.b)})`);
    case 'mul': return viaR(`M.mul(${pair(n.a)}, ${pair(n.b)})`);
    case 'mulz': return viaR(`M.mulz(${pair(n.a)}, ${pair(n.b)})`);
    case 'div': return viaR(`M.div(${pair(n.a)}, ${pair(n.b)})`);
    case 'neg': return set(`-${hi(g, n.a, temps)}`, `-${lo(g, n.a, temps)}`);
    case 'pow': {
      const e = g.constOf(n.b);
      if (e !== undefined && Number.isInteger(e) && Math.abs(e) <= MAX_INT_POWER) {
        return viaR(`M.powi(${pair(n.a)}, ${literal(e)})`);
      }
      if (e === 0.5) return viaR(`M.sqrt2(${pair(n.a)})`);
      return dbl(`M.pow(${sum(n.a)}, ${sum(n.b)})`);
    }
    case 'fn1': {
      // how each function is evaluated here: functions.ts `dd`
      const mode = UNARY_RULES[n.fn].dd;
      if (mode === 'dd_sqrt') return viaR(`M.sqrt2(${pair(n.a)})`);
      const ah = hi(g, n.a, temps);
      const al = lo(g, n.a, temps);
      if (mode === 'dd_abs') return set(`${ah} < 0 ? -${ah} : ${ah}`, `${ah} < 0 ? -${al} : ${al}`);
      return dbl(`M.${UNARY_MEMBER[n.fn]}(${sum(n.a)})`);
    }
    case 'fn2': return dbl(`M.${BINARY_MEMBER[n.fn]}(${sum(n.a)}, ${sum(n.b)})`);
    case 'cmp': return dbl(`(${sum(n.a)} ${COMPARE_JS[n.cmp]} ${sum(n.b)}) ? 1 : 0`);
    case 'and': return dbl(`(${sum(n.a)} && ${sum(n.b)}) ? 1 : 0`);
    case 'or': return dbl(`(${sum(n.a)} || ${sum(n.b)}) ? 1 : 0`);
    case 'not': return dbl(`${sum(n.a)} ? 0 : 1`);
    case 'when': {
      const c = sum(n.c);
      return set(`${c} ? ${hi(g, n.a, temps)} : ${hi(g, n.b, temps)}`, `${c} ? ${lo(g, n.a, temps)} : ${lo(g, n.b, temps)}`);
    }
    default: throw new Error('not an interior node');
  }
}

/** Source of the double-double kernel for a value root and derivative roots. */
export function kernelSourceDD(g: Graph, value: number, derivatives: readonly number[]): string {
  const frame = kernelFrame(g, [value, ...derivatives], 2);
  const { temps, head, body } = frame;
  if (temps) head.push(`const H = new Float64Array(${literal(temps.size)}), L = new Float64Array(${literal(temps.size)});`);
  placeInterior(g, frame, (id) => define(g, id, temps));
  const at = jacobianIndex(frame, derivatives.length);
  body.push(`outHi[i] = ${hi(g, value, temps)};`, `outLo[i] = ${lo(g, value, temps)};`);
  derivatives.forEach((d, j) => body.push(`jacHi[${at(j)}] = ${hi(g, d, temps)};`, `jacLo[${at(j)}] = ${lo(g, d, temps)};`));
  return rowKernel('t, c, n, outHi, outLo, jacHi, jacLo', head, body);
}

export type KernelDD = (
  t: Float64Array, c: readonly Float64Array[], n: number,
  outHi: Float64Array, outLo: Float64Array, jacHi: Float64Array, jacLo: Float64Array,
) => void;

export function instantiateDD(source: string): KernelDD {
  return new Function('M', source)(DD_HELPERS) as KernelDD;
}
