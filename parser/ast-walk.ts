/**
 * Visits every name and function call in a syntax tree, in source order of
 * statements. Used by the editor token classifier (lex-tokens.ts).
 */
import type { ExprAst, NameAst, SpecAst, ValueAst } from './ast';
import type { Range } from './plan';

export interface NameVisitor {
  /** A name read as a name (identifier or soft keyword used as one). */
  name(range: Range, text: string): void;
  /** The name of a function call. */
  call(range: Range, fn: string): void;
}

export function walkNames(ast: SpecAst, v: NameVisitor): void {
  const n = (x: NameAst | undefined) => { if (x && !x.quoted) v.name(x.range, x.name); };
  const val = (x: ValueAst | undefined) => { if (x?.kind === 'name') v.name(x.range, x.name); };
  const expr = (e: ExprAst): void => {
    switch (e.kind) {
      case 'name': if (!e.quoted) v.name(e.range, e.name); break;
      case 'call': v.call(e.fnRange, e.fn); e.args.forEach(expr); break;
      case 'dotted': n(e.head); e.members.forEach(n); break;
      case 'unary': case 'not': expr(e.arg); break;
      case 'binary': case 'compare': case 'logic': expr(e.left); expr(e.right); break;
      case 'chain': e.args.forEach(expr); break;
      default: break;
    }
  };
  for (const s of ast.statements) {
    switch (s.kind) {
      case 'data':
        n(s.name);
        for (const o of s.options) if (o.kind === 'where') expr(o.condition);
        break;
      case 'const': n(s.name); val(s.value); break;
      case 'fit':
        n(s.name); n(s.data); s.moreData?.forEach(n);
        for (const i of s.items) {
          switch (i.kind) {
            case 'model': expr(i.response); expr(i.model); break;
            case 'param': n(i.name); val(i.initial); val(i.bounds?.low); val(i.bounds?.high); break;
            case 'sigma': case 'weight': expr(i.expr); break;
            case 'method': case 'profile': n(i.value); break;
            case 'loss': n(i.value); val(i.scale); break;
            case 'per': n(i.column); break;
            case 'bootstrap': val(i.replicates); n(i.resample); val(i.seed); break;
            default: val(i.value); break;
          }
        }
        break;
      case 'derive': n(s.name); expr(s.expr); break;
      case 'predict': case 'invert':
        n(s.fit); n(s.column); s.values.forEach(val); break;
      case 'compare': s.fits.forEach(n); break;
      case 'expect':
        n(s.fit); s.path.forEach(n);
        if (s.bound?.kind === 'within') { val(s.bound.low); val(s.bound.high); } else if (s.bound) val(s.bound.value);
        break;
    }
  }
}
