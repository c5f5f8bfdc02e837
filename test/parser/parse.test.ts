import { describe, expect, it } from 'vitest';
import { analyze, parse } from '../../parser/index';
import type { ExprAst, FitAst, StatementAst } from '../../parser/ast';
import { codes, marked } from './helpers';

/** Expression tree written back with full parentheses, to assert grouping. */
function show(e: ExprAst): string {
  switch (e.kind) {
    case 'number': return String(e.value);
    case 'name': return e.quoted ? `"${e.name}"` : e.name;
    case 'dotted': return [e.head, ...e.members].map((m) => m.name).join('.');
    case 'call': return `${e.fn}(${e.args.map(show).join(', ')})`;
    case 'unary': return `(${e.op}${show(e.arg)})`;
    case 'not': return `(not ${show(e.arg)})`;
    case 'binary': case 'compare': case 'logic': return `(${show(e.left)} ${e.op} ${show(e.right)})`;
    // a chain reads as the nested binary operations it stands for
    case 'chain': return e.ops.reduce((acc, op, i) => `(${acc} ${op} ${show(e.args[i + 1])})`, show(e.args[0]));
    case 'error': return '?';
  }
}

function modelOf(src: string): string {
  const { ast, diagnostics } = parse(`fit f on d {\n model y = ${src}\n}`);
  expect(diagnostics).toEqual([]);
  const fit = ast.statements[0] as FitAst;
  const m = fit.items.find((i) => i.kind === 'model');
  if (m?.kind !== 'model') throw new Error('no model');
  return show(m.model);
}

function only(text: string): StatementAst {
  const { ast, diagnostics } = parse(text);
  expect(diagnostics).toEqual([]);
  expect(ast.statements).toHaveLength(1);
  return ast.statements[0];
}

describe('parser/parse statements', () => {
  it('data with where, delimiter and decimal', () => {
    const s = only('data plates = "uptake.csv" where conc > 0 delimiter ";" decimal ","');
    expect(s.kind).toBe('data');
    if (s.kind !== 'data') return;
    expect(s.name?.name).toBe('plates');
    expect(s.path?.value).toBe('uptake.csv');
    expect(s.options.map((o) => o.kind)).toEqual(['where', 'delimiter', 'decimal']);
  });

  it('const with a unit and a negative value', () => {
    const s = only('const drift = -0.25 [mV/h]');
    expect(s).toMatchObject({ kind: 'const', name: { name: 'drift' }, value: { kind: 'number', value: -0.25 }, unit: { text: 'mV/h' } });
  });

  it('fit with every kind of item', () => {
    const s = only(`fit f on d {
  model y = a * x + b
  param a = 1 in [0, inf] fixed [g]
  param b
  sigma sd
  weight 1 / x
  method linear
  loss cauchy scale 2
  level 0.9
  iterations 50
  tolerance 1e-8
  rate 0.1
  per batch
}`);
    if (s.kind !== 'fit') throw new Error('not a fit');
    expect(s.items.map((i) => i.kind)).toEqual(['model', 'param', 'param', 'sigma', 'weight', 'method', 'loss', 'level', 'iterations', 'tolerance', 'rate', 'per']);
    const a = s.items[1];
    expect(a).toMatchObject({ kind: 'param', name: { name: 'a' }, initial: { kind: 'number', value: 1 }, bounds: { low: { value: 0 }, high: { kind: 'inf', negative: false } }, unit: { text: 'g' } });
    expect(a.kind === 'param' && a.fixed !== undefined).toBe(true);
    expect(s.items[6]).toMatchObject({ kind: 'loss', value: { name: 'cauchy' }, scale: { value: 2 } });
  });

  it('param parts may come in any order', () => {
    const s = only('fit f on d { model y = k * x param k fixed [1/s] = 3 in [1, 5] }');
    if (s.kind !== 'fit') throw new Error('not a fit');
    expect(s.items[1]).toMatchObject({ kind: 'param', initial: { value: 3 }, unit: { text: '1/s' }, repeated: [] });
  });

  it('predict, invert and compare', () => {
    expect(only('predict f at x = 1, -2, 3e2')).toMatchObject({ kind: 'predict', fit: { name: 'f' }, column: { name: 'x' }, values: [{ value: 1 }, { value: -2 }, { value: 300 }] });
    expect(only('invert f at "signal (mV)" = 40')).toMatchObject({ kind: 'invert', column: { name: 'signal (mV)', quoted: true } });
    expect(only('compare f, g, h')).toMatchObject({ kind: 'compare', fits: [{ name: 'f' }, { name: 'g' }, { name: 'h' }] });
  });

  it('expect with within, above, below and .se', () => {
    expect(only('expect f.tau within 11.5 .. 12.5')).toMatchObject({ kind: 'expect', path: [{ name: 'tau' }], bound: { kind: 'within', low: { value: 11.5 }, high: { value: 12.5 } }, text: 'f.tau within 11.5 .. 12.5' });
    expect(only('expect f.r2 above 0.99')).toMatchObject({ bound: { kind: 'above', value: { value: 0.99 } } });
    expect(only('expect f.k.se below 0.1')).toMatchObject({ path: [{ name: 'k' }, { name: 'se' }], bound: { kind: 'below' } });
  });

  it('soft keywords serve as names inside a line', () => {
    const s = only('fit rate on weight {\n model ln(rate) = level * weight\n param level\n}');
    if (s.kind !== 'fit') throw new Error('not a fit');
    expect(s.name?.name).toBe('rate');
    const m = s.items[0];
    expect(m.kind === 'model' && show(m.response)).toBe('ln(rate)');
    expect(m.kind === 'model' && show(m.model)).toBe('(level * weight)');
  });

  it('comments and blank lines are ignored', () => {
    const { ast, diagnostics } = parse('# only a comment\n\n   # another\nconst k = 1 # trailing\n');
    expect(diagnostics).toEqual([]);
    expect(ast.statements.map((s) => s.kind)).toEqual(['const']);
  });

  it('gives nodes ranges that cover their text', () => {
    const m = marked('const a = 1\n«fit f on d {\n  model y = a * x\n}»\n');
    const { ast } = parse(m.text);
    expect(ast.statements[1].range).toEqual({ start: m.start, end: m.end });
  });
});

describe('parser/parse precedence', () => {
  it('unary minus binds looser than ^: -x^2 = -(x^2)', () => {
    expect(modelOf('-x^2')).toBe('(-(x ^ 2))');
  });
  it('^ is right-associative: 2^3^2 = 2^(3^2)', () => {
    expect(modelOf('2^3^2')).toBe('(2 ^ (3 ^ 2))');
  });
  it('a signed exponent is allowed: 2^-x', () => {
    expect(modelOf('2^-x')).toBe('(2 ^ (-x))');
  });
  it('* and / bind tighter than + and -, all left-associative', () => {
    expect(modelOf('a - b - c * d / e + f')).toBe('(((a - b) - ((c * d) / e)) + f)');
  });
  it('parentheses override', () => {
    expect(modelOf('(a + b) * c')).toBe('((a + b) * c)');
  });
  it('conditions: comparison < not < and < or', () => {
    expect(modelOf('when(not x < 1 and y >= 2 or z != 3, a, b)')).toBe('when((((not (x < 1)) and (y >= 2)) or (z != 3)), a, b)');
  });
  it('calls take several arguments and nest', () => {
    expect(modelOf('max(a, hypot(x, 2 * y))')).toBe('max(a, hypot(x, (2 * y)))');
  });
});

describe('parser/parse error recovery', () => {
  it('reports every syntax error of a file with several, each on its own line', () => {
    const text = [
      'data d = "a.csv" where x >', // 1: missing operand
      'const k = 3 [mg/L]',
      'fit f on d {',
      '  model y = a * exp(-b * x', // 4: missing )
      '  param a = 1',
      '  param b = 2 in [0 5]', // 6: missing comma
      '}',
      'fit g on d {',
      '  model y = c * x +', // 9: missing operand
      '  param c',
      '}',
      'expect f.a within 1 ..', // 12: missing upper value
      'compare f, g',
    ].join('\n');
    const { ast, diagnostics } = parse(text);
    expect(codes(diagnostics).every((c) => c === 'syntax')).toBe(true);
    expect(diagnostics.map((d) => d.range.start.line)).toEqual([1, 4, 6, 9, 12]);
    // Recovery keeps the statements around the errors.
    expect(ast.statements.map((s) => s.kind)).toEqual(['data', 'const', 'fit', 'fit', 'expect', 'compare']);
  });

  it('points a missing piece at the end of its line', () => {
    const m2 = marked('fit f on d {\n  model y = a «*»\n  param a\n}');
    const d = parse(m2.text).diagnostics;
    expect(d).toHaveLength(1);
    expect(d[0].range.start).toEqual(m2.start);
    expect(d[0].message).toMatch(/end of this line/);
  });

  it('does not take the keyword of the next line as a missing option value', () => {
    const m = marked('fit f on d {\n  model y = a * x\n  «method»\n  level 0.9\n}');
    const { ast, diagnostics } = parse(m.text);
    expect(diagnostics.map((d) => [d.code, d.range.start, d.range.end])).toEqual([['syntax', m.start, m.end]]);
    const fit = ast.statements[0] as FitAst;
    expect(fit.items.map((i) => i.kind)).toEqual(['model', 'method', 'level']);
  });

  it('reports a missing closing brace over the block, from its opening brace through the last token', () => {
    const m = marked('fit f on d «{\n  model y = a * x\n  param a»');
    const d = parse(m.text).diagnostics;
    expect(d).toHaveLength(1);
    expect(d[0]).toMatchObject({ code: 'syntax', range: { start: m.start, end: m.end } });
    expect(d[0].message).toBe("'{' is not closed: expected '}' after line 3");
  });

  it('covers an unclosed parenthesis from its opening, not one character at the end', () => {
    for (const model of ['«(1 + (x / c)^h»', 'a + «(b * (x / c)»', 'a * exp«(b * x»']) {
      const m = marked(`fit f on d {\n  model y = ${model}\n  param a = 1\n}`);
      const d = parse(m.text).diagnostics;
      expect(d.map((x) => [x.message, x.range.start, x.range.end]), model).toEqual([["'(' is not closed: expected ')' at the end of this line", m.start, m.end]]);
    }
    // at the end of the file, and in a filter
    const eof = marked('fit f on d {\n  model y = a * «(b + x»');
    expect(parse(eof.text).diagnostics[0].range).toEqual({ start: eof.start, end: eof.end });
    const where = marked('data d = "a.csv" where «(x > 1»\nconst k = 1');
    expect(parse(where.text).diagnostics.map((x) => [x.range.start, x.range.end])).toEqual([[where.start, where.end]]);
  });

  it('covers an unclosed bracket of bounds or a unit from its opening', () => {
    const bounds = marked('fit f on d {\n  model y = a * x\n  param a = 1 in «[0, 10»\n}');
    expect(parse(bounds.text).diagnostics.map((x) => [x.message, x.range.start, x.range.end])).toEqual([["'[' is not closed: expected ']' at the end of this line", bounds.start, bounds.end]]);
    const unit = marked('fit f on d {\n  model y = a * x\n  param a = 1 «[mg»\n}');
    expect(parse(unit.text).diagnostics.map((x) => [x.message, x.range.start, x.range.end])).toEqual([["'[' is not closed: expected ']' at the end of this line", unit.start, unit.end]]);
  });

  it('reports an unclosed quote once, from the quote to the end of the line, with no follow-on errors', () => {
    const m = marked('data d = «"a.csv»\nfit f on d {\n  model y = a * x\n  param a = 1\n}\n');
    const { diagnostics } = analyze(m.text);
    expect(diagnostics.map((x) => [x.message, x.range.start, x.range.end])).toEqual([['this text has no closing " on its line', m.start, m.end]]);
  });

  it('reports unknown characters and unclosed strings with their positions', () => {
    const m = marked('const k = 1 «@»\n');
    expect(parse(m.text).diagnostics[0]).toMatchObject({ code: 'syntax', range: { start: m.start } });
    const m2 = marked('data d = «"open.csv»\n');
    const d2 = parse(m2.text).diagnostics;
    expect(d2.some((d) => d.range.start.offset === m2.start.offset && /closing/.test(d.message))).toBe(true);
  });

  it('never throws, even on non-string input at runtime', () => {
    expect(() => parse(undefined as unknown as string)).not.toThrow();
    expect(parse('').diagnostics).toEqual([]);
  });
});
