/**
 * Test-only infix reader for model formulas, producing resolved plan `Expr`
 * trees: `+ - * / ^` (right-associative, -x^2 = -(x^2)), parentheses,
 * numbers, `pi`, function calls from the plan's function table, parameter
 * names (given) and column names (anything else). Kept independent of the
 * project parser so the numerical core can be tested on its own.
 */
import type { Expr, FunctionName } from '../../parser/plan';
import { isFunctionName } from '../../parser/plan';

export function infix(text: string, params: readonly string[]): Expr {
  const tokens = text.match(/\d+\.?\d*(?:[eE][-+]?\d+)?|\.\d+(?:[eE][-+]?\d+)?|[A-Za-z_][A-Za-z0-9_]*|\*\*|[-+*/^(),<>=!]=?|\S/g) ?? [];
  let k = 0;
  const peek = () => tokens[k];
  const take = (t?: string) => {
    const got = tokens[k++];
    if (t !== undefined && got !== t) throw new Error(`expected ${t} at token ${k} of "${text}", got ${got}`);
    return got;
  };
  const paramSet = new Set(params);

  const expr = (): Expr => {
    let left = term();
    while (peek() === '+' || peek() === '-') {
      const op = take() as '+' | '-';
      left = { kind: 'binary', op, left, right: term() };
    }
    return left;
  };
  const term = (): Expr => {
    let left = unary();
    while (peek() === '*' || peek() === '/') {
      const op = take() as '*' | '/';
      left = { kind: 'binary', op, left, right: unary() };
    }
    return left;
  };
  const unary = (): Expr => {
    if (peek() === '-') {
      take();
      return { kind: 'negate', arg: unary() };
    }
    if (peek() === '+') {
      take();
      return unary();
    }
    return power();
  };
  const power = (): Expr => {
    const base = atom();
    if (peek() === '^' || peek() === '**') {
      take();
      return { kind: 'binary', op: '^', left: base, right: unary() };
    }
    return base;
  };
  const atom = (): Expr => {
    const t = take();
    if (t === undefined) throw new Error(`unexpected end of "${text}"`);
    if (t === '(') {
      const e = expr();
      take(')');
      return e;
    }
    if (/^[\d.]/.test(t)) return { kind: 'number', value: Number(t) };
    if (/^[A-Za-z_]/.test(t)) {
      if (peek() === '(') {
        if (!isFunctionName(t)) throw new Error(`unknown function ${t}`);
        take('(');
        const args: Expr[] = [expr()];
        while (peek() === ',') {
          take();
          args.push(expr());
        }
        take(')');
        return { kind: 'call', fn: t as FunctionName, args };
      }
      if (t === 'pi') return { kind: 'number', value: Math.PI };
      return paramSet.has(t) ? { kind: 'param', name: t } : { kind: 'column', name: t };
    }
    throw new Error(`unexpected token ${t} in "${text}"`);
  };
  const e = expr();
  if (k !== tokens.length) throw new Error(`trailing input in "${text}"`);
  return e;
}
