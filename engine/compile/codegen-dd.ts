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
 */
import { Graph } from './graph';
import { literal, ident, rowKernel, UNARY_MEMBER, BINARY_MEMBER, COMPARE_JS } from './emit';
import { MATH_HELPERS } from './codegen';
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

function hi(g: Graph, id: number): string {
  const n = g.nodes[id];
  switch (n.op) {
    case 'const': return literal(n.value);
    case 'param': return ident('t', n.index);
    case 'col': return ident('x', n.index);
    default: return ident('h', id);
  }
}
function lo(g: Graph, id: number): string {
  const n = g.nodes[id];
  return n.op === 'const' || n.op === 'param' || n.op === 'col' ? '0' : ident('l', id);
}

/** Statements defining h<id>, l<id>. */
function define(g: Graph, id: number): string {
  const n = g.nodes[id];
  const H = ident('h', id);
  const L = ident('l', id);
  const viaR = (call: string) => `${call}; const ${H} = M.R[0], ${L} = M.R[1];`;
  const dbl = (expr: string) => `const ${H} = ${expr}, ${L} = 0;`;
  const sum = (k: number) => `(${hi(g, k)} + ${lo(g, k)})`;
  const pair = (k: number) => `${hi(g, k)}, ${lo(g, k)}`;
  switch (n.op) {
    case 'add': return viaR(`M.add(${pair(n.a)}, ${pair(n.b)})`);
    case 'sub': return viaR(`M.sub(${pair(n.a)}, ${pair(n.b)})`);
    case 'mul': return viaR(`M.mul(${pair(n.a)}, ${pair(n.b)})`);
    case 'mulz': return viaR(`M.mulz(${pair(n.a)}, ${pair(n.b)})`);
    case 'div': return viaR(`M.div(${pair(n.a)}, ${pair(n.b)})`);
    case 'neg': return `const ${H} = -${hi(g, n.a)}, ${L} = -${lo(g, n.a)};`;
    case 'pow': {
      const e = g.constOf(n.b);
      if (e !== undefined && Number.isInteger(e) && Math.abs(e) <= MAX_INT_POWER) {
        return viaR(`M.powi(${pair(n.a)}, ${literal(e)})`);
      }
      if (e === 0.5) return viaR(`M.sqrt2(${pair(n.a)})`);
      return dbl(`M.pow(${sum(n.a)}, ${sum(n.b)})`);
    }
    case 'fn1':
      if (n.fn === 'sqrt') return viaR(`M.sqrt2(${pair(n.a)})`);
      if (n.fn === 'abs') return `const ${H} = ${hi(g, n.a)} < 0 ? -${hi(g, n.a)} : ${hi(g, n.a)}, ${L} = ${hi(g, n.a)} < 0 ? -${lo(g, n.a)} : ${lo(g, n.a)};`;
      return dbl(`M.${UNARY_MEMBER[n.fn]}(${sum(n.a)})`);
    case 'fn2': return dbl(`M.${BINARY_MEMBER[n.fn]}(${sum(n.a)}, ${sum(n.b)})`);
    case 'cmp': return dbl(`(${sum(n.a)} ${COMPARE_JS[n.cmp]} ${sum(n.b)}) ? 1 : 0`);
    case 'and': return dbl(`(${sum(n.a)} && ${sum(n.b)}) ? 1 : 0`);
    case 'or': return dbl(`(${sum(n.a)} || ${sum(n.b)}) ? 1 : 0`);
    case 'not': return dbl(`${sum(n.a)} ? 0 : 1`);
    case 'when': {
      const c = sum(n.c);
      return `const ${H} = ${c} ? ${hi(g, n.a)} : ${hi(g, n.b)}, ${L} = ${c} ? ${lo(g, n.a)} : ${lo(g, n.b)};`;
    }
    default: throw new Error('not an interior node');
  }
}

/** Source of the double-double kernel for a value root and derivative roots. */
export function kernelSourceDD(g: Graph, value: number, derivatives: readonly number[]): string {
  const nodes = g.reachable([value, ...derivatives]);
  const head: string[] = [];
  const body: string[] = [];
  for (const id of nodes) {
    const n = g.nodes[id];
    if (n.op === 'param') head.push(`const ${hi(g, id)} = t[${literal(n.index)}];`);
    else if (n.op === 'col') {
      head.push(`const ${ident('c', n.index)} = c[${literal(n.index)}];`);
      body.push(`const ${hi(g, id)} = ${ident('c', n.index)}[i];`);
    }
  }
  for (const id of nodes) {
    const op = g.nodes[id].op;
    if (op === 'const' || op === 'param' || op === 'col') continue;
    (g.row[id] ? body : head).push(define(g, id));
  }
  derivatives.forEach((_, j) => { if (j > 0) head.push(`const ${ident('o', j)} = n * ${literal(j)};`); });
  body.push(`outHi[i] = ${hi(g, value)};`, `outLo[i] = ${lo(g, value)};`);
  derivatives.forEach((d, j) => {
    const at = j === 0 ? 'i' : `${ident('o', j)} + i`;
    body.push(`jacHi[${at}] = ${hi(g, d)};`, `jacLo[${at}] = ${lo(g, d)};`);
  });
  return rowKernel('t, c, n, outHi, outLo, jacHi, jacLo', head, body);
}

export type KernelDD = (
  t: Float64Array, c: readonly Float64Array[], n: number,
  outHi: Float64Array, outLo: Float64Array, jacHi: Float64Array, jacLo: Float64Array,
) => void;

export function instantiateDD(source: string): KernelDD {
  return new Function('M', source)(DD_HELPERS) as KernelDD;
}
