/**
 * Outline and navigation as plain data: document symbols (data sources,
 * constants, fits with their parameters, derived quantities (as constants),
 * queries and expectations), the
 * declaration a name refers to, and the fits that get a code lens.
 */
import type { EditorAnalysis } from './analysis';
import { dataOfFit, enclosingFit, findConstName, findDataName, findFitName, findParamName, paramAsts } from './declarations';
import { spanOf, wordAt, type Span } from './text';

export type SymbolKind = 'data' | 'constant' | 'fit' | 'parameter' | 'query' | 'expectation';

export interface LsqSymbol {
  name: string;
  detail: string;
  kind: SymbolKind;
  /** Whole statement. */
  span: Span;
  /** The name within it (what is selected when the symbol is picked). */
  nameSpan: Span;
  children: LsqSymbol[];
}

export function documentSymbols(a: EditorAnalysis): LsqSymbol[] {
  const out: LsqSymbol[] = [];
  for (const st of a.ast.statements) {
    const span = spanOf(st.range);
    switch (st.kind) {
      case 'data':
        if (st.name) out.push({ name: st.name.name, detail: st.path ? `"${st.path.value}"` : '', kind: 'data', span, nameSpan: spanOf(st.name.range), children: [] });
        break;
      case 'const':
        if (st.name) out.push({ name: st.name.name, detail: st.value.kind === 'number' ? String(st.value.value) : '', kind: 'constant', span, nameSpan: spanOf(st.name.range), children: [] });
        break;
      case 'fit': {
        if (!st.name) break;
        const children = paramAsts(st).filter((p) => p.name).map((p) => ({
          name: p.name!.name,
          detail: p.fixed ? 'fixed' : p.unit ? `[${p.unit.text}]` : '',
          kind: 'parameter' as const,
          span: spanOf(p.range),
          nameSpan: spanOf(p.name!.range),
          children: [],
        }));
        out.push({ name: st.name.name, detail: st.data ? `on ${st.data.name}` : '', kind: 'fit', span, nameSpan: spanOf(st.name.range), children });
        break;
      }
      case 'derive':
        if (st.name) out.push({ name: st.name.name, detail: st.text ? `= ${st.text}` : '', kind: 'constant', span, nameSpan: spanOf(st.name.range), children: [] });
        break;
      case 'predict':
      case 'invert':
      case 'backcalc':
      case 'compare':
      case 'expect': {
        const first = a.text.slice(span.start, span.end).split(/\r?\n/)[0].trim();
        out.push({ name: first, detail: '', kind: st.kind === 'expect' ? 'expectation' : 'query', span, nameSpan: span, children: [] });
        break;
      }
    }
  }
  return out;
}

/** Where the name under `offset` is declared: a span in the spec, or a column of a data file. */
export type Definition =
  | { kind: 'spec'; span: Span }
  | { kind: 'column'; data: string; path: string; column: string };

export function definitionAt(a: EditorAnalysis, offset: number): Definition | null {
  const w = wordAt(a.text, offset);
  if (!w) return null;
  const name = w.word;
  const before = a.text.slice(Math.max(0, w.span.start - 200), w.span.start);
  const dotted = /\bexpect\s+([A-Za-z_]\w*)\.$/.exec(before);
  if (dotted) {
    const s = findParamName(a, dotted[1], name);
    return s ? { kind: 'spec', span: s } : null;
  }
  const fit = enclosingFit(a, offset);
  if (!w.quoted && fit) {
    const p = findParamName(a, fit, name);
    if (p) return { kind: 'spec', span: p };
  }
  if (!w.quoted) {
    const named = findConstName(a, name) ?? findDataName(a, name) ?? findFitName(a, name);
    if (named) return { kind: 'spec', span: named };
  }
  const data = fit ? dataOfFit(a, fit) : /^\s*data\s+(\w+)/m.exec(a.text.slice(a.text.lastIndexOf('\n', w.span.start) + 1))?.[1];
  const st = data ? a.data.find((d) => d.name === data) : undefined;
  if (st && st.headers?.includes(name)) return { kind: 'column', data: st.name, path: st.path, column: name };
  return null;
}

/** Fits that get "Fit" / "Show results" lenses, at their name. */
export function fitLenses(a: EditorAnalysis): { fit: string; span: Span }[] {
  return a.ast.statements.flatMap((s) => (s.kind === 'fit' && s.name ? [{ fit: s.name.name, span: spanOf(s.range) }] : []));
}

/** True when the fit runs once per group (`per COLUMN`). */
export function isGroupedFit(a: EditorAnalysis, fit: string): boolean {
  return a.plan.fits.some((f) => f.name === fit && f.groupBy !== undefined);
}
