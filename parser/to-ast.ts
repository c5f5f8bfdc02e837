/**
 * CST -> typed AST (ast.ts), one visitor method per grammar rule.
 *
 * Written for recovered parse trees: any child may be missing or be a token
 * the parser invented during recovery (`isInsertedInRecovery`). Missing
 * expressions and values become `error` nodes placed at the last text read,
 * missing names become `undefined`; the syntax error itself was already
 * reported by the parser.
 *
 * The visitor recurses once per level of parentheses and calls, which
 * parse.ts bounds (`MAX_NESTING`) before the parser runs; everything else
 * (statements, operator chains, long lists) is read in loops. An expression
 * nested deeper than `MAX_NESTING` is reported here and becomes an `error` node.
 */
import type { CstNode, IToken } from 'chevrotain';
import type { Diagnostic, Range } from './plan';
import type {
  BoundsAst, ConstAst, DataAst, DataOptionAst, DeriveAst, ExpectAst, ExpectBoundAst, ExprAst, FitAst, FitItemAst, NameAst,
  NumericOptionKind, ColumnUnitAst, ParamAst, PredictAst, QueryOptionAst, BackcalcAst, CompareAst, SpecAst, StatementAst, StringAst, UnitAst, ValueAst,
} from './ast';
import { getParser } from './grammar';
import { EMPTY_RANGE, tokenRange } from './source';
import { cover, isToken, onlyChild, real, type Children } from './cst-util';
import { climb, type Item, type PrefixOp } from './precedence';
import { MAX_NESTING } from './limits';
import { isCutToken } from './nesting';
import { MSG } from './messages';

export { cover } from './cst-util';

/** What the `operand` rule yields: its prefix operators and its atom (with its nesting depth). */
interface OperandParts {
  prefixes: IToken[];
  atom: ExprAst;
  depth: number;
}

const BaseVisitor = getParser().getBaseCstVisitorConstructor();

class AstBuilder extends BaseVisitor {
  /** Last real token converted; `error` nodes are placed at its end. */
  private lastToken: IToken | undefined;
  private source = '';
  /** Problems found while building (expressions nested too deeply). */
  private problems: Diagnostic[] = [];
  /** Nesting depth of expression nodes built from parentheses (read by the enclosing expression). */
  private depths = new WeakMap<ExprAst, number>();

  constructor() {
    super();
    this.validateVisitor();
  }

  build(cst: CstNode | undefined, source: string): { ast: SpecAst; diagnostics: Diagnostic[] } {
    this.lastToken = undefined;
    this.source = source;
    this.problems = [];
    this.depths = new WeakMap();
    const statements = cst ? (this.visit(cst) as StatementAst[]) : [];
    const range = statements.length ? cover(statements[0].range, statements[statements.length - 1].range) : EMPTY_RANGE;
    return { ast: { kind: 'spec', statements, range }, diagnostics: this.problems };
  }

  private tooDeep(range: Range): void {
    this.problems.push({ severity: 'error', code: 'nested_too_deeply', message: MSG.nestedTooDeeply(MAX_NESTING), range });
  }

  // ---- helpers -------------------------------------------------------------

  private tok(ctx: Children, key: string, i = 0): IToken | undefined {
    const t = ctx[key]?.[i];
    if (!isToken(t) || !real(t)) return undefined;
    this.lastToken = t;
    return t;
  }
  private node(ctx: Children, key: string, i = 0): CstNode | undefined {
    const n = ctx[key]?.[i];
    return n && !isToken(n) ? n : undefined;
  }
  private nodes(ctx: Children, key: string): CstNode[] {
    return (ctx[key] ?? []).filter((n): n is CstNode => !isToken(n));
  }
  /** Range of a token, or of the first real token among keys. */
  private tokRange(ctx: Children, ...keys: string[]): Range | undefined {
    for (const k of keys) {
      const t = this.tok(ctx, k);
      if (t) return tokenRange(t);
    }
    return undefined;
  }
  private nameOf(ctx: Children, key: string, i = 0): NameAst | undefined {
    const t = this.tok(ctx, key, i);
    // a quoted member of a dotted path (FIT."GROUP".PARAM) is a group label: the text inside the quotes
    if (t && t.image.startsWith('"')) return { name: t.image.slice(1, -1), quoted: true, range: tokenRange(t) };
    return t ? { name: t.image, quoted: false, range: tokenRange(t) } : undefined;
  }
  /** The name inside a `word` sub-rule. */
  private wordOf(ctx: Children): NameAst | undefined {
    const w = this.node(ctx, 'word');
    return w ? this.nameOf(w.children as Children, 'name') : undefined;
  }
  /** Read in place through wordOf. */
  word(): undefined {
    return undefined;
  }
  private stringOf(t: IToken | undefined): StringAst | undefined {
    return t ? { value: t.image.slice(1, -1), range: tokenRange(t) } : undefined;
  }
  private unitOf(t: IToken | undefined): UnitAst | undefined {
    return t ? { text: t.image.slice(1, -1), range: tokenRange(t) } : undefined;
  }
  /** Empty range at the end of the last token read. */
  private get cursor(): Range {
    if (!this.lastToken) return EMPTY_RANGE;
    const end = tokenRange(this.lastToken).end;
    return { start: end, end };
  }
  private errorHere(): { kind: 'error'; range: Range } {
    return { kind: 'error', range: this.cursor };
  }
  private expr(n: CstNode | undefined): ExprAst {
    return n ? (this.visit(n) as ExprAst) : this.errorHere();
  }
  private val(n: CstNode | undefined): ValueAst {
    return n ? (this.visit(n) as ValueAst) : this.errorHere();
  }

  // ---- statements ------------------------------------------------------------

  spec(ctx: Children): StatementAst[] {
    return this.nodes(ctx, 'statement').map((s) => this.visit(s) as StatementAst | undefined).filter((s): s is StatementAst => s !== undefined);
  }

  statement(ctx: Children): StatementAst | undefined {
    const inner = onlyChild(ctx);
    return inner ? (this.visit(inner) as StatementAst) : undefined;
  }

  dataStatement(ctx: Children): DataAst {
    const kw = this.tokRange(ctx, 'Data');
    const name = this.nameOf(ctx, 'name');
    const path = this.stringOf(this.tok(ctx, 'path'));
    const options = this.nodes(ctx, 'options').map((n) => this.visit(n) as DataOptionAst);
    return { kind: 'data', name, path, options, range: cover(kw, name?.range, path?.range, ends(options)) };
  }

  dataOption(ctx: Children): DataOptionAst {
    const where = this.tokRange(ctx, 'Where');
    if (where || ctx.condition) {
      const condition = this.expr(this.node(ctx, 'condition'));
      return { kind: 'where', condition, range: cover(where, condition.range) };
    }
    const delim = this.tokRange(ctx, 'Delimiter');
    if (delim || ctx.delimiterValue) {
      const value = this.stringOf(this.tok(ctx, 'delimiterValue'));
      return { kind: 'delimiter', value, range: cover(delim, value?.range) };
    }
    const units = this.tokRange(ctx, 'Units');
    if (units || ctx.columnUnits) {
      const entries = this.nodes(ctx, 'columnUnits').map((n) => this.visit(n) as ColumnUnitAst);
      return { kind: 'units', entries, range: cover(units, ends(entries)) };
    }
    const dec = this.tokRange(ctx, 'Decimal');
    const value = this.stringOf(this.tok(ctx, 'decimalValue'));
    return { kind: 'decimal', value, range: cover(dec, value?.range) };
  }

  columnUnit(ctx: Children): ColumnUnitAst {
    const n = this.node(ctx, 'column');
    const column = n ? (this.visit(n) as NameAst | undefined) : undefined;
    const unit = this.unitOf(this.tok(ctx, 'unit'));
    return { column, unit, range: cover(column?.range, unit?.range) };
  }

  constStatement(ctx: Children): ConstAst {
    const kw = this.tokRange(ctx, 'Const');
    const name = this.nameOf(ctx, 'name');
    const value = this.val(this.node(ctx, 'value'));
    const unit = this.unitOf(this.tok(ctx, 'unit'));
    return { kind: 'const', name, value, unit, range: cover(kw, name?.range, value.kind === 'error' ? undefined : value.range, unit?.range) };
  }

  fitStatement(ctx: Children): FitAst {
    const kw = this.tokRange(ctx, 'Fit');
    const name = this.nameOf(ctx, 'name');
    const data = this.nameOf(ctx, 'data');
    const moreData: NameAst[] = [];
    for (let i = 1; i < (ctx.data?.length ?? 0); i++) {
      const d = this.nameOf(ctx, 'data', i);
      if (d) moreData.push(d);
    }
    const open = this.tokRange(ctx, 'LBrace');
    const items = this.nodes(ctx, 'items').map((n) => this.visit(n) as FitItemAst | undefined).filter((i): i is FitItemAst => i !== undefined);
    const close = this.tokRange(ctx, 'RBrace');
    return { kind: 'fit', name, data, ...(moreData.length ? { moreData } : {}), items, range: cover(kw, name?.range, data?.range, ends(moreData), open, ends(items), close) };
  }

  fitItem(ctx: Children): FitItemAst | undefined {
    const inner = onlyChild(ctx);
    return inner ? (this.visit(inner) as FitItemAst) : undefined;
  }

  modelItem(ctx: Children): FitItemAst {
    const kw = this.tokRange(ctx, 'Model');
    const response = this.expr(this.node(ctx, 'response'));
    this.tok(ctx, 'Equals');
    const model = this.expr(this.node(ctx, 'model'));
    return { kind: 'model', response, model, range: cover(kw, response.range, model.range) };
  }

  paramItem(ctx: Children): ParamAst {
    const kw = this.tokRange(ctx, 'Param');
    const p: ParamAst = { kind: 'param', name: this.wordOf(ctx), repeated: [], range: EMPTY_RANGE };
    const ranges: (Range | undefined)[] = [kw, p.name?.range];
    for (const part of this.nodes(ctx, 'parts')) {
      const c = part.children as Children;
      if (c.Equals || c.initial) {
        const eq = this.tokRange(c, 'Equals');
        const v = this.val(this.node(c, 'initial'));
        const r = cover(eq, v.range);
        if (p.initial) p.repeated.push(r);
        else p.initial = v;
        ranges.push(r);
      } else if (c.bounds) {
        const b = this.visit(c.bounds[0] as CstNode) as BoundsAst;
        if (p.bounds) p.repeated.push(b.range);
        else p.bounds = b;
        ranges.push(b.range);
      } else if (c.Fixed) {
        const r = this.tokRange(c, 'Fixed');
        if (r && p.fixed) p.repeated.push(r);
        else if (r) p.fixed = r;
        ranges.push(r);
      } else if (c.Shared) {
        const r = this.tokRange(c, 'Shared');
        if (r && p.shared) p.repeated.push(r);
        else if (r) p.shared = r;
        ranges.push(r);
      } else if (c.Unit) {
        const u = this.unitOf(this.tok(c, 'Unit'));
        if (u && p.unit) p.repeated.push(u.range);
        else if (u) p.unit = u;
        ranges.push(u?.range);
      }
    }
    p.range = ranges.reduce<Range | undefined>((acc, r) => (r ? cover(acc, r) : acc), undefined) ?? EMPTY_RANGE;
    return p;
  }

  /** Read in place by paramItem. */
  paramPart(): undefined {
    return undefined;
  }

  bounds(ctx: Children): BoundsAst {
    const kw = this.tokRange(ctx, 'In');
    this.tok(ctx, 'LBracket');
    const low = this.val(this.node(ctx, 'low'));
    this.tok(ctx, 'Comma');
    const high = this.val(this.node(ctx, 'high'));
    const close = this.tokRange(ctx, 'RBracket');
    return { low, high, range: cover(kw, low.range, high.range, close) };
  }

  exprOption(ctx: Children): FitItemAst {
    const t = this.tok(ctx, 'keyword');
    const kind = t?.image === 'weight' ? 'weight' : 'sigma';
    const expr = this.expr(this.node(ctx, 'expression'));
    return { kind, expr, range: cover(t && tokenRange(t), expr.range) };
  }

  nameOption(ctx: Children): FitItemAst {
    const kw = this.tokRange(ctx, 'keyword');
    const kind = this.tok(ctx, 'keyword')?.image === 'profile' ? 'profile' : 'method';
    const value = this.wordOf(ctx);
    return { kind, value, range: cover(kw, value?.range) };
  }

  lossOption(ctx: Children): FitItemAst {
    const kw = this.tokRange(ctx, 'Loss');
    const value = this.wordOf(ctx);
    const scaleKw = this.tokRange(ctx, 'Scale');
    const scale = scaleKw || ctx.scale ? this.val(this.node(ctx, 'scale')) : undefined;
    return { kind: 'loss', value, scale, range: cover(kw, value?.range, scaleKw, scale?.range) };
  }

  numberOption(ctx: Children): FitItemAst {
    const t = this.tok(ctx, 'keyword');
    const kind = (t?.image ?? 'level') as NumericOptionKind;
    const value = this.val(this.node(ctx, 'value'));
    return { kind, value, range: cover(t && tokenRange(t), value.range) };
  }

  bootstrapOption(ctx: Children): FitItemAst {
    const kw = this.tokRange(ctx, 'Bootstrap');
    const replicates = this.val(this.node(ctx, 'replicates'));
    const resample = this.wordOf(ctx);
    const seedKw = this.tokRange(ctx, 'Seed');
    const seed = seedKw || ctx.seed ? this.val(this.node(ctx, 'seed')) : undefined;
    return { kind: 'bootstrap', replicates, resample, ...(seed ? { seed } : {}), range: cover(kw, replicates.range, resample?.range, seedKw, seed?.range) };
  }

  perOption(ctx: Children): FitItemAst {
    const kw = this.tokRange(ctx, 'Per');
    const n = this.node(ctx, 'column');
    const column = n ? (this.visit(n) as NameAst | undefined) : undefined;
    return { kind: 'per', column, range: cover(kw, column?.range) };
  }

  deriveStatement(ctx: Children): DeriveAst {
    const kw = this.tokRange(ctx, 'Derive');
    const name = this.nameOf(ctx, 'name');
    this.tok(ctx, 'Equals');
    const expr = this.expr(this.node(ctx, 'expression'));
    const unit = this.unitOf(this.tok(ctx, 'unit'));
    const range = cover(kw, name?.range, expr.kind === 'error' ? undefined : expr.range, unit?.range);
    const text = expr.kind === 'error' ? '' : this.source.slice(expr.range.start.offset, expr.range.end.offset).replace(/\s+/g, ' ').trim();
    return { kind: 'derive', name, expr, unit, text, range };
  }

  queryStatement(ctx: Children): PredictAst {
    const t = this.tok(ctx, 'keyword');
    const fit = this.nameOf(ctx, 'fit');
    this.tok(ctx, 'At');
    const n = this.node(ctx, 'column');
    const column = n ? (this.visit(n) as NameAst | undefined) : undefined;
    this.tok(ctx, 'Equals');
    const values = this.nodes(ctx, 'values').map((v) => this.val(v));
    const options = this.nodes(ctx, 'options').map((o) => this.visit(o) as QueryOptionAst);
    return {
      kind: t?.image === 'invert' ? 'invert' : 'predict',
      fit, column, values, options,
      range: cover(t && tokenRange(t), fit?.range, column?.range, ends(values), ends(options)),
    };
  }

  queryOption(ctx: Children): QueryOptionAst {
    const t = this.tok(ctx, 'keyword');
    const kind = t?.image === 'readings' ? 'readings' : t?.image === 'weight' ? 'weight' : 'sigma';
    const values = kind === 'readings' ? [this.val(this.node(ctx, 'readings'))] : this.nodes(ctx, 'spread').map((v) => this.val(v));
    return { kind, values, range: cover(t && tokenRange(t), ends(values)) };
  }

  backcalcStatement(ctx: Children): BackcalcAst {
    const kw = this.tokRange(ctx, 'Backcalc');
    const fit = this.nameOf(ctx, 'fit');
    return { kind: 'backcalc', fit, range: cover(kw, fit?.range) };
  }

  compareStatement(ctx: Children): CompareAst {
    const kw = this.tokRange(ctx, 'Compare');
    const fits: NameAst[] = [];
    for (let i = 0; i < (ctx.fits?.length ?? 0); i++) {
      const f = this.nameOf(ctx, 'fits', i);
      if (f) fits.push(f);
    }
    const within = this.tokRange(ctx, 'within');
    return { kind: 'compare', fits, ...(within ? { within } : {}), range: cover(kw, ends(fits)) };
  }

  expectStatement(ctx: Children): ExpectAst {
    const kw = this.tokRange(ctx, 'Expect');
    const fit = this.nameOf(ctx, 'fit');
    const path: NameAst[] = [];
    for (let i = 0; i < (ctx.path?.length ?? 0); i++) {
      const p = this.nameOf(ctx, 'path', i);
      if (p) path.push(p);
    }
    let at: ExpectAst['at'];
    const atKw = this.tokRange(ctx, 'At');
    if (atKw) {
      const n = this.node(ctx, 'atColumn');
      const column = n ? (this.visit(n) as NameAst | undefined) : undefined;
      this.tok(ctx, 'Equals');
      const value = this.val(this.node(ctx, 'atValue'));
      const options = this.nodes(ctx, 'options').map((o) => this.visit(o) as QueryOptionAst);
      at = { column, value, options, range: cover(atKw, column?.range, value.range, ends(options)) };
    }
    let bound: ExpectBoundAst | undefined;
    const within = this.tokRange(ctx, 'Within');
    const above = this.tokRange(ctx, 'Above');
    const below = this.tokRange(ctx, 'Below');
    if (within || ctx.low) {
      const low = this.val(this.node(ctx, 'low'));
      this.tok(ctx, 'DotDot');
      const high = this.val(this.node(ctx, 'high'));
      bound = { kind: 'within', low, high, range: cover(within, low.range, high.range) };
    } else if (above || ctx.above) {
      const value = this.val(this.node(ctx, 'above'));
      bound = { kind: 'above', value, range: cover(above, value.range) };
    } else if (below || ctx.below) {
      const value = this.val(this.node(ctx, 'below'));
      bound = { kind: 'below', value, range: cover(below, value.range) };
    }
    const range = cover(kw, fit?.range, ends(path), at?.range, bound?.range);
    const from = fit?.range.start.offset ?? kw?.end.offset ?? range.start.offset;
    const text = this.source.slice(from, range.end.offset).replace(/\s+/g, ' ').trim();
    return { kind: 'expect', fit, path, ...(at ? { at } : {}), bound, text, range };
  }

  value(ctx: Children): ValueAst {
    const sign = this.tok(ctx, 'sign');
    const negative = sign?.image === '-';
    const num = this.tok(ctx, 'number');
    const inf = this.tok(ctx, 'inf');
    const name = this.tok(ctx, 'name');
    const body = num ?? inf ?? name;
    if (!body) return this.errorHere();
    const range = cover(sign && tokenRange(sign), tokenRange(body));
    if (num && isCutToken(num)) return { kind: 'error', range };
    if (num) {
      const v = Number(num.image);
      return { kind: 'number', value: negative ? -v : v, range };
    }
    if (inf) return { kind: 'inf', negative, range };
    return { kind: 'name', name: body.image, negative, range };
  }

  column(ctx: Children): NameAst | undefined {
    const name = this.nameOf(ctx, 'name');
    if (name) return name;
    const q = this.tok(ctx, 'quoted');
    return q ? { name: q.image.slice(1, -1), quoted: true, range: tokenRange(q) } : undefined;
  }

  // ---- expressions -------------------------------------------------------------

  /** Flat operand/operator list -> tree, by operator precedence (precedence.ts `BINDING`). */
  expression(ctx: Children): ExprAst {
    const operands = this.nodes(ctx, 'operands');
    const ops = (ctx.operators ?? []).filter(isToken);
    const items: Item[] = [];
    const count = Math.max(operands.length, ops.length + 1);
    for (let i = 0; i < count; i++) {
      const n = operands[i];
      if (n) {
        const o = this.visit(n) as OperandParts;
        for (const p of o.prefixes) items.push({ prefix: p.image as PrefixOp, range: tokenRange(p) });
        items.push({ atom: o.atom, depth: o.depth });
      } else {
        items.push({ atom: this.errorHere(), depth: 0 });
      }
      const op = ops[i];
      if (real(op)) items.push({ op: op.image, range: tokenRange(op) });
    }
    const { expr, depth } = climb(items, this.errorHere(), (r) => this.tooDeep(r));
    if (depth > 0) this.depths.set(expr, depth);
    return expr;
  }

  operand(ctx: Children): OperandParts {
    const prefixes = (ctx.prefix ?? []).filter((t): t is IToken => isToken(t) && real(t));
    const atom = this.atom(ctx);
    return { prefixes, atom, depth: this.depths.get(atom) ?? 0 };
  }

  private atom(ctx: Children): ExprAst {
    const num = this.tok(ctx, 'number');
    if (num && isCutToken(num)) return { kind: 'error', range: tokenRange(num) };
    if (num) return { kind: 'number', value: Number(num.image), range: tokenRange(num) };
    const q = this.tok(ctx, 'quoted');
    if (q) return { kind: 'name', name: q.image.slice(1, -1), quoted: true, range: tokenRange(q) };
    const name = this.tok(ctx, 'name');
    if (name) {
      const nameRange = tokenRange(name);
      if (ctx.dot) {
        const members: NameAst[] = [];
        for (let i = 0; i < (ctx.member?.length ?? 0); i++) {
          const m = this.nameOf(ctx, 'member', i);
          if (m) members.push(m);
        }
        if (members.length === 0) return { kind: 'error', range: cover(nameRange, this.tokRange(ctx, 'dot')) };
        const head: NameAst = { name: name.image, quoted: false, range: nameRange };
        return { kind: 'dotted', head, members, range: cover(nameRange, members[members.length - 1].range) };
      }
      if (!ctx.call) return { kind: 'name', name: name.image, quoted: false, range: nameRange };
      const args = this.nodes(ctx, 'args').map((a) => this.expr(a));
      const close = this.tokRange(ctx, 'close');
      const range = cover(nameRange, args.length ? args[args.length - 1].range : undefined, close);
      const depth = 1 + args.reduce((m, a) => Math.max(m, this.depths.get(a) ?? 0), 0);
      if (depth > MAX_NESTING) {
        this.tooDeep(nameRange);
        return { kind: 'error', range };
      }
      const call: ExprAst = { kind: 'call', fn: name.image, fnRange: nameRange, args, range };
      this.depths.set(call, depth);
      return call;
    }
    const open = this.tokRange(ctx, 'open');
    const inner = this.expr(this.node(ctx, 'inner'));
    const close = this.tokRange(ctx, 'close');
    if (inner.kind === 'error') return inner;
    // Parentheses widen the node's range so messages point at "(...)" as written.
    const widened = { ...inner, range: cover(open, inner.range, close) };
    const depth = this.depths.get(inner);
    if (depth !== undefined) this.depths.set(widened, depth);
    return widened;
  }
}

/** The range from the first to the last node of a list (lists can be long: no spread into `cover`). */
function ends(xs: readonly { range: Range }[]): Range | undefined {
  return xs.length ? cover(xs[0].range, xs[xs.length - 1].range) : undefined;
}

let builder: AstBuilder | undefined;
/** The syntax tree, and the expressions nested deeper than `MAX_NESTING` (reported, read as `error` nodes). */
export function toAst(cst: CstNode | undefined, source: string): { ast: SpecAst; diagnostics: Diagnostic[] } {
  builder ??= new AstBuilder();
  return builder.build(cst, source);
}
