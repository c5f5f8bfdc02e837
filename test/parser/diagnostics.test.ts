import { describe, expect, it } from 'vitest';
import { isLinearInParameters } from '../../engine/compile';
import { analyze, check } from '../../parser/index';
import type { CheckContext } from '../../parser/index';
import type { SpecAst } from '../../parser/ast';
import { PLAN_VERSION, type Diagnostic } from '../../parser/plan';
import { MAX_NESTING } from '../../parser/limits';
import { CODES, type DiagnosticCode } from '../../parser/messages';
import { marked, specs } from './helpers';

const HEADERS: CheckContext = { headers: () => ['x', 'y', 'z', 'sd', 'batch', 'temp (C)'] };
const seen = new Set<string>();

/** Asserts a diagnostic with this code exactly on the «marked» span (line, column, offset) and returns it. */
function expectAt(withMarks: string, code: DiagnosticCode, ctx?: CheckContext): Diagnostic {
  const m = marked(withMarks);
  const { diagnostics } = analyze(m.text, ctx);
  const hit = diagnostics.find((d) => d.code === code && d.range.start.offset === m.start.offset && d.range.end.offset === m.end.offset);
  expect(hit, `${code} at ${m.start.line}:${m.start.column}; got ${JSON.stringify(diagnostics.map((d) => [d.code, d.range.start.line, d.range.start.column, d.message]))}`).toBeDefined();
  expect(hit!.range.start).toEqual(m.start);
  expect(hit!.range.end).toEqual(m.end);
  expect(hit!.severity).toBe(CODES[code].severity);
  expect(hit!.message.length).toBeGreaterThan(0);
  seen.add(code);
  return hit!;
}

/** A small valid spec with room for extra fit items (`items`) and statements after it (`after`). */
function spec(parts: { model?: string; items?: string; after?: string; before?: string }): string {
  return [
    parts.before ?? '',
    'data d = "a.csv"',
    'fit f on d {',
    `  model ${parts.model ?? 'y = a * x'}`,
    '  param a = 1',
    parts.items ?? '',
    '}',
    parts.after ?? '',
  ].join('\n');
}

describe('parser/check diagnostics', () => {
  it('valid specs have no diagnostics', () => {
    for (const s of specs()) expect(analyze(s.text).diagnostics, s.name).toEqual([]);
  });

  it('syntax', () => {
    expectAt('const k = 1 «@»', 'syntax');
    expectAt('fit f on d {\n  model y = a «*»\n}', 'syntax');
  });

  it('internal: a damaged syntax tree becomes one diagnostic, not an exception', () => {
    const broken = { kind: 'spec', statements: [{ kind: 'fit', name: { name: 'f' }, items: null }], range: analyze('').ast.range } as unknown as SpecAst;
    const { diagnostics, plan } = check(broken);
    expect(diagnostics.map((d) => d.code)).toEqual(['internal']);
    expect(plan.version).toBe(PLAN_VERSION);
    seen.add('internal');
  });

  it('nested_too_deeply: at the parenthesis or operator one level past the limit', () => {
    const open = '('.repeat(MAX_NESTING);
    expectAt(spec({ model: `y = ${open}«(»a * x)${')'.repeat(MAX_NESTING)}` }), 'nested_too_deeply');
    // a tree's depth counts from its leaves: the outermost of 101 signs is the one too many
    expectAt(spec({ model: `y = «-»${'-'.repeat(MAX_NESTING)}a * x` }), 'nested_too_deeply');
  });

  it('undefined_name with did-you-mean (headers known)', () => {
    const d = expectAt(spec({ model: 'y = a * «xx»' }), 'undefined_name', HEADERS);
    expect(d.suggestions).toContain('x');
    expect(d.message).toMatch(/did you mean 'x'/);
    const d2 = expectAt(spec({ model: 'y = «ab» * x' }), 'undefined_name', HEADERS);
    expect(d2.suggestions?.[0]).toBe('a');
  });

  it('undefined_name for a value that is not a constant', () => {
    const d = expectAt('const ambient = 20\nconst k = «ambeint»', 'undefined_name');
    expect(d.suggestions).toEqual(['ambient']);
    expectAt('const k = «k»', 'undefined_name');
  });

  it('unresolved identifiers are columns when headers are unknown', () => {
    const { diagnostics, plan } = analyze(spec({ model: 'y = a * xx' }));
    expect(diagnostics).toEqual([]);
    expect(plan.fits[0].blocks[0].columns).toEqual(['y', 'xx']);
  });

  it('unknown_column for quoted names and per', () => {
    expect(expectAt(spec({ model: '«"temp (K)"» = a * x' }), 'unknown_column', HEADERS).suggestions).toEqual(['temp (C)']);
    expect(expectAt(spec({ items: '  per «batc»' }), 'unknown_column', HEADERS).suggestions).toEqual(['batch']);
  });

  it('unknown_data with did-you-mean', () => {
    const d = expectAt('data bench = "a.csv"\nfit f on «bench2» {\n  model y = a * x\n  param a\n}', 'unknown_data');
    expect(d.suggestions).toEqual(['bench']);
  });

  it('unknown_fit with did-you-mean', () => {
    expect(expectAt(spec({ after: 'predict «g» at x = 1' }), 'unknown_fit').suggestions).toEqual(['f']);
    expectAt(spec({ after: 'expect «newton».r2 above 0.9' }), 'unknown_fit');
    expectAt(spec({ after: 'compare f, «h»' }), 'unknown_fit');
  });

  it('declared_later: names must be declared above their use', () => {
    expectAt('fit f on «d» {\n  model y = a * x\n  param a\n}\ndata d = "a.csv"', 'declared_later');
    expectAt(spec({ model: 'y = a * x + «k»', after: 'const k = 2' }), 'declared_later');
    expectAt('expect «f».r2 above 0.5\n' + spec({}), 'declared_later');
  });

  it('duplicate_name for data, const, fit and param', () => {
    expectAt('data d = "a.csv"\ndata «d» = "b.csv"\nfit f on d {\n  model y = a * x\n  param a\n}', 'duplicate_name');
    expectAt('const k = 1\nconst «k» = 2', 'duplicate_name');
    expectAt(spec({ after: 'fit «f» on d {\n  model y = a * x\n  param a\n}' }), 'duplicate_name');
    expectAt(spec({ items: '  param «a» = 2' }), 'duplicate_name');
    expectAt(spec({ before: 'const a = 1', items: '' }).replace('param a = 1', 'param «a» = 1'), 'duplicate_name');
  });

  it('duplicate_option', () => {
    expectAt(spec({ items: '  level 0.9\n  «level 0.8»' }), 'duplicate_option');
    expectAt(spec({ items: '  param b = 1 «= 2»' }), 'duplicate_option');
    expectAt('data d = "a.csv" where x > 0 «where x < 9»\nfit f on d {\n  model y = a * x\n  param a\n}', 'duplicate_option');
  });

  it('reserved_name', () => {
    expectAt('const «pi» = 3', 'reserved_name');
    expectAt(spec({ model: 'y = a * x + e', items: '  param «e» = 1' }), 'reserved_name');
  });

  it('param_column_clash and const_column_clash (headers known)', () => {
    expectAt(spec({ model: 'y = a * x + z', items: '  param «z» = 1' }), 'param_column_clash', HEADERS);
    expectAt(spec({ before: 'const «sd» = 2' }), 'const_column_clash', HEADERS);
  });

  it('unknown_function with did-you-mean, arity', () => {
    expect(expectAt(spec({ model: 'y = a * «sqr»(x)' }), 'unknown_function').suggestions).toEqual(['sqrt']);
    expect(expectAt(spec({ model: 'y = a * «log»(x)' }), 'unknown_function').suggestions).toEqual(['ln', 'log10']);
    expectAt(spec({ model: 'y = a * «atan2(x)»' }), 'arity');
    expectAt(spec({ model: 'y = «when(x > 1, a)»' }), 'arity');
  });

  it('condition_expected and number_expected', () => {
    expectAt('data d = "a.csv" where «x + 1»\n' + spec({}).replace('data d = "a.csv"', ''), 'condition_expected');
    expectAt(spec({ model: 'y = when(«x», a, 0)' }), 'condition_expected');
    expectAt(spec({ model: 'y = a * «(x > 1)»' }), 'number_expected');
    // Comparisons do not chain: the left comparison becomes an operand.
    expectAt('data d = "a.csv" where «0 < x» < 5\nfit f on d {\n  model y = a * x\n  param a\n}', 'number_expected');
  });

  it('param_not_allowed outside the model side', () => {
    expectAt(spec({ model: 'y - «a» = a * x' }), 'param_not_allowed');
    expectAt(spec({ items: '  sigma «a» * x' }), 'param_not_allowed');
  });

  it('response_no_column, missing_model, no_parameter', () => {
    expectAt(spec({ model: '«2 * pi» = a * x' }), 'response_no_column');
    expectAt('data d = "a.csv"\nfit «f» on d {\n  param a\n}', 'missing_model');
    expectAt(spec({ model: 'y = «2 * x»' }), 'no_parameter');
  });

  it('bounds_order, initial_outside_bounds, fixed_without_value', () => {
    expectAt(spec({ items: '  param b = 1 «in [5, 2]»' }), 'bounds_order');
    expectAt(spec({ items: '  param b «in [inf, 5]»' }), 'bounds_order');
    expectAt(spec({ items: '  param b = «9» in [0, 5]' }), 'initial_outside_bounds');
    expectAt(spec({ items: '  param b = «-1» in [0, inf]' }), 'initial_outside_bounds');
    expectAt(spec({ items: '  param b «fixed»' }), 'fixed_without_value');
    expectAt(spec({ after: 'expect f.a «within 2 .. 1»' }), 'bounds_order');
  });

  it('unknown_option with did-you-mean for method, loss, delimiter and decimal', () => {
    expect(expectAt(spec({ items: '  method «lienar»' }), 'unknown_option').suggestions).toEqual(['linear']);
    expect(expectAt(spec({ items: '  loss «hubr»' }), 'unknown_option').suggestions).toEqual(['huber']);
    expectAt('data d = "a.csv" delimiter «"|"»', 'unknown_option');
    expectAt('data d = "a.csv" decimal «"·"»', 'unknown_option');
  });

  it('unknown_option for a former loss name, located, with the new name as its only suggestion', () => {
    const d = expectAt(spec({ items: '  loss «soft_l1» scale 0.5' }), 'unknown_option');
    expect(d.suggestions).toEqual(['pseudo_huber']);
    expect(d.message).toContain("'soft_l1' is now called 'pseudo_huber'");
    const { plan } = analyze(spec({ items: '  loss pseudo_huber scale 0.5' }).replace(/[«»]/g, ''), HEADERS);
    expect(plan.fits[0].options.loss).toBe('pseudo_huber');
  });

  it('level_range, not_positive, not_integer', () => {
    expectAt(spec({ items: '  level «1.5»' }), 'level_range');
    expectAt(spec({ items: '  level «0»' }), 'level_range');
    expectAt(spec({ items: '  iterations «0»' }), 'not_positive');
    expectAt(spec({ items: '  tolerance «-1e-3»' }), 'not_positive');
    expectAt(spec({ items: '  loss huber scale «0»' }), 'not_positive');
    expectAt(spec({ items: '  iterations «2.5»' }), 'not_integer');
  });

  it('bootstrap_range and seed_range: whole numbers in range; the resampling word from the registry', () => {
    expectAt(spec({ items: '  bootstrap «50»' }), 'bootstrap_range');
    expectAt(spec({ items: '  bootstrap «200.5»' }), 'bootstrap_range');
    expectAt(spec({ items: '  bootstrap 200 seed «-1»' }), 'seed_range');
    expectAt(spec({ items: '  bootstrap 200 seed «1.5»' }), 'seed_range');
    expectAt(spec({ items: '  bootstrap 200 «pairs»' }), 'unknown_option');
    const ok = analyze(spec({ items: '  bootstrap 200 cases seed 42' }));
    expect(ok.diagnostics).toEqual([]);
    expect(ok.plan.fits[0].options.bootstrap).toEqual({ replicates: 200, resample: 'cases', seed: 42 });
    const plain = analyze(spec({ items: '  bootstrap 300' }));
    expect(plain.plan.fits[0].options.bootstrap).toEqual({ replicates: 300, resample: 'residuals', seed: 1 });
    const seedOnly = analyze(spec({ items: '  bootstrap 300 seed 9' }));
    expect(seedOnly.diagnostics).toEqual([]);
    expect(seedOnly.plan.fits[0].options.bootstrap).toEqual({ replicates: 300, resample: 'residuals', seed: 9 });
  });

  it('explore_range: a whole number from 0 to MAX_EXPLORE', () => {
    expectAt(spec({ items: '  explore «-1»' }), 'explore_range');
    expectAt(spec({ items: '  explore «2.5»' }), 'explore_range');
    expectAt(spec({ items: '  explore «5000»' }), 'explore_range');
    const ok = analyze(spec({ items: '  explore 0' }));
    expect(ok.diagnostics).toEqual([]);
    expect(ok.plan.fits[0].options.explore).toBe(0);
    expect(analyze(spec({ items: '  explore 64' })).plan.fits[0].options.explore).toBe(64);
    expect(analyze(spec({})).plan.fits[0].options.explore).toBeUndefined();
  });

  it('inf_not_allowed, number_range, empty_path, delimiter_clash', () => {
    expectAt(spec({ items: '  param b = «inf»' }), 'inf_not_allowed');
    expectAt(spec({ after: 'predict f at x = 1, «-inf»' }), 'inf_not_allowed');
    expectAt('const k = «1e400»', 'number_range');
    expectAt(spec({ model: 'y = a * x + «1e999»' }), 'number_range');
    expectAt('data d = «""»', 'empty_path');
    expectAt('data d = "a.csv" delimiter "," «decimal ","»', 'delimiter_clash');
  });

  it('unknown_target for expectations', () => {
    expect(expectAt(spec({ after: 'expect f.«r3» above 0.5' }), 'unknown_target').suggestions).toContain('r2');
    expect(expectAt(spec({ after: 'expect f.a.«sd» below 1' }), 'unknown_target').suggestions).toEqual(['se']);
    expect(expectAt(spec({ after: 'expect f.a.«lowr» above 1' }), 'unknown_target').suggestions).toEqual(['lower']);
    expect(expectAt(spec({ after: 'expect f.a.lower.«se» above 1' }), 'unknown_target').message).toMatch(/expected FIT.NAME or FIT.PARAM.se \(or .lower, .upper\)/);
    expect(expectAt(spec({ after: 'expect f.«b».se below 1' }), 'unknown_target').suggestions).toEqual(['a']);
    expectAt(spec({ after: 'expect f.a.se.«x» below 1' }), 'unknown_target');
  });

  it('new_sigma_needed, query_option, unknown_query_member (the new observation of a weighted fit, readings, backcalc, expect at)', () => {
    const col = spec({ items: '  sigma sd' });
    // a sigma of another column: its value at a new point is not on the curve, so the query must state it
    const need = expectAt(col + '\n«predict f at x = 2, 8»', 'new_sigma_needed');
    expect(need.message).toBe("the sigma of 'f' reads 'sd', not only the predictor 'x', so the sigma of a new observation cannot be read off the curve; state it after the values, e.g. `predict f at x = 2, 8 sigma S`");
    expectAt(col + '\n«invert f at y = 2 readings 3»', 'new_sigma_needed');
    expectAt(col + '\nexpect f.prediction.lower «at x = 5» above 0', 'new_sigma_needed');
    expect(analyze(col + '\npredict f at x = 2, 8 sigma 0.04').diagnostics).toEqual([]);
    expect(analyze(col + '\npredict f at x = 2, 8 sigma 0.04, 0.3').diagnostics).toEqual([]);
    expect(analyze(col + '\nexpect f.prediction.lower at x = 5 sigma 0.1 above 0').diagnostics).toEqual([]);
    // an expression of the predictor alone is read at the query point: nothing to state
    expect(analyze(spec({ items: '  sigma 0.02 + 0.03 * x', after: 'predict f at x = 2\ninvert f at y = 1 readings 2' })).diagnostics).toEqual([]);
    expect(analyze(spec({ items: '  weight 1 / x^2', after: 'predict f at x = 2' })).diagnostics).toEqual([]);
    expect(expectAt(spec({ after: 'predict f at x = 2 «readings 3»' }), 'query_option').message).toMatch(/belongs to invert/);
    expect(expectAt(spec({ after: 'invert f at y = 2 «readings 2.5»' }), 'query_option').message).toBe('readings must be a whole number of at least 1, not 2.5');
    expectAt(spec({ after: 'invert f at y = 2 «readings 0»' }), 'query_option');
    expect(expectAt(spec({ after: 'predict f at x = 2 «sigma 0.1»' }), 'query_option').message).toMatch(/has no sigma expression/);
    expect(expectAt(spec({ items: '  weight 1 / x', after: 'predict f at x = 2 «sigma 0.1»' }), 'query_option').message).toMatch(/weighted by weight, so state the new observation's weight/);
    expect(expectAt(col + '\npredict f at x = 1, 2, 3 «sigma 0.1, 0.2»', 'query_option').message).toBe('sigma needs one value, or one per query value (3), not 2');
    expectAt(col + '\npredict f at x = 1 sigma 0.1 «sigma 0.2»', 'query_option');
    expect(expectAt(col + '\npredict f at x = 1 sigma «-0.1»', 'not_positive').message).toBe('sigma must be greater than 0, not -0.1');
    expectAt(spec({ model: 'y = a * x + b * z', items: '  param b', after: 'backcalc «f»' }), 'query_option');
    expect(analyze(spec({ after: 'backcalc f' })).diagnostics).toEqual([]);
    expect(expectAt(spec({ after: 'expect f.«prediction.low» at x = 5 above 0' }), 'unknown_query_member').suggestions).toContain('prediction.lower');
    expect(analyze(spec({ after: 'expect f.inverse.upper at y = 2 readings 2 below 9' })).diagnostics).toEqual([]);
    expectAt(spec({ after: 'expect f.inverse at «x» = 5 above 0' }), 'response_mismatch');
  });

  it('predictor_mismatch and response_mismatch', () => {
    expect(expectAt(spec({ after: 'predict f at «z» = 1' }), 'predictor_mismatch').suggestions).toEqual(['x']);
    const two = spec({ model: 'y = a * x + b * z', items: '  param b' });
    // a model of two columns has no single predictor to vary: predict is refused at check, as fit refuses it
    expect(expectAt(two + '\npredict f at «z» = 1', 'predictor_mismatch').message).toBe("predict needs a model with exactly one predictor column; 'f' varies with 'x', 'z'");
    expectAt(two + '\npredict f at «w» = 1', 'predictor_mismatch');
    expect(expectAt(two + '\ninvert «f» at y = 1', 'predictor_mismatch').message).toBe("invert needs a model with exactly one predictor column; 'f' varies with 'x', 'z'");
    expect(expectAt(spec({ model: 'y - z = a * x', after: 'invert f at «y» = 1' }), 'response_mismatch').message).toMatch(/reads exactly one column; 'f' reads 'y', 'z'/);
    expectAt(spec({ model: 'y = a', after: 'predict f at «x» = 1' }), 'predictor_mismatch');
    expect(expectAt(spec({ after: 'invert f at «x» = 1' }), 'response_mismatch').suggestions).toEqual(['y']);
    expect(analyze(spec({ model: 'ln(y) = a * x', after: 'invert f at y = 2' })).diagnostics).toEqual([]);
  });

  it('compare_per_group, compare_mismatch (as the engine refuses them)', () => {
    const two = (second: string, after: string) => [
      'data d = "a.csv"', 'data e = "b.csv"',
      'fit f on d {', '  model y = a * x', '  param a = 1', '}',
      `fit g on ${second} {`, '  model y = b * x', '  param b = 1', '  per batch', '}', after,
    ].join('\n');
    expect(expectAt(two('d', 'compare f, «g»'), 'compare_per_group').message).toMatch(/^compare: 'g' gives one result per group and 'f' one for all rows/);
    // fits with groups compare with fits of the same groups: the same column of the same data, or the same tables
    const grouped = (a: string, b: string, after: string) => [
      'data d = "a.csv"', 'data e = "b.csv"',
      `fit f on ${a} {`, '  model y = a * x', '  param a = 1', '}',
      `fit g on ${b} {`, '  model y = b * x', '  param b = 1', '}', after,
    ].join('\n');
    const perFit = (name: string, data: string, column: string, shared = '') => [`fit ${name} on ${data} {`, '  model y = a * x + c', '  param a = 1', `  param c = 0${shared}`, `  per ${column}`, '}'].join('\n');
    const head = 'data d = "a.csv"\ndata e = "b.csv"\n';
    expect(expectAt(`${head}${perFit('f', 'd', 'batch')}\n${perFit('g', 'd', 'z')}\ncompare f, «g»`, 'compare_groups_differ').message).toMatch(/'f' runs per batch of d and 'g' per z of d/);
    expectAt(`${head}${perFit('f', 'd', 'batch')}\n${perFit('g', 'e', 'batch')}\ncompare f, «g»`, 'compare_groups_differ');
    expectAt(grouped('d, e', 'e, d', 'compare f, «g»'), 'compare_groups_differ');
    // the same groups: no diagnostic (a joint fit against the separate fits, two fits over the same tables)
    expect(analyze(`${head}${perFit('f', 'd', 'batch', ' shared')}\n${perFit('g', 'd', 'batch')}\ncompare f, g`, HEADERS).diagnostics.map((d) => d.code)).toEqual(['unused_data']);
    expect(analyze(grouped('d, e', 'd, e', 'compare f, g'), HEADERS).diagnostics).toEqual([]);
    const plain = (second: string, response: string, after: string) => [
      'data d = "a.csv"', 'data e = "b.csv"',
      'fit f on d {', '  model y = a * x', '  param a = 1', '}',
      `fit g on ${second} {`, `  model ${response} = b * x`, '  param b = 1', '}', after,
    ].join('\n');
    expectAt(plain('e', 'y', '«compare f, g»'), 'compare_mismatch');
    expectAt(plain('d', 'ln(y)', '«compare f, g»'), 'compare_mismatch');
    expect(analyze(plain('d', 'y', 'compare f, g'), HEADERS).diagnostics.map((d) => d.code)).toEqual(['unused_data']);
  });

  it('method_not_linear: the compiler\'s own linearity test, fixed parameters as numbers', () => {
    // the linearity test is the engine's, passed in as the CLI and the editor do (parser/check-env.ts)
    expect(expectAt(spec({ model: 'y = a * exp(b * x)', items: '  param b = 1\n  method «linear»' }), 'method_not_linear', { isLinearIn: isLinearInParameters }).message).toMatch(/method linear needs a model linear in its parameters; 'f' is not/);
    expect(analyze(spec({ model: 'y = a * exp(b * x)', items: '  param b = 1 fixed\n  method linear' }), { ...HEADERS, isLinearIn: isLinearInParameters }).diagnostics).toEqual([]);
    expect(analyze(spec({ model: 'y = a * x + b * x^2', items: '  param b\n  method linear' }), { ...HEADERS, isLinearIn: isLinearInParameters }).diagnostics).toEqual([]);
  });

  it('compare_within_order: the fit declared within has fewer free parameters (fixed ones do not count)', () => {
    const two = (second: string, after: string) => [
      'data d = "a.csv"',
      'fit f on d {', '  model y = a * x', '  param a = 1', '}',
      'fit g on d {', `  model y = ${second}`, '  param a = 1', '  param b = 1 fixed', '}', after,
    ].join('\n');
    expect(expectAt(two('a * x + b', 'compare f «within» g'), 'compare_within_order').message).toBe("compare 'f' within 'g': 'f' has 1 free parameter and 'g' 1; the one declared within must have fewer");
    expect(analyze(two('a * x + b * x^2', 'compare g within f'), HEADERS).diagnostics.map((d) => d.code)).toContain('compare_within_order');
    const plan = analyze(two('a * x + c', 'compare f within g').replace('param b = 1 fixed', 'param c = 0'), HEADERS);
    expect(plan.diagnostics).toEqual([]);
    expect(plan.plan.queries[0]).toMatchObject({ kind: 'compare', fits: ['f', 'g'], within: true });
    expect(analyze(spec({ after: 'compare f within' })).diagnostics.map((d) => d.code)).toContain('syntax');
  });

  it('compare_too_few; repeated_fit (a warning)', () => {
    expectAt(spec({ after: '«compare f»' }), 'compare_too_few');
    expectAt(spec({ after: 'compare f, «f»' }), 'repeated_fit');
  });

  it('warnings: unused_parameter, unused_data, option_ignored', () => {
    expectAt(spec({ items: '  param «b» = 1' }), 'unused_parameter');
    expectAt('data «e» = "b.csv"\n' + spec({}), 'unused_data');
    expectAt(spec({ items: '  loss squared scale «2»' }), 'option_ignored');
    expectAt(spec({ items: '  «rate 0.1»' }), 'option_ignored');
    expectAt(spec({ items: '  method gradient_descent\n  «explore 16»' }), 'option_ignored');
    expect(analyze(spec({ items: '  method gradient_descent\n  rate 0.1' })).diagnostics).toEqual([]);
  });

  it('reference_not_allowed: FIT.NAME outside derive', () => {
    expectAt(spec({ model: 'y = a * «f.a»' }), 'reference_not_allowed');
    expectAt('data d = "a.csv" where «g.r2» > 0', 'reference_not_allowed');
    expectAt(spec({ items: '  weight 1 / «f.rmse»' }), 'reference_not_allowed');
  });

  it('column_in_derive: a plain (headers known) or quoted column in a derive', () => {
    expectAt(spec({ after: 'derive k = 2 * «x»' }), 'column_in_derive', HEADERS);
    expectAt(spec({ after: 'derive k = f.a + «"temp (C)"»' }), 'column_in_derive');
  });

  it('shared_without_groups / joint_not_supported: shared needs per, and the squared loss by Levenberg–Marquardt', () => {
    expectAt(spec({ items: '  param b «shared»', model: 'y = a * x + b' }), 'shared_without_groups');
    expectAt(spec({ items: '  param b «shared»\n  per batch\n  loss huber', model: 'y = a * x + b' }), 'joint_not_supported');
    expect(analyze(spec({ items: '  param b shared\n  per batch', model: 'y = a * x + b' })).diagnostics).toEqual([]);
  });

  it('repeated_data / table_column_missing / table_units_differ / tables_with_per: a fit over several tables, at the table name', () => {
    const two = 'data d = "a.csv"\ndata e = "b.csv"\n';
    const byFile: CheckContext = { headers: (name) => (name === 'e' ? ['x', 'w'] : ['x', 'y', 'batch']) };
    expectAt(`${two}fit f on d, e, «e» {\n  model y = a * x\n  param a = 1\n}`, 'repeated_data');
    const missing = expectAt(`${two}fit f on d, «e» {\n  model y = a * x + b\n  param a = 1\n  param b shared\n}`, 'table_column_missing', byFile);
    expect(missing.message).toContain("'y'");
    expectAt('data d = "a.csv" units x [mm]\ndata e = "b.csv" units x [cm]\nfit f on d, «e» {\n  model y = a * x\n  param a = 1\n}', 'table_units_differ');
    expectAt(`${two}fit f on d, e {\n  model y = a * x + b\n  param a = 1\n  param b shared\n  «per batch»\n}`, 'tables_with_per');
    expectAt(`${two}fit f on d, «g» {\n  model y = a * x\n  param a = 1\n}`, 'unknown_data');
    // shared is allowed without per when the fit reads several tables; the plan has one block per table
    const ok = analyze(`${two}fit f on d, e {\n  model y = a * x + b\n  param a = 1\n  param b shared\n}`, HEADERS);
    expect(ok.diagnostics).toEqual([]);
    const fit = ok.plan.fits[0];
    expect(fit.blocks.map((b) => b.data)).toEqual(['d', 'e']);
    expect(fit.parameters.map((p) => [p.name, p.scope])).toEqual([['a', 'perBlock'], ['b', 'shared']]);
    expect(fit.blocks[1].range.start).toMatchObject({ line: 3, column: 13 });
    // FIT."TABLE".PARAM names one table of such a fit
    expect(analyze(`${two}fit f on d, e {\n  model y = a * x + b\n  param a = 1\n  param b shared\n}\nderive r = f."e".a / f."d".a`, HEADERS).diagnostics).toEqual([]);
  });

  it('text_or_column / text_not_allowed: a quoted item compared with a column (headers known)', () => {
    expectAt('data d = "a.csv" where batch == «"sd"»\nfit f on d {\n  model y = a * x\n  param a = 1\n}', 'text_or_column', HEADERS);
    expectAt(spec({ model: 'y = a * when(batch == «"B-1"», x, 0)' }), 'text_not_allowed', HEADERS);
    expectAt('data d = "a.csv" where x > 0 and «"B-1"» == 2\nfit f on d {\n  model y = a * x\n  param a = 1\n}', 'text_not_allowed', HEADERS);
    // the plain case is no diagnostic: a text value
    expect(analyze('data d = "a.csv" where batch == "B 1"\nfit f on d {\n  model y = a * x\n  param a = 1\n}', HEADERS).diagnostics).toEqual([]);
  });

  it('derive: unknown or later fit, unknown parameter or statistic (did you mean)', () => {
    expect(expectAt(spec({ after: 'derive k = «g».a' }), 'unknown_fit').suggestions).toEqual(['f']);
    expectAt(spec({ after: 'derive k = «g».b\nfit g on d {\n  model y = b * x\n  param b\n}' }), 'declared_later');
    expect(expectAt(spec({ after: 'derive k = 3 * f.«aa»' }), 'unknown_target').suggestions).toEqual(['a']);
    expect(expectAt(spec({ after: 'derive k = f.«rmes» / f.a' }), 'unknown_target').suggestions).toContain('rmse');
    // FIT.PARAM.se reads the standard error (a fixed number); after a statistic, .se is refused
    expect(analyze(spec({ after: 'derive k = f.a.se' })).diagnostics).toEqual([]);
    expectAt(spec({ after: 'derive k = f.r2.«se»' }), 'unknown_target');
    expectAt(spec({ after: 'derive k = 2 * «f»' }), 'unknown_target');
    expectAt(spec({ after: 'derive k = f.a\nderive m = «k».a' }), 'unknown_target');
  });

  it('derive: names that are not constants or derived quantities above', () => {
    expect(expectAt(spec({ after: 'derive lod = f.a\nderive m = «lodd» * 2' }), 'undefined_name').suggestions).toEqual(['lod']);
    expectAt(spec({ after: 'derive k = «k» + f.a' }), 'undefined_name');
    expectAt(spec({ after: 'derive m = «k» * 2\nderive k = f.a' }), 'declared_later');
    expectAt(spec({ after: 'derive m = «c» * f.a\nconst c = 2' }), 'declared_later');
  });

  it('derive: duplicate and reserved names', () => {
    expectAt(spec({ after: 'derive k = f.a\nderive «k» = f.a' }), 'duplicate_name');
    expectAt(spec({ after: 'derive «f» = f.a' }), 'duplicate_name');
    expectAt(spec({ after: 'derive «d» = f.a' }), 'duplicate_name');
    expectAt(spec({ before: 'const c = 1', after: 'derive «c» = f.a' }), 'duplicate_name');
    expectAt(spec({ after: 'derive «c» = f.a\nconst c = 1' }), 'duplicate_name');
    expectAt(spec({ after: 'derive «pi» = f.a' }), 'reserved_name');
  });

  it('expect on derived quantities', () => {
    expect(expectAt(spec({ after: 'derive lod = f.a\nexpect «lodd» below 1' }), 'undefined_name').suggestions).toEqual(['lod']);
    expectAt(spec({ after: 'expect «f» below 1' }), 'unknown_target');
    expectAt(spec({ after: 'expect «k» below 1\nderive k = f.a' }), 'declared_later');
    expect(expectAt(spec({ after: 'derive k = f.a\nexpect k.«sd» below 1' }), 'unknown_target').suggestions).toEqual(['se']);
    expect(analyze(spec({ after: 'derive k = f.a\nexpect k below 1\nexpect k.se below 1' })).diagnostics).toEqual([]);
  });

  it('unknown_group: a quoted group label that is no value of the per column, at the label, with did you mean (labels known)', () => {
    const labels: CheckContext = { ...HEADERS, groupLabels: (_d, _p, column) => (column === 'batch' ? ['Reference std', 'Test lot 7'] : undefined) };
    const grouped = spec({ items: '  per batch' });
    const d = expectAt(grouped + '\nderive rel = f.«"Reference std"».a / f.«"Test lot7"».a'.replace('«"Reference std"»', '"Reference std"'), 'unknown_group', labels);
    expect(d.suggestions).toEqual(['Test lot 7']);
    expect(d.message).toBe("fit f has no group \"Test lot7\": no row of its data has that value in column 'batch' - did you mean 'Test lot 7'?");
    expectAt(grouped + '\nexpect f.«"Referense std"».a below 3', 'unknown_group', labels);
    // known labels, and unknown labels (no reader, or the reader cannot tell), pass the check
    expect(analyze(grouped + '\nderive rel = f."Reference std".a / f."Test lot 7".a', labels).diagnostics).toEqual([]);
    expect(analyze(grouped + '\nderive rel = f."Nowhere".a', HEADERS).diagnostics).toEqual([]);
    // a reader that throws means "unknown", not a crash
    expect(analyze(grouped + '\nderive rel = f."Nowhere".a', { ...HEADERS, groupLabels: () => { throw new Error('disk'); } }).diagnostics).toEqual([]);
  });

  it('every diagnostic code is exercised above', () => {
    expect([...seen].sort()).toEqual(Object.keys(CODES).sort());
  });
});
