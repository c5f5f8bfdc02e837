import { describe, expect, it } from 'vitest';
import { lexTokens } from '../../parser';
import { definitionAt, documentSymbols, fitLenses } from '../../extension/logic/symbols';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { semanticTokens, TOKEN_TYPES } from '../../extension/logic/semantic';

const ROOT = join(__dirname, '..', '..');
import { analysisOf, COOLING } from './helpers';

describe('extension/logic/symbols', () => {
  it('outlines data, constants, fits with their parameters, queries and expectations', () => {
    const s = documentSymbols(analysisOf(COOLING));
    expect(s.map((x) => [x.kind, x.name.split(' ')[0]])).toEqual([
      ['data', 'bench'], ['constant', 'ambient'], ['fit', 'newton'], ['query', 'predict'], ['expectation', 'expect'], ['expectation', 'expect'],
    ]);
    const fit = s.find((x) => x.kind === 'fit')!;
    expect(fit.children.map((c) => c.name)).toEqual(['rise', 'tau']);
    expect(COOLING.slice(fit.nameSpan.start, fit.nameSpan.end)).toBe('newton');
  });

  it('goes from a use to its declaration', () => {
    const a = analysisOf(COOLING);
    const use = COOLING.indexOf('/ tau') + 3;
    const d = definitionAt(a, use);
    expect(d?.kind).toBe('spec');
    if (d?.kind === 'spec') {
      expect(COOLING.slice(d.span.start, d.span.end)).toBe('tau');
      expect(d.span.start).toBe(COOLING.indexOf('param tau') + 'param '.length);
    }
    const c = definitionAt(a, COOLING.indexOf('ambient +') + 1);
    expect(c?.kind === 'spec' && COOLING.slice(c.span.start, c.span.end)).toBe('ambient');
    const data = definitionAt(a, COOLING.indexOf('on bench') + 4);
    expect(data?.kind === 'spec' && data.span.start).toBe(COOLING.indexOf('data bench') + 5);
    const fromExpect = definitionAt(a, COOLING.indexOf('newton.tau') + 8);
    expect(fromExpect?.kind === 'spec' && fromExpect.span.start).toBe(COOLING.indexOf('param tau') + 6);
  });

  it('sends a column to its data file header', () => {
    const d = definitionAt(analysisOf(COOLING), COOLING.indexOf('sigma temp_sd') + 7);
    expect(d).toEqual({ kind: 'column', data: 'bench', path: 'cooling.csv', column: 'temp_sd' });
  });

  it('puts one lens anchor at each fit statement', () => {
    const lenses = fitLenses(analysisOf(`${COOLING}\nfit second on bench {\n  model temp_C = a + b * time_min\n  param a\n  param b\n}\n`));
    expect(lenses.map((l) => l.fit)).toEqual(['newton', 'second']);
  });
});

describe('extension/logic/semantic', () => {
  it('classes identifiers by what they name and keeps document order', () => {
    const a = analysisOf(COOLING);
    const toks = semanticTokens(a, lexTokens(COOLING));
    const typeAt = (needle: string, skip = 0) => toks.find((t) => t.start === COOLING.indexOf(needle) + skip)?.type;
    expect(typeAt('tau)')).toBe('parameter');
    expect(typeAt('ambient +')).toBe('variable');
    expect(typeAt('bench {')).toBe('namespace');
    expect(typeAt('temp_sd')).toBe('column');
    expect(typeAt('exp(')).toBe('function');
    expect(typeAt('# Cooling')).toBe('comment');
    expect(typeAt('[degC]')).toBe('type');
    expect(typeAt('newton.tau', 7)).toBe('parameter');
    const decl = toks.find((t) => t.start === COOLING.indexOf('param tau') + 6);
    expect(decl?.modifiers).toContain('declaration');
    for (let i = 1; i < toks.length; i++) expect(toks[i].start).toBeGreaterThanOrEqual(toks[i - 1].start);
  });

  it('gives columns their own type, apart from parameters; a misspelt name is no column', () => {
    const text = COOLING.replace('exp(-time_min', 'exp(-time_mn');
    const toks = semanticTokens(analysisOf(text), lexTokens(text));
    const typeAt = (needle: string, skip = 0) => toks.find((t) => t.start === text.indexOf(needle) + skip)?.type;
    expect(typeAt('time_mn')).toBe('variable');
    expect(typeAt('temp_C =')).toBe('column');
    expect(typeAt('at time_min', 3)).toBe('column');
    expect(typeAt('rise *')).toBe('parameter');
    // the statistic after `newton.` is no column
    expect(typeAt('newton.r2', 7)).toBe('property');
  });

  it('declares every custom token type in package.json and maps columns and parameters to different scopes', () => {
    const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8'));
    const declared = (pkg.contributes.semanticTokenTypes as { id: string; superType?: string }[]).map((t) => t.id);
    // VS Code's standard token types (the semantic highlighting guide's list) need no declaration
    const standard = new Set(['namespace', 'class', 'enum', 'interface', 'struct', 'typeParameter', 'type', 'parameter', 'variable', 'property', 'enumMember', 'decorator', 'event', 'function', 'method', 'macro', 'label', 'comment', 'string', 'keyword', 'number', 'regexp', 'operator']);
    for (const t of TOKEN_TYPES) expect(standard.has(t) || declared.includes(t), t).toBe(true);
    const scopes = pkg.contributes.semanticTokenScopes.find((s: { language: string }) => s.language === 'lsq').scopes;
    expect(scopes.column[0]).toMatch(/^entity\.name\.type\./);
    expect(scopes.parameter[0]).toMatch(/^variable\.parameter\./);
  });
});
