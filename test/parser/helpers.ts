/** Shared helpers for the parser tests (not a test file). */
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Diagnostic, Expr } from '../../parser/plan';

export const SPEC_DIR = fileURLToPath(new URL('./specs', import.meta.url));

/** Every valid spec used by the tests, by file name. */
export function specs(): { name: string; text: string }[] {
  return readdirSync(SPEC_DIR)
    .filter((f) => f.endsWith('.lsq'))
    .sort()
    .map((name) => ({ name, text: readFileSync(join(SPEC_DIR, name), 'utf8') }));
}

export interface Marked {
  text: string;
  /** Half-open span [start, end) marked in the text: 1-based line/column and 0-based offset, counted here independently of the parser. */
  start: { line: number; column: number; offset: number };
  end: { line: number; column: number; offset: number };
}

/** Strips one `«...»` marker pair from the text and returns the span it marked. */
export function marked(withMarks: string): Marked {
  const a = withMarks.indexOf('«');
  const b = withMarks.indexOf('»');
  if (a < 0 || b < a) throw new Error('test text needs one «...» marker');
  const text = withMarks.slice(0, a) + withMarks.slice(a + 1, b) + withMarks.slice(b + 1);
  const pos = (offset: number) => {
    const before = text.slice(0, offset).split('\n');
    return { line: before.length, column: before[before.length - 1].length + 1, offset };
  };
  return { text, start: pos(a), end: pos(b - 1) };
}

export function codes(ds: Diagnostic[]): string[] {
  return ds.map((d) => d.code);
}

export function errors(ds: Diagnostic[]): Diagnostic[] {
  return ds.filter((d) => d.severity === 'error');
}

/** Plan expression written back with full parentheses (ranges dropped), for comparing parsed structure in tests. */
export function show(e: Expr): string {
  switch (e.kind) {
    case 'number': return String(e.value);
    case 'column': return `col:${e.name}`;
    case 'text': return `text:${JSON.stringify(e.value)}`;
    case 'param': return `par:${e.name}`;
    case 'result': return `${e.of === 'estimate' ? 'est' : 'stat'}:${e.fit}.${e.name}`;
    case 'derived': return `der:${e.name}`;
    case 'negate': return `(-${show(e.arg)})`;
    case 'not': return `(not ${show(e.arg)})`;
    case 'call': return `${e.fn}(${e.args.map(show).join(', ')})`;
    case 'binary': case 'compare': case 'logic': return `(${show(e.left)} ${e.op} ${show(e.right)})`;
    // a chain reads as the nested binary operations it stands for
    case 'chain': return e.ops.reduce((acc, op, i) => `(${acc} ${op} ${show(e.args[i + 1])})`, show(e.args[0]));
  }
}
