import { describe, it, expect } from 'vitest';
import type { Expr } from '../../parser/plan';
import { compileModel, compileColumnExpr, isLinearInParameters, CompileError } from '../../engine/compile/index';
import { kernelSourceDD } from '../../engine/compile/codegen-dd';
import { Graph } from '../../engine/compile/graph';
import { lower, slotMap } from '../../engine/compile/lower';
import { Differentiator } from '../../engine/compile/derive';
import { MATH_HELPERS } from '../../engine/compile/codegen';
import { DD_HELPERS } from '../../engine/compile/codegen-dd';
import { num, par, col, bin, call, neg, interpret } from './helpers';

const HOSTILE = [
  'constructor', '__proto__', 'process', 'globalThis', 'this', 'toString', 'hasOwnProperty', 'eval', 'Function',
  'require("fs")', '"); process.exit(1); ("', "'; throw 1; '", '\\', 'a\\"b', '*/ alert(1) /*', 'x\ny', '${1}', '`', '</script>',
];

/** Every identifier in generated source must be one the generators are allowed to emit. */
const KEYWORDS = new Set(['use', 'strict', 'return', 'function', 'const', 'let', 'for', 'n', 'i', 't', 'c', 'out', 'jac', 'M', 'R', 'outHi', 'outLo', 'jacHi', 'jacLo', 'e']);
function identifiersAllowed(source: string, members: Iterable<string>): boolean {
  const allowedMembers = new Set(members);
  const stripped = source.replace(/\d+\.?\d*e[+-]?\d+/gi, ' ');
  for (const m of stripped.matchAll(/(\.)?([A-Za-z_$][\w$]*)/g)) {
    const [, dot, name] = m;
    if (dot) {
      if (!allowedMembers.has(name)) return false;
    } else if (!KEYWORDS.has(name) && !/^[txvhlco]\d+$/.test(name)) return false;
  }
  return true;
}

function hostileModel(names: string[]): { expr: Expr; params: string[]; columns: string[] } {
  const params = names.slice(0, Math.ceil(names.length / 2));
  const columns = names.slice(Math.ceil(names.length / 2));
  let expr: Expr = num(0.5);
  params.forEach((p, k) => {
    const c = columns[k % columns.length];
    expr = bin('+', expr, bin('*', par(p), call('exp', neg(bin('*', num(0.1 * (k + 1)), col(c))))));
  });
  return { expr, params, columns };
}

describe('engine/compile security: names never reach generated code', () => {
  const { expr, params, columns } = hostileModel(HOSTILE);
  const model = compileModel(expr, params, columns);
  const sources = [model.source.value, model.source.valueAndJacobian];
  const g = new Graph();
  const root = lower(g, expr, { params: slotMap(params, 'parameter'), columns: slotMap(columns, 'column') });
  const dd = kernelSourceDD(g, root, params.map((_, j) => new Differentiator(g, j).d(root)));

  it('generated sources contain none of the hostile names', () => {
    for (const src of [...sources, dd]) {
      for (const name of HOSTILE) {
        if (name.length <= 2) continue; // single characters such as "`" or "\\" are checked via the identifier whitelist
        expect(src.includes(name)).toBe(false);
      }
      // No string, template, escape or comment syntax besides the directive.
      expect(src.replace('"use strict";', '')).not.toMatch(/["'`\\]|\/\*|\*\/|\/\//);
    }
  });

  it('generated sources use only whitelisted identifiers and helper members', () => {
    for (const src of sources) expect(identifiersAllowed(src, Object.keys(MATH_HELPERS))).toBe(true);
    expect(identifiersAllowed(dd, Object.keys(DD_HELPERS))).toBe(true);
  });

  it('helper objects are frozen', () => {
    expect(Object.isFrozen(MATH_HELPERS)).toBe(true);
    expect(Object.isFrozen(DD_HELPERS)).toBe(true);
  });

  it('evaluates correctly with hostile names (interpreter oracle)', () => {
    const n = 5;
    const theta = Float64Array.from(params, (_, k) => 0.3 * k - 0.7);
    const cols = columns.map((_, k) => Float64Array.from({ length: n }, (_, i) => i * 0.25 + k));
    const out = new Float64Array(n);
    model.value(theta, cols, n, out);
    for (let i = 0; i < n; i++) {
      const want = interpret(expr, new Map(params.map((p, k) => [p, theta[k]])), new Map(columns.map((c, k) => [c, cols[k][i]])));
      expect(out[i]).toBeCloseTo(want, 12);
    }
    expect(isLinearInParameters(expr, params)).toBe(true);
  });

  it('compiled objects are frozen and prototype names stay inert', () => {
    expect(Object.isFrozen(model)).toBe(true);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });
});

describe('engine/compile security: malformed input is rejected', () => {
  it('non-finite numbers are a CompileError', () => {
    for (const v of [Infinity, -Infinity, NaN]) {
      expect(() => compileModel(bin('*', par('a'), num(v)), ['a'], [])).toThrow(CompileError);
      expect(() => compileColumnExpr(num(v), [])).toThrow(CompileError);
    }
  });

  it('unknown functions, operators and node kinds are a CompileError', () => {
    const bad: unknown[] = [
      { kind: 'call', fn: 'eval', args: [num(1)] },
      { kind: 'call', fn: 'constructor', args: [num(1)] },
      { kind: 'call', fn: '__proto__', args: [num(1)] },
      { kind: 'call', fn: 'exp', args: [num(1), num(2)] },
      { kind: 'binary', op: '%', left: num(1), right: num(2) },
      { kind: 'binary', op: '); alert(1); (', left: num(1), right: num(2) },
      { kind: 'compare', op: '=>', left: num(1), right: num(2) },
      { kind: 'logic', op: 'xor', left: num(1), right: num(2) },
      { kind: 'raw', code: 'process.exit(1)' },
      { kind: 'number', value: '1); process.exit(1' },
      null,
    ];
    for (const e of bad) expect(() => compileModel(e as Expr, [], [])).toThrow(CompileError);
  });

  it('unknown or duplicate names are a CompileError', () => {
    expect(() => compileModel(par('b'), ['a'], [])).toThrow(CompileError);
    expect(() => compileModel(col('y'), [], ['x'])).toThrow(CompileError);
    expect(() => compileModel(par('a'), ['a', 'a'], [])).toThrow(CompileError);
    expect(() => compileColumnExpr(par('a'), [])).toThrow(CompileError);
    expect(() => compileModel(col('__proto__'), [], ['constructor'])).toThrow(CompileError);
  });

  it('extreme finite numbers are emitted exactly', () => {
    for (const v of [5e-324, -0, 1e308, -1.7976931348623157e308, 0.1, 1 / 3, -2.5e-17]) {
      const f = compileColumnExpr(bin('+', col('x'), num(v)), ['x']);
      const out = new Float64Array(1);
      f([new Float64Array([0])], 1, out);
      expect(Object.is(out[0], 0 + v)).toBe(true);
    }
  });
});
