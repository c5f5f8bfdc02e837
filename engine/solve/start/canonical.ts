/**
 * A canonical form of model expressions for structural recognition
 * (recognise.ts, roles.ts): sums and products are flattened into lists
 * (order-free when matched), numbers are folded into one constant term per
 * sum and one coefficient per product, numeric powers are exponents of
 * product factors (so `a/b^2`, `a*b^-2` and `a/(b*b)` read alike), and a
 * numeric power of a product is distributed over its factors
 * (`((x - c)/w)^2` = `(x - c)^2 · w^-2`). Terms and factors are kept sorted
 * by their key, so equal forms have equal keys whatever the written order.
 * Nothing is expanded, so the form stays the size of the input.
 */
import type { Expr } from '../../../parser/plan';

export type Canon =
  | { t: 'num'; v: number }
  | { t: 'col'; name: string }
  | { t: 'par'; name: string }
  /** k + Σ cᵢ·eᵢ (no eᵢ is a number or a sum; at least one term, or k alone is a num). */
  | { t: 'sum'; k: number; terms: { c: number; e: Canon }[] }
  /** c · Π eᵢ^pᵢ (numeric pᵢ ≠ 0; no eᵢ is a number or a product). */
  | { t: 'prod'; c: number; fs: { e: Canon; p: number }[] }
  /** base^exponent with a non-numeric exponent. */
  | { t: 'pow'; base: Canon; exp: Canon }
  | { t: 'call'; fn: string; args: Canon[] }
  /** Comparisons and logic: never matched. */
  | { t: 'other' };

const num = (v: number): Canon => ({ t: 'num', v });

/** Structural key (equal keys: equal canonical forms). */
export function key(c: Canon): string {
  return JSON.stringify(c);
}

const forms = new WeakMap<Expr, Canon>();

/**
 * The canonical form of a whole model expression, computed once per expression object: the groups of a per-group
 * fit share their plan's model (engine/run/fit.ts), so recognition, roles and the check read one form. Forms are
 * never modified after they are built.
 */
export function canonicalForm(e: Expr): Canon {
  let c = forms.get(e);
  if (!c) {
    c = canonical(e);
    forms.set(e, c);
  }
  return c;
}

export function canonical(e: Expr): Canon {
  switch (e.kind) {
    case 'number':
      return num(e.value);
    case 'column':
      return { t: 'col', name: e.name };
    case 'param':
      return { t: 'par', name: e.name };
    case 'negate':
      return scale(canonical(e.arg), -1);
    case 'binary': {
      const a = canonical(e.left);
      const b = canonical(e.right);
      switch (e.op) {
        case '+':
          return makeSum([{ c: 1, e: a }, { c: 1, e: b }]);
        case '-':
          return makeSum([{ c: 1, e: a }, { c: -1, e: b }]);
        case '*':
          return makeProd([{ e: a, p: 1 }, { e: b, p: 1 }]);
        case '/':
          return makeProd([{ e: a, p: 1 }, { e: b, p: -1 }]);
        case '^':
          return power(a, b);
      }
      return { t: 'other' };
    }
    case 'chain': {
      // a flat run of one precedence level (parser/plan.ts): + − as one sum, * / as one product
      if (e.ops[0] === '+' || e.ops[0] === '-') {
        return makeSum(e.args.map((a, i) => ({ c: i > 0 && e.ops[i - 1] === '-' ? -1 : 1, e: canonical(a) })));
      }
      if (e.ops[0] === '*' || e.ops[0] === '/') {
        return makeProd(e.args.map((a, i) => ({ e: canonical(a), p: i > 0 && e.ops[i - 1] === '/' ? -1 : 1 })));
      }
      return { t: 'other' };
    }
    case 'call': {
      const args = e.args.map(canonical);
      if (e.fn === 'pow' && args.length === 2) return power(args[0], args[1]);
      if (e.fn === 'sqrt' && args.length === 1) return power(args[0], num(0.5));
      return { t: 'call', fn: e.fn, args };
    }
    default:
      return { t: 'other' };
  }
}

function power(a: Canon, b: Canon): Canon {
  if (b.t === 'num') {
    if (a.t === 'num') return num(a.v ** b.v);
    return makeProd([{ e: a, p: b.v }]);
  }
  return { t: 'pow', base: a, exp: b };
}

function scale(a: Canon, c: number): Canon {
  return makeSum([{ c, e: a }]);
}

/** Builds k + Σ c·e, flattening nested sums and pulling numeric coefficients out of products. */
function makeSum(items: { c: number; e: Canon }[]): Canon {
  let k = 0;
  const terms: { c: number; e: Canon }[] = [];
  const add = (c: number, e: Canon) => {
    if (e.t === 'num') k += c * e.v;
    else if (e.t === 'sum') {
      k += c * e.k;
      for (const t of e.terms) add(c * t.c, t.e);
    } else if (e.t === 'prod' && e.c !== 1) add(c * e.c, simplifyProd(1, e.fs));
    else {
      const ke = key(e);
      const same = terms.find((t) => key(t.e) === ke);
      if (same) same.c += c;
      else terms.push({ c, e });
    }
  };
  for (const it of items) add(it.c, it.e);
  const kept = terms.filter((t) => t.c !== 0).sort(byKey);
  if (kept.length === 0) return num(k);
  if (k === 0 && kept.length === 1 && kept[0].c === 1) return kept[0].e;
  return { t: 'sum', k, terms: kept };
}

/** Builds c · Π e^p, flattening nested products, folding numbers and merging equal factors. */
function makeProd(items: { e: Canon; p: number }[]): Canon {
  let c = 1;
  const fs: { e: Canon; p: number }[] = [];
  const add = (e: Canon, p: number) => {
    if (e.t === 'num') c *= e.v ** p;
    else if (e.t === 'prod') {
      c *= e.c ** p;
      for (const f of e.fs) add(f.e, f.p * p);
    } else if (e.t === 'sum' && e.k === 0 && e.terms.length === 1) {
      c *= e.terms[0].c ** p;
      add(e.terms[0].e, p);
    } else {
      const ke = key(e);
      const same = fs.find((f) => key(f.e) === ke);
      if (same) same.p += p;
      else fs.push({ e, p });
    }
  };
  for (const it of items) add(it.e, it.p);
  return simplifyProd(c, fs.filter((f) => f.p !== 0).sort(byKey));
}

function byKey(a: { e: Canon }, b: { e: Canon }): number {
  const ka = key(a.e);
  const kb = key(b.e);
  return ka < kb ? -1 : ka > kb ? 1 : 0;
}

function simplifyProd(c: number, fs: { e: Canon; p: number }[]): Canon {
  if (fs.length === 0 || c === 0) return num(c);
  if (c === 1 && fs.length === 1 && fs[0].p === 1) return fs[0].e;
  return { t: 'prod', c, fs };
}

/** Calls `visit` on every leaf (number, column, parameter) of a canonical form. */
function forEachLeaf(c: Canon, visit: (leaf: Canon) => void): void {
  switch (c.t) {
    case 'sum':
      for (const t of c.terms) forEachLeaf(t.e, visit);
      break;
    case 'prod':
      for (const f of c.fs) forEachLeaf(f.e, visit);
      break;
    case 'pow':
      forEachLeaf(c.base, visit);
      forEachLeaf(c.exp, visit);
      break;
    case 'call':
      for (const a of c.args) forEachLeaf(a, visit);
      break;
    default:
      visit(c);
  }
}

/** Parameters read by a canonical form. */
export function paramsIn(c: Canon, into: Set<string> = new Set()): Set<string> {
  forEachLeaf(c, (l) => (l.t === 'par' ? into.add(l.name) : undefined));
  return into;
}

/** Columns read by a canonical form. */
export function columnsIn(c: Canon, into: Set<string> = new Set()): Set<string> {
  forEachLeaf(c, (l) => (l.t === 'col' ? into.add(l.name) : undefined));
  return into;
}

const FNS: Record<string, (v: number) => number> = {
  exp: Math.exp, ln: Math.log, log10: Math.log10, sqrt: Math.sqrt, abs: Math.abs,
  sin: Math.sin, cos: Math.cos, tan: Math.tan, atan: Math.atan, sinh: Math.sinh, cosh: Math.cosh, tanh: Math.tanh,
};

/**
 * Value of a parameter-free canonical form at one row (`col` gives a
 * column's value); NaN for anything it does not know (parameters, other
 * functions), so callers treat the row as unusable.
 */
export function evaluate(c: Canon, col: (name: string) => number): number {
  switch (c.t) {
    case 'num':
      return c.v;
    case 'col':
      return col(c.name);
    case 'sum': {
      let s = c.k;
      for (const t of c.terms) s += t.c * evaluate(t.e, col);
      return s;
    }
    case 'prod': {
      let s = c.c;
      for (const f of c.fs) s *= evaluate(f.e, col) ** f.p;
      return s;
    }
    case 'pow':
      return evaluate(c.base, col) ** evaluate(c.exp, col);
    case 'call': {
      const known = Object.prototype.hasOwnProperty.call(FNS, c.fn);
      return known && c.args.length === 1 ? FNS[c.fn](evaluate(c.args[0], col)) : NaN;
    }
    default:
      return NaN;
  }
}

/**
 * The last operator of an expression as a binary node: a `chain`
 * `a₀ op₀ a₁ … op₋₁ aₖ` is `(a₀ op₀ … aₖ₋₁) op₋₁ aₖ` (parser/plan.ts), so a
 * model written `vmax * s / (km + s)` splits at its `/` like `(vmax * s) / (km + s)`.
 */
export function lastBinary(e: Expr): { op: string; left: Expr; right: Expr } | null {
  if (e.kind === 'binary') return e;
  if (e.kind !== 'chain' || e.args.length < 2) return null;
  const k = e.args.length - 1;
  const left: Expr = k === 1 ? e.args[0] : { kind: 'chain', ops: e.ops.slice(0, k - 1), args: e.args.slice(0, k) };
  return { op: e.ops[k - 1], left, right: e.args[k] };
}
