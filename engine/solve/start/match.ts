/**
 * Matching canonical model forms (canonical.ts) against shape patterns, for
 * recognising template families in arbitrary specs. Sums and products
 * match in any order of their terms (small lists: all orders are tried, with
 * backtracking). A pattern variable binds:
 *   P  a free parameter (distinct variables bind distinct parameters, the same
 *      variable the same parameter everywhere);
 *   X  the predictor: a parameter-free form reading exactly one column (the
 *      same form everywhere it appears);
 *   K  any number (a coefficient, exponent or constant term).
 */
import { columnsIn, key, paramsIn, type Canon } from './canonical';

export type Num = number | { k: string };

export type Pat =
  | { t: 'P'; name: string }
  | { t: 'X' }
  | { t: 'num'; v: Num }
  | { t: 'sum'; k: Num; terms: { c: Num; e: Pat }[] }
  | { t: 'prod'; c: Num; fs: { e: Pat; p: number }[] }
  | { t: 'pow'; base: Pat; exp: Pat }
  | { t: 'call'; fn: string; args: Pat[] };

export interface Binding {
  params: Record<string, string>;
  numbers: Record<string, number>;
  /** The predictor form, when the pattern has X. */
  x?: Canon;
}

const EMPTY: Binding = { params: {}, numbers: {} };

/** All ways `pat` matches `form`; the first binding is returned (null when none). */
export function matchPattern(pat: Pat, form: Canon): Binding | null {
  return m(pat, form, EMPTY);
}

function bindNum(slot: Num, v: number, b: Binding): Binding | null {
  if (typeof slot === 'number') return slot === v ? b : null;
  const have = b.numbers[slot.k];
  if (have !== undefined) return have === v ? b : null;
  return { ...b, numbers: { ...b.numbers, [slot.k]: v } };
}

/** A form as k + Σ c·e. */
function sumView(u: Canon): { k: number; terms: { c: number; e: Canon }[] } {
  if (u.t === 'sum') return u;
  if (u.t === 'num') return { k: u.v, terms: [] };
  return { k: 0, terms: [{ c: 1, e: u }] };
}

/** A form as c · Π e^p. */
function prodView(u: Canon): { c: number; fs: { e: Canon; p: number }[] } {
  if (u.t === 'prod') return u;
  if (u.t === 'num') return { c: u.v, fs: [] };
  if (u.t === 'sum' && u.k === 0 && u.terms.length === 1) {
    const inner = prodView(u.terms[0].e);
    return { c: u.terms[0].c * inner.c, fs: inner.fs };
  }
  return { c: 1, fs: [{ e: u, p: 1 }] };
}

function m(pat: Pat, u: Canon, b: Binding): Binding | null {
  switch (pat.t) {
    case 'P': {
      if (u.t !== 'par') return null;
      const have = b.params[pat.name];
      if (have !== undefined) return have === u.name ? b : null;
      if (Object.values(b.params).includes(u.name)) return null;
      return { ...b, params: { ...b.params, [pat.name]: u.name } };
    }
    case 'X': {
      if (paramsIn(u).size !== 0 || columnsIn(u).size !== 1) return null;
      if (b.x !== undefined) return key(b.x) === key(u) ? b : null;
      return { ...b, x: u };
    }
    case 'num':
      return u.t === 'num' ? bindNum(pat.v, u.v, b) : null;
    case 'sum': {
      const v = sumView(u);
      if (v.terms.length !== pat.terms.length) return null;
      const b1 = bindNum(pat.k, v.k, b);
      return b1 && matchList(pat.terms, v.terms, b1, (pt, ut, bb) => {
        const b2 = bindNum(pt.c, ut.c, bb);
        return b2 && m(pt.e, ut.e, b2);
      });
    }
    case 'prod': {
      const v = prodView(u);
      if (v.fs.length !== pat.fs.length) return null;
      const b1 = bindNum(pat.c, v.c, b);
      return b1 && matchList(pat.fs, v.fs, b1, (pf, uf, bb) => (pf.p === uf.p ? m(pf.e, uf.e, bb) : null));
    }
    case 'pow':
      if (u.t !== 'pow') return null;
      {
        const b1 = m(pat.base, u.base, b);
        return b1 && m(pat.exp, u.exp, b1);
      }
    case 'call': {
      if (u.t !== 'call' || u.fn !== pat.fn || u.args.length !== pat.args.length) return null;
      let bb: Binding | null = b;
      for (let i = 0; i < pat.args.length && bb; i++) bb = m(pat.args[i], u.args[i], bb);
      return bb;
    }
  }
}

/** Matches pattern items to user items one to one, in any order (backtracking). */
function matchList<P, U>(pats: readonly P[], items: readonly U[], b: Binding, one: (p: P, u: U, b: Binding) => Binding | null): Binding | null {
  const used = new Array<boolean>(items.length).fill(false);
  const go = (i: number, bb: Binding): Binding | null => {
    if (i === pats.length) return bb;
    for (let j = 0; j < items.length; j++) {
      if (used[j]) continue;
      const b1 = one(pats[i], items[j], bb);
      if (!b1) continue;
      used[j] = true;
      const done = go(i + 1, b1);
      used[j] = false;
      if (done) return done;
    }
    return null;
  };
  return go(0, b);
}

// Pattern builders (terse, for the family tables).
export const P = (name: string): Pat => ({ t: 'P', name });
export const X: Pat = { t: 'X' };
export const K = (k: string): { k: string } => ({ k });
export const sum = (k: Num, ...terms: [Num, Pat][]): Pat => ({ t: 'sum', k, terms: terms.map(([c, e]) => ({ c, e })) });
export const prod = (c: Num, ...fs: [Pat, number][]): Pat => ({ t: 'prod', c, fs: fs.map(([e, p]) => ({ e, p })) });
export const pow = (base: Pat, exp: Pat): Pat => ({ t: 'pow', base, exp });
export const call = (fn: string, ...args: Pat[]): Pat => ({ t: 'call', fn, args });
