/**
 * The semantic pass: walks the statements top to bottom (a name must be
 * declared above its use), checks each, and assembles the Plan. Never
 * throws; the plan is returned even when there are errors (then partial).
 */
import type { ColumnUnitAst, ConstAst, DataAst, SpecAst, StatementAst } from './ast';
import { PLAN_VERSION, type DataSource, type Diagnostic, type Plan } from './plan';
import { isBuiltinConstant, type CheckContext, type Env } from './check-env';
import { newUse, resolveExpr, resolveValue } from './check-expr';
import { checkFit } from './check-fit';
import { checkDerive } from './check-derive';
import { checkBackcalc, checkCompare, checkExpect, checkQuery } from './check-queries';
import { MSG } from './messages';
import { Reporter } from './report';
import { Suggester } from './suggest';

export type { CheckContext } from './check-env';

export function checkSpec(ast: SpecAst, ctx: CheckContext = {}): { plan: Plan; diagnostics: Diagnostic[] } {
  const plan: Plan = { version: PLAN_VERSION, data: [], constants: [], fits: [], derived: [], queries: [], expectations: [] };
  const derived: NonNullable<Plan['derived']> = [];
  plan.derived = derived;
  const r = new Reporter();
  try {
    const env: Env = { r, suggester: new Suggester(), ctx, consts: new Map(), data: new Map(), fits: new Map(), derived: new Map(), declared: declarations(ast.statements) };
    for (const s of ast.statements) {
      switch (s.kind) {
        case 'data': {
          const d = checkData(env, s);
          if (d) plan.data.push(d);
          break;
        }
        case 'const': {
          const c = checkConst(env, s);
          if (c) plan.constants.push(c);
          break;
        }
        case 'fit': {
          const f = checkFit(env, s);
          if (s.name && !env.fits.has(s.name.name)) env.fits.set(s.name.name, f);
          if (s.name && s.data) plan.fits.push(f.plan);
          break;
        }
        case 'derive': {
          const d = checkDerive(env, s);
          if (d) derived.push(d);
          break;
        }
        case 'predict':
        case 'invert': {
          const q = checkQuery(env, s);
          if (q) plan.queries.push(q);
          break;
        }
        case 'backcalc': {
          const q = checkBackcalc(env, s);
          if (q) plan.queries.push(q);
          break;
        }
        case 'compare':
          plan.queries.push(checkCompare(env, s));
          break;
        case 'expect': {
          const x = checkExpect(env, s);
          if (x) plan.expectations.push(x);
          break;
        }
      }
    }
    finish(env, ast.statements);
  } catch (err) {
    r.report('internal', MSG.internal(err instanceof Error ? err.message : String(err)), ast.range);
  }
  return { plan, diagnostics: r.diagnostics };
}

/** First declaration line of every data, const, fit and derive name in the file. */
function declarations(statements: StatementAst[]): Env['declared'] {
  const declared: Env['declared'] = { const: new Map(), data: new Map(), fit: new Map(), derive: new Map() };
  for (const s of statements) {
    if ((s.kind === 'const' || s.kind === 'data' || s.kind === 'fit' || s.kind === 'derive') && s.name && !declared[s.kind].has(s.name.name)) {
      declared[s.kind].set(s.name.name, s.name.range.start.line);
    }
  }
  return declared;
}

function readHeaders(env: Env, name: string, path: string, options: Pick<DataSource, 'delimiter' | 'decimal'>): ReadonlySet<string> | undefined {
  try {
    const h = env.ctx.headers?.(name, path, options);
    return Array.isArray(h) ? new Set(h.map(String)) : undefined;
  } catch {
    return undefined; // a failing callback means "headers unknown", not a crash
  }
}

const DELIMITERS: Readonly<Record<string, ',' | ';' | '\t'>> = { ',': ',', ';': ';', '\\t': '\t', '\t': '\t', tab: '\t' };

function checkData(env: Env, s: DataAst): DataSource | undefined {
  const { r } = env;
  if (!s.name || !s.path) return undefined;
  const name = s.name.name;
  const prev = env.data.get(name);
  if (prev) r.report('duplicate_name', MSG.duplicate('data', name, prev.line), s.name.range);
  if (s.path.value.trim() === '') r.report('empty_path', MSG.emptyPath, s.path.range);
  // the header is read with the statement's delimiter and decimal options (checked below)
  const readOptions: Pick<DataSource, 'delimiter' | 'decimal'> = {};
  for (const o of s.options) {
    const v = o.kind === 'delimiter' || o.kind === 'decimal' ? o.value?.value : undefined;
    if (v === undefined) continue;
    if (o.kind === 'delimiter' && readOptions.delimiter === undefined && Object.prototype.hasOwnProperty.call(DELIMITERS, v)) readOptions.delimiter = DELIMITERS[v];
    if (o.kind === 'decimal' && readOptions.decimal === undefined && (v === '.' || v === ',')) readOptions.decimal = v;
  }
  const headers = readHeaders(env, name, s.path.value, readOptions);
  const source: DataSource = { name, path: s.path.value, range: s.range };
  const seen = new Set<string>();
  for (const o of s.options) {
    if (seen.has(o.kind)) {
      r.report('duplicate_option', MSG.duplicateOption(o.kind), o.range);
      continue;
    }
    seen.add(o.kind);
    if (o.kind === 'where') {
      const scope = { params: new Set<string>(), allowParams: false, place: 'where condition', dataName: name, columns: headers, allowText: true };
      source.filter = resolveExpr(env, o.condition, 'condition', scope, newUse());
    } else if (o.kind === 'delimiter' && o.value) {
      const v = o.value.value;
      if (Object.prototype.hasOwnProperty.call(DELIMITERS, v)) source.delimiter = DELIMITERS[v];
      else r.report('unknown_option', MSG.unknownOption('delimiter', v, [',', ';', 'tab']), o.value.range, env.suggester.suggest(v, ['tab']));
    } else if (o.kind === 'decimal' && o.value) {
      const v = o.value.value;
      if (v === '.' || v === ',') source.decimal = v;
      else r.report('unknown_option', MSG.unknownOption('decimal mark', v, ['.', ',']), o.value.range);
    } else if (o.kind === 'units') {
      const units = checkUnits(env, name, o.entries, headers);
      if (Object.keys(units).length) source.units = units;
    }
  }
  if (source.decimal === ',' && source.delimiter === ',') {
    const o = s.options.find((x) => x.kind === 'decimal');
    r.report('delimiter_clash', MSG.delimiterClash, o?.range ?? s.range);
  }
  if (!prev) env.data.set(name, { plan: source, headers, line: s.name.range.start.line, used: false });
  return prev ? undefined : source;
}

/** `units COLUMN [UNIT], ...`: each column in the data (when its header is known), each given once. */
function checkUnits(env: Env, data: string, entries: readonly ColumnUnitAst[], headers: ReadonlySet<string> | undefined): Record<string, string> {
  const units = new Map<string, string>();
  for (const e of entries) {
    if (!e.column || !e.unit) continue; // a syntax error, already reported
    const col = e.column.name;
    if (headers && !headers.has(col)) {
      env.r.report('unknown_column', MSG.unknownColumn(col, data), e.column.range, env.suggester.suggest(col, headers));
    } else if (units.has(col)) {
      env.r.report('duplicate_option', MSG.duplicateOption(`the unit of column ${JSON.stringify(col)}`), e.range);
    } else {
      units.set(col, e.unit.text);
    }
  }
  // (own properties even for a column called `__proto__`)
  return Object.fromEntries(units);
}

function checkConst(env: Env, s: ConstAst): Plan['constants'][number] | undefined {
  const { r } = env;
  if (!s.name) return undefined;
  const name = s.name.name;
  if (isBuiltinConstant(name)) {
    r.report('reserved_name', MSG.reservedName(name), s.name.range);
    return undefined;
  }
  const prev = env.consts.get(name);
  if (prev) {
    r.report('duplicate_name', MSG.duplicate('constant', name, prev.line), s.name.range);
    return undefined;
  }
  const value = resolveValue(env, s.value, { allowInf: false });
  // Registered even when unreadable (already reported), so later uses do not report it again.
  env.consts.set(name, { value: value ?? 0, line: s.name.range.start.line });
  if (value === undefined) return undefined;
  const c: Plan['constants'][number] = { name, value, range: s.range };
  if (s.unit) c.unit = s.unit.text;
  return c;
}

/** File-wide checks once everything is known: constants that shadow columns, unused data. */
function finish(env: Env, statements: StatementAst[]): void {
  for (const s of statements) {
    if (s.kind !== 'const' || !s.name) continue;
    for (const d of env.data.values()) {
      if (d.headers?.has(s.name.name)) env.r.report('const_column_clash', MSG.constColumnClash(s.name.name, d.plan.name), s.name.range);
    }
  }
  for (const s of statements) {
    if (s.kind !== 'data' || !s.name) continue;
    const d = env.data.get(s.name.name);
    if (d && !d.used && d.plan.range === s.range) env.r.report('unused_data', MSG.unusedData(s.name.name), s.name.range);
  }
}
