import { describe, expect, it } from 'vitest';
import { analyze, parse } from '../../parser/index';
import type { ExprAst } from '../../parser/ast';
import type { Diagnostic, Expr } from '../../parser/plan';
import { MAX_NESTING } from '../../parser/limits';
import { getParser } from '../../parser/grammar';
import { lexer, markLineStarts } from '../../parser/tokens';
import { specs } from './helpers';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import Ajv from 'ajv';
import schema from '../../parser/plan.schema.json';

const validatePlan = new Ajv().compile(schema);

const N = MAX_NESTING;
const HEADERS = { headers: () => ['x', 'y'] };
const wrap = (model: string): string => `data d = "a.csv"\nfit f on d {\n  model y = ${model}\n  param a = 1\n}\n`;
const errorsOf = (ds: Diagnostic[]) => ds.filter((d) => d.severity === 'error');
const deep = (ds: Diagnostic[]) => ds.filter((d) => d.code === 'nested_too_deeply');

/** Nesting depth as the limit counts it: leaves 0; a chain counts once; parentheses add nothing of their own. */
function depth(e: ExprAst): number {
  let max = 0;
  const stack: [ExprAst, number][] = [[e, 0]];
  while (stack.length) {
    const [x, d] = stack.pop()!;
    const kids = x.kind === 'call' || x.kind === 'chain' ? x.args
      : x.kind === 'unary' || x.kind === 'not' ? [x.arg]
        : x.kind === 'binary' || x.kind === 'compare' || x.kind === 'logic' ? [x.left, x.right] : [];
    if (kids.length) {
      max = Math.max(max, d + 1);
      for (const k of kids) stack.push([k, d + 1]);
    }
  }
  return max;
}

/** Builders of expressions exactly `n` levels deep, each of one kind of nesting (parentheses alone add none: tested apart). */
const SHAPES: Record<string, (n: number) => string> = {
  calls: (n) => `${'exp('.repeat(n - 1)}a * x${')'.repeat(n - 1)}`,
  signs: (n) => `${'-'.repeat(n - 1)}a * x`,
  powers: (n) => `a * ${Array.from({ length: n }, () => 'x').join('^')}`,
  'nested sums': (n) => `${'(a + '.repeat(n - 1)}a * x${')'.repeat(n - 1)}`,
  'signs in calls': (n) => `${'exp(-'.repeat(Math.floor((n - 1) / 2))}${(n - 1) % 2 ? '-' : ''}a * x${')'.repeat(Math.floor((n - 1) / 2))}`,
};

describe('parser/limits: nesting', () => {
  for (const [name, make] of Object.entries(SHAPES)) {
    it(`${name}: ${N} levels check clean, ${N + 1} levels give one located nested_too_deeply`, () => {
      const ok = analyze(wrap(make(N)), HEADERS);
      expect(errorsOf(ok.diagnostics)).toEqual([]);
      const fit = parse(wrap(make(N))).ast.statements[1];
      if (fit.kind !== 'fit' || fit.items[0].kind !== 'model') throw new Error('no model');
      expect(depth(fit.items[0].model)).toBe(N);
      const text = wrap(make(N + 1));
      const bad = analyze(text, HEADERS).diagnostics;
      expect(errorsOf(bad).map((d) => d.code)).toEqual(['nested_too_deeply']);
      const d = deep(bad)[0];
      expect(d.message).toContain(`limit ${N}`);
      expect(d.range.start.line).toBe(3);
      expect(d.range.end.offset).toBeGreaterThan(d.range.start.offset);
    });
  }

  it(`parentheses: ${N} pairs are fine, the opening parenthesis of pair ${N + 1} is reported`, () => {
    expect(analyze(wrap(`${'('.repeat(N)}a * x${')'.repeat(N)}`), HEADERS).diagnostics).toEqual([]);
    const text = wrap(`${'('.repeat(N + 1)}a * x${')'.repeat(N + 1)}`);
    const ds = analyze(text, HEADERS).diagnostics;
    expect(ds.map((d) => d.code)).toEqual(['nested_too_deeply']);
    expect(ds[0].range.start.offset).toBe(text.indexOf('(') + N);
    expect(text.slice(ds[0].range.start.offset, ds[0].range.end.offset)).toBe('(');
  });

  it('a call one level too deep is reported at its function name, and the rest of the spec still checks', () => {
    const text = `${wrap(`${'exp('.repeat(N)}sqrt(a * x)${')'.repeat(N)}`)}predict g at x = 1\n`;
    const ds = analyze(text, HEADERS).diagnostics;
    expect(ds.map((d) => d.code)).toEqual(['nested_too_deeply', 'unknown_fit']);
    expect(text.slice(ds[0].range.start.offset, ds[0].range.end.offset)).toBe('sqrt');
  });

  it('an unclosed run of parentheses is cut at the end of its line; the missing ) is still a syntax error', () => {
    const text = `data d = "a.csv"\nfit f on d {\n  model y = ${'('.repeat(3 * N)}a * x\n  param a = 1\n}\n`;
    const ds = analyze(text, HEADERS).diagnostics;
    expect(deep(ds)).toHaveLength(1);
    expect(ds.every((d) => d.range.start.line === 3)).toBe(true);
    expect(ds.some((d) => d.code === 'syntax')).toBe(true);
  });

  it('the sizes that used to exhaust the stack give located errors, never internal ones', () => {
    const cases = [
      `${'('.repeat(700)}a * x${')'.repeat(700)}`,
      `${'exp('.repeat(500)}a * x${')'.repeat(500)}`,
      `${'-'.repeat(5000)}a * x`,
      `${'not '.repeat(2000)}x > a`,
      `a * ${Array.from({ length: 3000 }, () => 'x').join('^')}`,
      `${'(a+'.repeat(2000)}x${')'.repeat(2000)}`,
    ];
    for (const c of cases) {
      const ds = analyze(wrap(c), HEADERS).diagnostics;
      expect(ds.some((d) => d.code === 'internal'), c.slice(0, 20)).toBe(false);
      expect(deep(ds).length, c.slice(0, 20)).toBeGreaterThanOrEqual(1);
      for (const d of ds) expect(d.range.start.line, c.slice(0, 20)).toBe(3);
    }
  });

  it('a data condition and a derive expression are limited the same way', () => {
    const where = `data d = "a.csv" where ${'not '.repeat(N + 1)}x > 0\nfit f on d {\n  model y = a * x\n  param a = 1\n}\n`;
    expect(errorsOf(analyze(where, HEADERS).diagnostics).map((d) => d.code)).toEqual(['nested_too_deeply']);
    const derive = `${wrap('a * x')}derive k = ${'-'.repeat(N + 1)}f.a\n`;
    expect(errorsOf(analyze(derive, HEADERS).diagnostics).map((d) => d.code)).toEqual(['nested_too_deeply']);
  });

  it('the margin: the parser alone reads 250 nested calls (2.5 times the limit) in this process', () => {
    const lexed = lexer.tokenize(wrap(`${'exp('.repeat(250)}a * x${')'.repeat(250)}`));
    markLineStarts(lexed.tokens);
    const p = getParser();
    p.input = lexed.tokens;
    p.spec();
    expect(p.errors).toEqual([]);
  });

  it('the samples and test specs nest at most 6 levels (far below the limit)', () => {
    let max = 0;
    const texts = specs().map((s) => s.text);
    const samples = join(__dirname, '../../samples');
    for (const d of readdirSync(samples, { withFileTypes: true })) {
      if (!d.isDirectory()) continue;
      for (const f of readdirSync(join(samples, d.name))) if (f.endsWith('.lsq')) texts.push(readFileSync(join(samples, d.name, f), 'utf8'));
    }
    expect(texts.length).toBeGreaterThan(5);
    for (const t of texts) {
      for (const s of parse(t).ast.statements) {
        const exprs: ExprAst[] = [];
        if (s.kind === 'fit') for (const i of s.items) { if (i.kind === 'model') exprs.push(i.response, i.model); if (i.kind === 'sigma' || i.kind === 'weight') exprs.push(i.expr); }
        if (s.kind === 'derive') exprs.push(s.expr);
        if (s.kind === 'data') for (const o of s.options) if (o.kind === 'where') exprs.push(o.condition);
        for (const e of exprs) max = Math.max(max, depth(e));
      }
    }
    expect(max).toBeLessThanOrEqual(6);
  });
});

describe('parser/limits: long flat expressions', () => {
  const terms = (n: number) => Array.from({ length: n }, (_, i) => `${i + 1} * a * x`).join(' + ');

  it('a sum of 10,000 terms checks clean into one flat chain (plan serialisable and cloneable)', () => {
    const { plan, diagnostics } = analyze(wrap(terms(10_000)), HEADERS);
    expect(diagnostics).toEqual([]);
    const model = plan.fits[0].blocks[0].model as Extract<Expr, { kind: 'chain' }>;
    expect(model.kind).toBe('chain');
    expect(model.args).toHaveLength(10_000);
    expect(model.ops.every((o) => o === '+')).toBe(true);
    expect(JSON.parse(JSON.stringify(plan)).fits[0].blocks[0].model.args).toHaveLength(10_000);
    expect(validatePlan(JSON.parse(JSON.stringify(plan)))).toBe(true);
    expect((structuredClone(plan).fits[0].blocks[0].model as typeof model).args).toHaveLength(10_000);
  });

  it('mixed operators of one level chain in order; other levels and parentheses keep their own nodes', () => {
    const { plan } = analyze(wrap('a - x + 2 - a * x * 3 / x + (x + a + 1)'), HEADERS);
    const m = plan.fits[0].blocks[0].model as Extract<Expr, { kind: 'chain' }>;
    expect(m.kind).toBe('chain');
    expect(m.ops).toEqual(['-', '+', '-', '+']);
    expect(m.args.map((a) => a.kind)).toEqual(['param', 'column', 'number', 'chain', 'chain']);
    expect((m.args[3] as Extract<Expr, { kind: 'chain' }>).ops).toEqual(['*', '*', '/']);
    // the published schema knows the chain node; a two-operand run stays a binary node
    expect(validatePlan(JSON.parse(JSON.stringify(plan))), JSON.stringify(validatePlan.errors)).toBe(true);
    expect(analyze(wrap('a + x'), HEADERS).plan.fits[0].blocks[0].model.kind).toBe('binary');
  });

  it('a condition of 3,000 clauses joined by and checks clean', () => {
    const clauses = Array.from({ length: 3000 }, (_, i) => `x > ${i}`).join(' and ');
    const r = analyze(`data d = "a.csv" where ${clauses}\nfit f on d {\n  model y = a * x\n  param a = 1\n}\n`, HEADERS);
    expect(r.diagnostics).toEqual([]);
    expect(r.plan.data[0].filter?.kind).toBe('chain');
  });

  it('200,000 predict values and 200,000 compared names parse and check without a stack problem', () => {
    const values = Array.from({ length: 200_000 }, (_, i) => String(i / 10)).join(', ');
    const r = analyze(`${wrap('a * x')}predict f at x = ${values}\n`, HEADERS);
    expect(r.diagnostics).toEqual([]);
    expect(r.plan.queries[0].kind === 'predict' && r.plan.queries[0].values.length).toBe(200_000);
    const names = Array.from({ length: 200_000 }, () => 'f').join(', ');
    const c = analyze(`${wrap('a * x')}compare ${names}\n`, HEADERS).diagnostics;
    expect(c.some((d) => d.code === 'internal')).toBe(false);
    expect(c.some((d) => d.code === 'repeated_fit')).toBe(true);
  });
});
