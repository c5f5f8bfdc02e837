/**
 * The registries of names (parser/registry/) against the TypeScript copies
 * that cannot be derived by construction: the lexer's keyword tokens (created
 * one by one for the grammar), their categories (reserved words are no
 * names), the option fields of the plan, and the editor's lists.
 */
import { describe, expect, it } from 'vitest';
import type { TokenType } from 'chevrotain';
import {
  FIT_OPTION_SPECS, KEYWORD_NAMES, KEYWORD_SPECS, LINE_START_ROLES, RESERVED_ROLES, RENAMED_LOSSES,
  LOSSES, METHODS, FUNCTION_NAMES, FUNCTION_HINTS, STATISTICS, keywordsWithRole, isKeyword,
} from '../../parser/registry';
import { KEYWORD_TOKENS, KEYWORDS, LINE_START_KEYWORDS, Name, RESERVED_WORDS, keywordOf } from '../../parser/tokens';
import { DEFAULT_OPTIONS, OPTION_KEYWORD } from '../../parser/check-options';
import { FIT_BODY_KEYWORDS, STATEMENT_KEYWORDS } from '../../extension/logic/completion';
import { keywordDoc, statisticDoc, functionDoc } from '../../extension/logic/function-docs';

const categories = (t: TokenType): TokenType[] => (t.CATEGORIES as TokenType[] | undefined) ?? [];

describe('parser/registry: keywords, tokens and the editor', () => {
  it('the lexer has exactly one token per registry keyword', () => {
    expect([...KEYWORDS].sort()).toEqual([...KEYWORD_NAMES].sort());
    expect(new Set(KEYWORD_TOKENS.map(keywordOf)).size).toBe(KEYWORD_NAMES.length);
  });

  it('reserved words (roles operator and constant) are exactly the keyword tokens that are no names', () => {
    const notNames = KEYWORD_TOKENS.filter((t) => !categories(t).includes(Name)).map(keywordOf).sort();
    expect(notNames).toEqual(keywordsWithRole(...RESERVED_ROLES).sort());
    expect([...RESERVED_WORDS].sort()).toEqual(notNames);
  });

  it('the keywords that start a line are those of the line-start roles', () => {
    expect([...LINE_START_KEYWORDS].map(keywordOf).sort()).toEqual(keywordsWithRole(...LINE_START_ROLES).sort());
    expect([...LINE_START_KEYWORDS].map(keywordOf)).toContain('explore');
  });

  it('completion offers the statement and fit-item keywords of the registry, with their docs', () => {
    expect([...STATEMENT_KEYWORDS]).toEqual(keywordsWithRole('declaration', 'query'));
    expect([...FIT_BODY_KEYWORDS]).toEqual(keywordsWithRole('fit_item'));
    for (const k of KEYWORD_NAMES) expect(keywordDoc(k)).toBe(KEYWORD_SPECS[k].doc);
  });

  it('every name has its doc in the editor: functions, statistics', () => {
    for (const f of FUNCTION_NAMES) expect(functionDoc(f)?.summary, f).toBeTruthy();
    for (const s of STATISTICS) expect(statisticDoc(s), s).toBeTruthy();
    expect(functionDoc('log')).toBeUndefined();
  });

  it('the keyword docs of method and loss list every method and loss', () => {
    expect(KEYWORD_SPECS.method.doc).toContain(METHODS.join(' | '));
    expect(KEYWORD_SPECS.loss.doc).toContain(LOSSES.join(' | '));
  });
});

describe('parser/registry: fit options and names of other notations', () => {
  it('every fit option is a fit-item keyword, every plan option field has its keyword, and the defaults name registry values', () => {
    for (const k of Object.keys(FIT_OPTION_SPECS)) expect(isKeyword(k) && KEYWORD_SPECS[k].role, k).toBe('fit_item');
    for (const k of Object.values(OPTION_KEYWORD)) expect(isKeyword(k), k).toBe(true);
    // each option's plan field is a field of FitOptions (and then set by that keyword), of a fit block, or the fit's groupBy
    for (const [k, o] of Object.entries(FIT_OPTION_SPECS)) {
      if (o.field in OPTION_KEYWORD) expect(OPTION_KEYWORD[o.field as keyof typeof OPTION_KEYWORD], k).toBe(k);
      else expect(['sigma', 'weight', 'groupBy'], k).toContain(o.field);
    }
    expect(METHODS).toContain(DEFAULT_OPTIONS.method);
    expect(LOSSES).toContain(DEFAULT_OPTIONS.loss);
    // every fit item but model and param is an option of the table
    expect(keywordsWithRole('fit_item').filter((k) => !(k in FIT_OPTION_SPECS))).toEqual(['model', 'param']);
  });

  it('hints and former names point to registry names, and are none themselves', () => {
    for (const [hint, targets] of FUNCTION_HINTS) {
      expect(FUNCTION_NAMES).not.toContain(hint);
      for (const t of targets) expect(FUNCTION_NAMES).toContain(t);
    }
    for (const [old, now] of Object.entries(RENAMED_LOSSES)) {
      expect(LOSSES).not.toContain(old);
      expect(LOSSES).toContain(now);
    }
  });
});
