/**
 * Parameter roles read from the model's structure (canonical.ts), for the
 * search box (box.ts) and the grid candidates (grid.ts):
 *   location  added to (or subtracted from) a predictor, as the centre c in
 *             (x − c)² or the shift b in (x + b)^k: a sum with exactly one
 *             parameter term p (coefficient c) and otherwise parameter-free
 *             terms reading one column gives p the range of
 *             −(k + Σ cᵢ·Xᵢ)/c over the data rows;
 *   scale     in a product with a predictor-like factor (a column, or a
 *             location sum) at an opposite power, as tau in x/tau or w in
 *             (x − c)²/w²: p has the units of the predictor;
 *   rate      at the same power as such a factor, as k in k·x: p has the
 *             units of 1/predictor.
 * Scale and rate carry the predictor's spread S (max − min), its smallest
 * spacing h between distinct values and its smallest non-zero magnitude m,
 * and whether they sit inside the argument of sin or cos (`periodic`: a
 * period or a frequency).
 */
import type { Expr } from '../../../parser/plan';
import { canonicalForm, columnsIn, evaluate, paramsIn, type Canon } from './canonical';

/** Parameter names read by a plan expression. */
export function paramsOfExpr(expr: Expr): Set<string> {
  return paramsIn(canonicalForm(expr));
}

/**
 * `transformed`: the role sits inside a function's argument or a power with a parameter in it (exp(−k·x),
 * (x/ec)^h), where its size relative to the data shapes the curve; a term of a plain sum or ratio (b2 + b3·x) is
 * measured against the other terms instead.
 */
export type Role =
  | { kind: 'location'; min: number; max: number; transformed: boolean }
  /**
   * For the check (check.ts), which reads a role as "a feature of the curve in units of the predictor" only where it
   * is one: `inverse`, the predictor sits at a negative power (T in Ea/T), so its spread is not the scale the data
   * resolve; `unit`, parameter and predictor at powers of equal size (k·x, x/tau, (x − c)²/w², not b·x³).
   */
  | { kind: 'scale' | 'rate'; spread: number; spacing: number; smallest: number; periodic: boolean; inverse: boolean; unit: boolean; transformed: boolean };

/** Spread, smallest positive spacing (the spread when all but one coincide) and smallest non-zero magnitude of a column's finite values. */
function spreadOf(values: Float64Array, n: number): { spread: number; spacing: number; smallest: number } | null {
  const v: number[] = [];
  for (let i = 0; i < n; i++) if (Number.isFinite(values[i])) v.push(values[i]);
  if (v.length < 2) return null;
  v.sort((a, b) => a - b);
  const spread = v[v.length - 1] - v[0];
  if (!(spread > 0)) return null;
  let spacing = spread;
  for (let i = 1; i < v.length; i++) {
    const d = v[i] - v[i - 1];
    // spacings below 1e-9 of the spread are rounding of equal values, not distinct points
    if (d > 1e-9 * spread && d < spacing) spacing = d;
  }
  let smallest = Infinity;
  for (const x of v) if (x !== 0 && Math.abs(x) < smallest) smallest = Math.abs(x);
  return { spread, spacing, smallest: Number.isFinite(smallest) ? smallest : spread };
}

/** Where a role sits in the model's structure, before the data are read (roleSites). */
type RoleSite =
  /** `name` with coefficient `c` in a sum whose other terms `rest` read one column. */
  | { site: 'location'; name: string; rest: Canon; c: number; transformed: boolean }
  /** `name` in a product with predictor-like factors: the candidates in order, the first whose column has a spread wins. */
  | { site: 'product'; name: string; candidates: { column: string; kind: 'scale' | 'rate'; inverse: boolean; unit: boolean }[]; periodic: boolean; transformed: boolean };

const sites = new WeakMap<Canon, RoleSite[]>();

/** The role sites of a canonical form, in visit order; computed once per form (the groups of a per-group fit share it). */
function roleSites(form: Canon): RoleSite[] {
  const cached = sites.get(form);
  if (cached) return cached;
  const out: RoleSite[] = [];
  /** The single column of a predictor-like factor: a column, or a location sum over one column. */
  const predictorLike = (c: Canon): string | null => {
    if (c.t === 'col') return c.name;
    if (c.t === 'sum') {
      const cs = columnsIn(c);
      const others = c.terms.filter((t) => t.e.t !== 'par');
      if (cs.size === 1 && others.every((t) => paramsIn(t.e).size === 0) && c.terms.every((t) => t.e.t === 'par' || t.e.t === 'col')) return [...cs][0];
    }
    return null;
  };
  const visit = (c: Canon, trig = false, inside = false): void => {
    switch (c.t) {
      case 'sum': {
        const paramTerms = c.terms.filter((t) => t.e.t === 'par');
        const others = c.terms.filter((t) => t.e.t !== 'par');
        if (paramTerms.length === 1 && others.length > 0 && others.every((t) => paramsIn(t.e).size === 0 && columnsIn(t.e).size === 1)) {
          out.push({ site: 'location', name: (paramTerms[0].e as { name: string }).name, rest: { t: 'sum', k: c.k, terms: others }, c: paramTerms[0].c, transformed: inside });
        }
        for (const t of c.terms) visit(t.e, trig, inside);
        break;
      }
      case 'prod': {
        for (const f of c.fs) {
          if (f.e.t !== 'par') continue;
          const candidates: { column: string; kind: 'scale' | 'rate'; inverse: boolean; unit: boolean }[] = [];
          for (const g of c.fs) {
            const column = g === f ? null : predictorLike(g.e);
            if (column) candidates.push({ column, kind: f.p * g.p < 0 ? 'scale' : 'rate', inverse: g.p < 0, unit: Math.abs(f.p) === Math.abs(g.p) });
          }
          if (candidates.length) out.push({ site: 'product', name: f.e.name, candidates, periodic: trig, transformed: inside });
        }
        for (const f of c.fs) visit(f.e, trig, inside);
        break;
      }
      case 'pow':
        visit(c.base, trig, true);
        visit(c.exp, trig, true);
        break;
      case 'call':
        for (const a of c.args) visit(a, trig || c.fn === 'sin' || c.fn === 'cos', true);
        break;
      default:
        break;
    }
  };
  visit(form);
  sites.set(form, out);
  return out;
}

/** Roles of the parameters of `expr` over the data (see the module comment); the first role found per parameter wins, locations first. */
export function parameterRoles(expr: Expr, columns: readonly string[], cols: readonly Float64Array[], n: number): Map<string, Role> {
  const out = new Map<string, Role>();
  const colOf = (name: string) => cols[columns.indexOf(name)];
  const spreads = new Map<string, ReturnType<typeof spreadOf>>();
  const spreadFor = (name: string) => {
    if (!spreads.has(name)) spreads.set(name, colOf(name) ? spreadOf(colOf(name), n) : null);
    return spreads.get(name) ?? null;
  };
  const locations: [string, Extract<Role, { kind: 'location' }>][] = [];
  const products: [string, Role][] = [];
  for (const site of roleSites(canonicalForm(expr))) {
    if (site.site === 'location') {
      let min = Infinity;
      let max = -Infinity;
      for (let i = 0; i < n; i++) {
        const v = -evaluate(site.rest, (col) => colOf(col)?.[i] ?? NaN) / site.c;
        if (!Number.isFinite(v)) continue;
        if (v < min) min = v;
        if (v > max) max = v;
      }
      if (min <= max) locations.push([site.name, { kind: 'location', min, max, transformed: site.transformed }]);
      continue;
    }
    for (const cand of site.candidates) {
      const s = spreadFor(cand.column);
      if (!s) continue;
      products.push([site.name, { kind: cand.kind, ...s, periodic: site.periodic, inverse: cand.inverse, unit: cand.unit, transformed: site.transformed }]);
      break;
    }
  }
  for (const [name, role] of locations) {
    const have = out.get(name);
    if (have?.kind === 'location') out.set(name, { kind: 'location', min: Math.min(have.min, role.min), max: Math.max(have.max, role.max), transformed: have.transformed || role.transformed });
    else out.set(name, role);
  }
  for (const [name, role] of products) if (!out.has(name)) out.set(name, role);
  return out;
}
