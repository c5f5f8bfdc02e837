/**
 * The copies of the registries (parser/registry/) outside TypeScript are
 * generated from them and must be up to date: the tables of
 * parser/LANGUAGE.md between their markers, and the word lists of the
 * TextMate grammar (extension/syntaxes/lsq.tmLanguage.json). Editing a copy
 * by hand, or a registry without regenerating, turns this red; `npm run gen`
 * (LEASTWISE_WRITE_GENERATED=1) writes both files from the registries.
 * Inline lists in the prose of LANGUAGE.md are checked word for word.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { LINE_START_ROLES, RESERVED_ROLES, STATISTICS, keywordsWithRole } from '../../parser/registry';
import { LANGUAGE_SECTIONS, REGISTRY_WORDS, grammarLists, withSections } from './render';

const WRITE = process.env.LEASTWISE_WRITE_GENERATED === '1';
const LANGUAGE = fileURLToPath(new URL('../../parser/LANGUAGE.md', import.meta.url));
const GRAMMAR = fileURLToPath(new URL('../../extension/syntaxes/lsq.tmLanguage.json', import.meta.url));

describe('generated copies of the registries', () => {
  it('LANGUAGE.md: every generated table is what the registries render', () => {
    const doc = readFileSync(LANGUAGE, 'utf8');
    const want = withSections(doc, LANGUAGE_SECTIONS);
    if (WRITE && want !== doc) writeFileSync(LANGUAGE, want);
    expect(readFileSync(LANGUAGE, 'utf8')).toBe(want);
  });

  it('LANGUAGE.md: the lists in the prose name the registry words', () => {
    const flat = readFileSync(LANGUAGE, 'utf8').replace(/\s+/g, ' ');
    // the statistics of `expect` and `derive`, and the keywords that start a line
    expect(flat.split('`' + STATISTICS.join(' ') + '`').length - 1).toBe(2);
    expect(flat).toContain('`' + keywordsWithRole(...LINE_START_ROLES).join(' ') + '`');
    const reserved = keywordsWithRole(...RESERVED_ROLES).map((w) => `\`${w}\``);
    expect(flat).toContain(`The words ${reserved.slice(0, -1).join(', ')} and ${reserved.at(-1)} are reserved`);
  });

  it('the TextMate grammar: keyword, value, function and constant lists are what the registries render', () => {
    const text = readFileSync(GRAMMAR, 'utf8');
    const grammar = JSON.parse(text) as { repository: Record<string, unknown> };
    const want = grammarLists();
    const stale = Object.entries(want).some(([k, v]) => JSON.stringify(grammar.repository[k]) !== JSON.stringify(v));
    if (WRITE && stale) {
      Object.assign(grammar.repository, want);
      const out = JSON.stringify(grammar, null, 2) + '\n';
      if (out !== text) writeFileSync(GRAMMAR, out);
    }
    const now = JSON.parse(readFileSync(GRAMMAR, 'utf8')) as { repository: Record<string, unknown> };
    for (const [k, v] of Object.entries(want)) expect(now.repository[k], k).toEqual(v);
  });

  it('the TextMate grammar: the hand-written statement patterns use registry words only', () => {
    const grammar = JSON.parse(readFileSync(GRAMMAR, 'utf8')) as { repository: { declaration: { patterns: { match: string }[] }; expect: { match: string } } };
    const matches = [...grammar.repository.declaration.patterns.map((p) => p.match), grammar.repository.expect.match];
    // groups that are plain alternations of words: (data|const), (fit), (on), (se)
    const words = matches.flatMap((m) => [...m.matchAll(/\(([a-z][a-z0-9_]*(?:\|[a-z][a-z0-9_]*)*)\)/g)].flatMap((x) => x[1].split('|')));
    expect(words.length).toBeGreaterThan(8);
    expect(words.filter((w) => !REGISTRY_WORDS.has(w) && w !== 'se')).toEqual([]);
  });
});
