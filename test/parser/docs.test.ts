import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { FUNCTIONS, STATISTICS } from '../../parser/plan';
import { FUNCTION_DOCS } from '../../parser/functions-doc';
import { KEYWORD_DOCS, STATISTIC_DOCS } from '../../parser/keyword-doc';
import { KEYWORDS } from '../../parser/tokens';
import { CODES } from '../../parser/messages';

const doc = readFileSync(fileURLToPath(new URL('../../parser/LANGUAGE.md', import.meta.url)), 'utf8');
/** The document with line breaks and runs of spaces collapsed (lists may wrap). */
const flat = doc.replace(/\s+/g, ' ');

describe('parser/LANGUAGE.md and doc modules', () => {
  it('documents every function, with the same text as functions-doc.ts', () => {
    expect(Object.keys(FUNCTION_DOCS).sort()).toEqual(Object.keys(FUNCTIONS).sort());
    for (const f of Object.values(FUNCTION_DOCS)) expect(doc).toContain(`| \`${f.signature}\` | ${f.doc} |`);
  });

  it('documents every keyword and statistic', () => {
    expect(Object.keys(KEYWORD_DOCS).sort()).toEqual([...KEYWORDS].sort());
    expect(flat).toContain('`' + [...KEYWORDS].sort().join(' ') + '`');
    expect(Object.keys(STATISTIC_DOCS).sort()).toEqual([...STATISTICS].sort());
    expect(flat).toContain('`' + STATISTICS.join(' ') + '`');
  });

  it('lists every diagnostic code with its severity', () => {
    for (const [code, severity] of Object.entries(CODES)) expect(doc).toContain(`| \`${code}\` | ${severity} |`);
  });
});
