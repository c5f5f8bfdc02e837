import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import Ajv from 'ajv';
import schema from '../../parser/plan.schema.json';
import { analyze, lexTokens } from '../../parser/index';
import type { CheckContext } from '../../parser/index';
import type { Position } from '../../parser/plan';
import { specs } from './helpers';

const validate = new Ajv().compile(schema);
const HEADERS: CheckContext = { headers: () => ['time_min', 'temp_C', 'conc', 'uptake', 't', 'x'] };

/** Line/column of an offset, counted here independently of the parser (\n, \r\n and \r end a line). */
function lineCol(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let start = 0;
  for (let i = 0; i < offset; i++) {
    const c = text[i];
    if (c === '\n' || (c === '\r' && text[i + 1] !== '\n')) {
      line++;
      start = i + 1;
    }
  }
  return { line, column: offset - start + 1 };
}

function checkPosition(text: string, p: Position): void {
  expect(lineCol(text, p.offset)).toEqual({ line: p.line, column: p.column });
}

/** The invariants every input must keep: no exception, ranges inside the text and consistent, plan valid JSON per the schema. */
function invariants(text: string, ctx?: CheckContext): void {
  const r = analyze(text, ctx);
  for (const d of r.diagnostics) {
    expect(0 <= d.range.start.offset && d.range.start.offset <= d.range.end.offset && d.range.end.offset <= text.length).toBe(true);
    expect(d.code).not.toBe('internal');
    checkPosition(text, d.range.start);
    checkPosition(text, d.range.end);
  }
  expect(validate(JSON.parse(JSON.stringify(r.plan))), JSON.stringify(validate.errors)).toBe(true);
  for (const t of lexTokens(text)) expect(t.range.end.offset).toBeLessThanOrEqual(text.length);
}

const VOCAB = [
  'data', 'const', 'fit', 'on', '{', '}', 'model', 'param', '=', 'in', '[', ']', ',', 'fixed', '[mg/L]', 'sigma', 'weight',
  'method', 'loss', 'scale', 'level', 'iterations', 'tolerance', 'rate', 'per', 'predict', 'invert', 'at', 'compare', 'expect',
  '.', '..', 'within', 'above', 'below', 'and', 'or', 'not', 'inf', 'pi', 'e', 'x', 'y', 'a', 'f', 'd', '"q.csv"', '"t (C)"',
  '(', ')', '+', '-', '*', '/', '^', '<', '<=', '==', '!=', '>=', '1', '0', '2.5', '1e400', 'when', 'exp', 'ln', 'se', 'r2',
  '\n', '# c\n', 'linear', 'huber', 'derive', 'rmse', 'f.a', 'f.rmse',
];

const mutation = fc.record({
  at: fc.double({ min: 0, max: 1, noNaN: true }),
  op: fc.constantFrom('insert', 'delete', 'replace'),
  text: fc.oneof(fc.string({ minLength: 1, maxLength: 3 }), fc.constantFrom(...VOCAB)),
  len: fc.integer({ min: 1, max: 6 }),
});

function mutate(base: string, ms: { at: number; op: string; text: string; len: number }[]): string {
  let t = base;
  for (const m of ms) {
    const pos = Math.floor(m.at * t.length);
    if (m.op === 'insert') t = t.slice(0, pos) + m.text + t.slice(pos);
    else if (m.op === 'delete') t = t.slice(0, pos) + t.slice(pos + m.len);
    else t = t.slice(0, pos) + m.text + t.slice(pos + m.text.length);
  }
  return t;
}

describe('parser (property-based)', () => {
  it('random text never throws and keeps every range inside the text', () => {
    fc.assert(fc.property(fc.string({ maxLength: 200 }), (s) => invariants(s)), { numRuns: 400 });
    fc.assert(fc.property(fc.string({ unit: 'binary', maxLength: 120 }), (s) => invariants(s)), { numRuns: 300 });
  });

  it('random sequences of language words keep the invariants, with and without headers', () => {
    const words = fc.array(fc.constantFrom(...VOCAB), { maxLength: 60 });
    fc.assert(fc.property(words, fc.constantFrom(' ', '', '\n', '\r\n'), fc.boolean(), (ws, sep, withHeaders) => {
      invariants(ws.join(sep), withHeaders ? HEADERS : undefined);
    }), { numRuns: 600 });
  });

  it('random edits of valid specs keep the invariants', () => {
    const all = specs().map((s) => s.text);
    fc.assert(fc.property(fc.constantFrom(...all), fc.array(mutation, { minLength: 1, maxLength: 6 }), fc.boolean(), (base, ms, withHeaders) => {
      invariants(mutate(base, ms), withHeaders ? HEADERS : undefined);
    }), { numRuns: 600 });
  });
});
