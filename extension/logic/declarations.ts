/**
 * Finding declarations in the syntax tree by name: fits, their parameters and
 * `model` lines, data and const statements, expectations. Used to place
 * diagnostics, for go-to-definition and for the outline. Returns offset spans.
 */
import type { FitAst, ParamAst, StatementAst } from '../../parser/ast';
import type { EditorAnalysis } from './analysis';
import { blankComments, spanOf, type Span } from './text';

type Stmt<K extends StatementAst['kind']> = Extract<StatementAst, { kind: K }>;

function statements<K extends StatementAst['kind']>(a: EditorAnalysis, kind: K): Stmt<K>[] {
  return a.ast.statements.filter((s): s is Stmt<K> => s.kind === kind);
}

export function fitAst(a: EditorAnalysis, name: string): FitAst | undefined {
  return statements(a, 'fit').find((f) => f.name?.name === name);
}

/** Whole `fit` statement. */
export function findFit(a: EditorAnalysis, name: string): Span | undefined {
  const f = fitAst(a, name);
  return f ? spanOf(f.range) : undefined;
}

/** Name of the fit in `fit NAME on …`. */
export function findFitName(a: EditorAnalysis, name: string): Span | undefined {
  const f = fitAst(a, name);
  return f?.name ? spanOf(f.name.range) : undefined;
}

export function paramAsts(f: FitAst): ParamAst[] {
  return f.items.filter((i): i is ParamAst => i.kind === 'param');
}

/** Whole `param` statement of `param` in fit `fit`. */
export function findParam(a: EditorAnalysis, fit: string, param: string): Span | undefined {
  const f = fitAst(a, fit);
  const p = f ? paramAsts(f).find((x) => x.name?.name === param) : undefined;
  return p ? spanOf(p.range) : undefined;
}

/** Name token of `param`. */
export function findParamName(a: EditorAnalysis, fit: string, param: string): Span | undefined {
  const f = fitAst(a, fit);
  const p = f ? paramAsts(f).find((x) => x.name?.name === param) : undefined;
  return p?.name ? spanOf(p.name.range) : undefined;
}

/** The `model` statement of a fit. */
export function modelSpan(a: EditorAnalysis, fit: string): Span | undefined {
  const f = fitAst(a, fit);
  const m = f?.items.find((i) => i.kind === 'model');
  return m ? spanOf(m.range) : undefined;
}

export function findData(a: EditorAnalysis, name: string): Span | undefined {
  const d = statements(a, 'data').find((s) => s.name?.name === name);
  return d ? spanOf(d.range) : undefined;
}

export function findDataName(a: EditorAnalysis, name: string): Span | undefined {
  const d = statements(a, 'data').find((s) => s.name?.name === name);
  return d?.name ? spanOf(d.name.range) : undefined;
}

export function findConstName(a: EditorAnalysis, name: string): Span | undefined {
  const c = statements(a, 'const').find((s) => s.name?.name === name);
  return c?.name ? spanOf(c.name.range) : undefined;
}

/**
 * The `expect` statement whose text matches `text` (the plan's
 * `Expectation.text`), compared without blanks so spacing edits still match.
 */
export function findExpectation(a: EditorAnalysis, text: string): Span | undefined {
  const want = text.replace(/\s+/g, '');
  for (const e of statements(a, 'expect')) {
    const s = spanOf(e.range);
    const got = a.text.slice(s.start, s.end).replace(/\s+/g, '');
    if (got === want || got === `expect${want}` || got.endsWith(want)) return s;
  }
  for (const e of a.plan.expectations) if (e.text.replace(/\s+/g, '') === want) return spanOf(e.range);
  return undefined;
}

/**
 * Name of the fit whose `{ … }` body encloses `offset`, by the syntax tree, or
 * by scanning braces when the tree is broken mid-edit.
 */
export function enclosingFit(a: EditorAnalysis, offset: number): string | undefined {
  for (const f of statements(a, 'fit')) {
    const s = spanOf(f.range);
    if (offset > s.start && offset <= s.end && f.name) {
      const brace = a.text.indexOf('{', s.start);
      if (brace >= 0 && brace < offset) return f.name.name;
    }
  }
  return scanEnclosingFit(a.text, offset)?.name;
}

/** Text scan for `fit NAME on DATA {` with no closing `}` before `offset`. */
export function scanEnclosingFit(text: string, offset: number): { name: string; data?: string } | undefined {
  const t = blankComments(text.slice(0, offset));
  const re = /\bfit\s+([A-Za-z_][A-Za-z0-9_]*)(?:\s+on\s+([A-Za-z_][A-Za-z0-9_]*))?\s*\{/g;
  let found: { name: string; data?: string; open: number } | undefined;
  for (let m = re.exec(t); m; m = re.exec(t)) found = { name: m[1], data: m[2], open: m.index + m[0].length };
  if (!found) return undefined;
  if (t.indexOf('}', found.open) >= 0) return undefined;
  return { name: found.name, data: found.data };
}

/** Data source name of a fit (from the tree, else from the plan). */
export function dataOfFit(a: EditorAnalysis, fit: string): string | undefined {
  return fitAst(a, fit)?.data?.name ?? a.plan.fits.find((f) => f.name === fit)?.blocks[0]?.data;
}
