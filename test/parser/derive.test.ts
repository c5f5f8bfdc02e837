import { describe, expect, it } from 'vitest';
import { analyze, lexTokens, parse } from '../../parser/index';
import type { DeriveAst, ExprAst } from '../../parser/ast';
import { marked, show } from './helpers';

const FITS = `data std = "std.csv"
data rep = "rep.csv"
const k = 3.3
fit cal on std {
  model signal = blank + slope * conc
  param blank
  param slope
}
fit cal2 on rep {
  model signal = blank + slope * conc
  param blank
  param slope = 1 fixed
}
`;

describe('parser: derive statement (syntax)', () => {
  it('reads name, expression, unit and the expression text as written', () => {
    const text = 'derive lod = 3.3 *   cal.rmse / cal.slope [mg/L]';
    const { ast, diagnostics } = parse(text);
    expect(diagnostics).toEqual([]);
    const s = ast.statements[0] as DeriveAst;
    expect(s.kind).toBe('derive');
    expect(s.name?.name).toBe('lod');
    expect(s.unit?.text).toBe('mg/L');
    expect(s.text).toBe('3.3 * cal.rmse / cal.slope');
    expect(s.range.start.offset).toBe(0);
    expect(s.range.end.offset).toBe(text.length);
  });

  it('reads FIT.NAME as one dotted operand with the range of the whole reference', () => {
    const m = marked('derive h = ln(2) * «newton.tau»');
    const { ast } = parse(m.text);
    const e = (ast.statements[0] as DeriveAst).expr;
    expect(e.kind).toBe('binary');
    const right = (e as Extract<ExprAst, { kind: 'binary' }>).right;
    expect(right).toMatchObject({ kind: 'dotted', head: { name: 'newton' }, members: [{ name: 'tau' }] });
    expect(right.range.start).toEqual(m.start);
    expect(right.range.end).toEqual(m.end);
  });

  it('keeps derive a soft keyword: a name inside a line, a statement first on a line', () => {
    const { ast, diagnostics } = parse('fit f on d {\n  model y = a * derive\n  param a\n}\nderive q = f.a');
    expect(diagnostics).toEqual([]);
    expect(ast.statements.map((s) => s.kind)).toEqual(['fit', 'derive']);
    // An incomplete model line does not swallow the derive statement on the next line.
    const broken = parse('fit f on d {\n  model y = a *\n}\nderive q = f.a');
    expect(broken.ast.statements.map((s) => s.kind)).toContain('derive');
  });

  it('expect accepts a bare name (a derived quantity) and NAME.se', () => {
    const { ast, diagnostics } = parse('expect lod below 0.1\nexpect lod.se below 0.01');
    expect(diagnostics).toEqual([]);
    expect(ast.statements.map((s) => (s.kind === 'expect' ? [s.fit?.name, s.path.map((p) => p.name)] : null))).toEqual([['lod', []], ['lod', ['se']]]);
  });

  it('classes derive as a keyword and the parts of FIT.NAME as identifiers', () => {
    const text = 'derive rate = cal.rate * 2';
    const kinds = lexTokens(text).map((t) => [text.slice(t.range.start.offset, t.range.end.offset), t.kind]);
    expect(kinds).toEqual([['derive', 'keyword'], ['rate', 'identifier'], ['=', 'operator'], ['cal', 'identifier'], ['.', 'operator'], ['rate', 'identifier'], ['*', 'operator'], ['2', 'number']]);
  });
});

describe('parser: derive statement (plan)', () => {
  it('resolves estimates, statistics, constants and earlier derived quantities', () => {
    const { plan, diagnostics } = analyze(FITS + 'derive lod = k * cal.rmse / cal.slope [mg/L]\nderive loq = 10 / k * lod [mg/L]\nderive drift = ln(cal2.slope / cal.slope) + pi');
    expect(diagnostics).toEqual([]);
    expect(plan.derived?.map((d) => [d.name, show(d.expr), d.unit, d.fits])).toEqual([
      ['lod', '((3.3 * stat:cal.rmse) / est:cal.slope)', 'mg/L', ['cal']],
      ['loq', '((10 / 3.3) * der:lod)', 'mg/L', ['cal']],
      ['drift', `(ln((est:cal2.slope / est:cal.slope)) + ${Math.PI})`, undefined, ['cal2', 'cal']],
    ]);
    expect(plan.derived?.[1].text).toBe('10 / k * lod');
  });

  it('collects the fits of earlier derived quantities', () => {
    const { plan } = analyze(FITS + 'derive a = cal.slope\nderive b = cal2.blank\nderive c = a * b');
    expect(plan.derived?.[2].fits).toEqual(['cal', 'cal2']);
  });

  it('makes expectations on derived quantities and their standard errors', () => {
    const { plan, diagnostics } = analyze(FITS + 'derive lod = k * cal.rmse / cal.slope\nexpect lod below 0.1\nexpect lod.se within 0 .. 0.01');
    expect(diagnostics).toEqual([]);
    expect(plan.expectations.map((e) => [e.target, e.text])).toEqual([
      [{ kind: 'derived', name: 'lod', of: 'estimate' }, 'lod below 0.1'],
      [{ kind: 'derived', name: 'lod', of: 'stderr' }, 'lod.se within 0 .. 0.01'],
    ]);
  });

  it('reads a standard error FIT.PARAM.se as a number (regression: it was refused); .se after a statistic or a longer path is not', () => {
    const { plan, diagnostics } = analyze(FITS + 'derive lod = 3.3 * cal.blank.se / cal.slope');
    expect(diagnostics).toEqual([]);
    const e = plan.derived![0].expr;
    expect(e.kind === 'chain' || e.kind === 'binary').toBe(true);
    expect(JSON.stringify(e)).toContain('"kind":"result","fit":"cal","of":"stderr","name":"blank"');
    expect(plan.derived![0].text).toBe('3.3 * cal.blank.se / cal.slope');
    const bad = analyze(FITS + 'derive x = cal.rmse.se');
    expect(bad.diagnostics.map((d) => [d.code, d.message])).toEqual([['unknown_target', ".se follows a parameter (FIT.PARAM.se); 'rmse' is not a parameter of the fit"]]);
    expect(analyze(FITS + 'derive x = cal.blank.se.se').diagnostics.map((d) => d.code)).toEqual(['unknown_target']);
    expect(analyze(FITS + 'derive x = cal.blank.lower').diagnostics.map((d) => d.code)).toEqual(['unknown_target']);
  });

  it('leaves a derived quantity with errors out of the plan, but reports its later uses only once', () => {
    const { plan, diagnostics } = analyze(FITS + 'derive bad = cal.nope\nderive good = bad * 2\nexpect bad below 1');
    expect(diagnostics.map((d) => d.code)).toEqual(['unknown_target']);
    expect(plan.derived?.map((d) => d.name)).toEqual(['good']);
  });

  it('a parameter named like a statistic reads the parameter (as in expect)', () => {
    const { plan } = analyze('data d = "a.csv"\nfit f on d {\n  model y = n * x\n  param n\n}\nderive q = f.n');
    expect(show(plan.derived![0].expr)).toBe('est:f.n');
  });
});
