/**
 * Double-precision code generation from the expression graph. One generated
 * function evaluates a set of root nodes for rows 0…n−1 and stores them:
 * `out[i]` for the value root and `jac[j·n + i]` for derivative roots
 * (column-major). Every interior node becomes one `const` (so shared
 * subexpressions are computed once per row); nodes that do not read a column
 * are hoisted out of the row loop. The loop allocates nothing.
 *
 * Very large graphs (more than `MAX_LOCAL_TEMPS` interior nodes, e.g. a sum of
 * tens of thousands of terms) keep their temporaries in one Float64Array
 * allocated per call instead: every local constant takes a slot in the
 * function's stack frame, and a frame of 10⁵ slots overflows Node's default
 * stack (measured: a 100,000-term sum with its derivative, 2026-12).
 */
import { Graph, UNARY_IMPL, BINARY_IMPL } from './graph';
import { literal, ident, rowKernel, UNARY_MEMBER, BINARY_MEMBER, COMPARE_JS } from './emit';

/** The helper object injected into generated code as `M` (frozen, fixed members). */
export const MATH_HELPERS: Readonly<Record<string, (...a: number[]) => number>> = Object.freeze({
  ...UNARY_IMPL,
  ...BINARY_IMPL,
  pow: Math.pow,
});

export interface KernelRoots {
  /** Node written to out[i], if any. */
  value?: number;
  /** Nodes written to jac[j·n + i], j = 0…p−1. */
  derivatives?: readonly number[];
}

/**
 * Interior nodes above which a kernel keeps its temporaries in an array
 * (see the module comment). 20,000 locals make a frame of about 160 KiB,
 * a sixth of Node's default 984 KiB stack.
 */
export const MAX_LOCAL_TEMPS = 20_000;

/** How a kernel names its temporaries: local constants `v<id>`, or slots of the array `s`. */
type Temps = ReadonlyMap<number, number> | null;

/** Source reference to a leaf (a literal, parameter `t<k>` or the row's column value `x<k>`), or null for an interior node; both generators name leaves so. */
export function leafRef(g: Graph, id: number): string | null {
  const n = g.nodes[id];
  switch (n.op) {
    case 'const': return literal(n.value);
    case 'param': return ident('t', n.index);
    case 'col': return ident('x', n.index);
    default: return null;
  }
}

/** Source reference to node `id` (a leaf or a temporary). */
export function ref(g: Graph, id: number, temps: Temps = null): string {
  return leafRef(g, id) ?? (temps ? `s[${literal(temps.get(id)!)}]` : ident('v', id));
}

/** Smallest positive normal and largest finite double (bounds of the shared-power guard below). */
const MIN_NORMAL = 2.2250738585072014e-308;
const MAX_FINITE = 1.7976931348623157e308;

/**
 * Shared powers. The derivative rule d(a^b) = b·a^(b−1)·a′ (`derive.ts`)
 * makes a second node a^e with e = b − 1 next to the value's node p = a^b.
 * Since a^(b−1) = a^b / a for a ≠ 0, the kernel computes it as one division
 * from p instead of a second `pow` call, guarded by
 *   a ≠ 0  and  MIN_NORMAL ≤ |p| ≤ MAX_FINITE
 * (p neither zero, subnormal, infinite nor NaN, so p/a carries the full
 * 53-bit precision: relative error ≤ that of pow plus one rounding, ≈ 1.5 ulp;
 * and it avoids the rounding of e = b − 1 itself, which pow(a, e) inherits as
 * |ln a|·ulp(b)). Otherwise it falls back to `pow(a, e)` exactly as before.
 * Returns the id of p when `id` is such an a^e and p is computed earlier in
 * the same kernel (`available`), else undefined.
 */
function sharedPower(g: Graph, id: number, available: ReadonlySet<number>): number | undefined {
  const n = g.nodes[id];
  if (n.op !== 'pow') return undefined;
  const e = g.nodes[n.b];
  let b: number | undefined;
  if (e.op === 'sub' && g.isConst(e.b, 1)) b = e.a;
  else if (e.op === 'const' && Number.isFinite(e.value + 1) && e.value + 1 - 1 === e.value) b = g.findConstant(e.value + 1);
  if (b === undefined) return undefined;
  const p = g.findPow(n.a, b);
  return p !== undefined && p < id && available.has(p) ? p : undefined;
}

/** Right-hand side computing interior node `id` from its operands' references. */
function rhs(g: Graph, id: number, available: ReadonlySet<number>, temps: Temps): string {
  const n = g.nodes[id];
  const r = (k: number) => ref(g, k, temps);
  switch (n.op) {
    case 'add': return `${r(n.a)} + ${r(n.b)}`;
    case 'sub': return `${r(n.a)} - ${r(n.b)}`;
    case 'mul': return `${r(n.a)} * ${r(n.b)}`;
    // strong zero of the first factor (graph.ts `mulz`): 0·∞ and 0·NaN give 0
    case 'mulz': return `${r(n.a)} === 0 ? 0 : ${r(n.a)} * ${r(n.b)}`;
    case 'div': return `${r(n.a)} / ${r(n.b)}`;
    case 'neg': return `-${r(n.a)}`;
    case 'pow': {
      const e = g.constOf(n.b);
      if (e === 2) return `${r(n.a)} * ${r(n.a)}`;
      if (e === -1) return `1 / ${r(n.a)}`;
      const p = sharedPower(g, id, available);
      if (p !== undefined) {
        const a = r(n.a);
        const pr = r(p);
        const abs = `(${pr} < 0 ? -${pr} : ${pr})`;
        return `(${a} !== 0 && ${abs} >= ${literal(MIN_NORMAL)} && ${abs} <= ${literal(MAX_FINITE)}) ? ${pr} / ${a} : M.pow(${a}, ${r(n.b)})`;
      }
      return `M.pow(${r(n.a)}, ${r(n.b)})`;
    }
    case 'fn1': return `M.${UNARY_MEMBER[n.fn]}(${r(n.a)})`;
    case 'fn2': return `M.${BINARY_MEMBER[n.fn]}(${r(n.a)}, ${r(n.b)})`;
    case 'cmp': return `(${r(n.a)} ${COMPARE_JS[n.cmp]} ${r(n.b)}) ? 1 : 0`;
    case 'and': return `(${r(n.a)} && ${r(n.b)}) ? 1 : 0`;
    case 'or': return `(${r(n.a)} || ${r(n.b)}) ? 1 : 0`;
    case 'not': return `${r(n.a)} ? 0 : 1`;
    case 'when': return `${r(n.c)} ? ${r(n.a)} : ${r(n.b)}`;
    default: throw new Error('not an interior node');
  }
}

export function isLeaf(g: Graph, id: number): boolean {
  const op = g.nodes[id].op;
  return op === 'const' || op === 'param' || op === 'col';
}

/**
 * What the double and the double-double generator share: the nodes the roots
 * reach, how temporaries are kept (`tempSlots`, `perNode` slots each), and the
 * kernel's statements so far — parameters and column arrays read once before
 * the row loop (`head`), each column's value read per row (`body`).
 */
export interface KernelFrame {
  nodes: number[];
  temps: Temps;
  head: string[];
  body: string[];
}

export function kernelFrame(g: Graph, roots: readonly number[], perNode = 1): KernelFrame {
  const nodes = g.reachable(roots);
  const head: string[] = [];
  const body: string[] = [];
  for (const id of nodes) {
    const n = g.nodes[id];
    if (n.op === 'param') head.push(`const ${leafRef(g, id)} = t[${literal(n.index)}];`);
    else if (n.op === 'col') {
      head.push(`const ${ident('c', n.index)} = c[${literal(n.index)}];`);
      body.push(`const ${leafRef(g, id)} = ${ident('c', n.index)}[i];`);
    }
  }
  return { nodes, temps: tempSlots(g, nodes, perNode), head, body };
}

/**
 * Places the statement of each interior node, in id order (operands first):
 * in the row loop when it reads a column (`g.row`), else hoisted before it.
 */
export function placeInterior(g: Graph, frame: KernelFrame, statement: (id: number) => string): void {
  for (const id of frame.nodes) if (!isLeaf(g, id)) (g.row[id] ? frame.body : frame.head).push(statement(id));
}

/**
 * Where row i of derivative column j sits in a column-major Jacobian: `i` for
 * j = 0, else `o<j> + i` with the offset `o<j> = n·j` declared once in `head`.
 */
export function jacobianIndex(frame: KernelFrame, count: number): (j: number) => string {
  for (let j = 1; j < count; j++) frame.head.push(`const ${ident('o', j)} = n * ${literal(j)};`);
  return (j) => (j === 0 ? 'i' : `${ident('o', j)} + i`);
}

/**
 * Source of `function (t, c, n, out, jac)` evaluating `roots`, to be wrapped
 * as `new Function('M', source)` (which returns the kernel).
 */
export function kernelSource(g: Graph, roots: KernelRoots): string {
  const derivs = roots.derivatives ?? [];
  const frame = kernelFrame(g, [...(roots.value !== undefined ? [roots.value] : []), ...derivs]);
  const { temps, head, body } = frame;
  if (temps) head.push(`const s = new Float64Array(${literal(temps.size)});`);
  const available = new Set<number>();
  placeInterior(g, frame, (id) => {
    // (a hoisted a^e has a hoisted base and exponent, so its a^b is hoisted too: ascending ids suffice)
    const target = temps ? ref(g, id, temps) : `const ${ref(g, id)}`;
    const statement = `${target} = ${rhs(g, id, available, temps)};`;
    available.add(id);
    return statement;
  });
  const at = jacobianIndex(frame, derivs.length);
  if (roots.value !== undefined) body.push(`out[i] = ${ref(g, roots.value, temps)};`);
  derivs.forEach((d, j) => body.push(`jac[${at(j)}] = ${ref(g, d, temps)};`));
  return rowKernel('t, c, n, out, jac', head, body);
}

/** Array slots of the interior nodes among `nodes` when there are more than `MAX_LOCAL_TEMPS`, else null (local constants). */
export function tempSlots(g: Graph, nodes: readonly number[], perNode = 1): Temps {
  const interior = nodes.filter((id) => !isLeaf(g, id));
  if (interior.length * perNode <= MAX_LOCAL_TEMPS) return null;
  return new Map(interior.map((id, k) => [id, k]));
}

export type Kernel = (t: Float64Array, c: readonly Float64Array[], n: number, out: Float64Array, jac: Float64Array) => void;

/** Compile kernel source into a function; the only free name it sees is the frozen helper object `M`. */
export function instantiate(source: string, helpers: object = MATH_HELPERS): Kernel {
  // eslint-disable-next-line @typescript-eslint/no-implied-eval
  return new Function('M', source)(helpers) as Kernel;
}
