import { describe, expect, it } from 'vitest';
import { lexTokens } from '../../parser/index';

function kinds(text: string): [string, string][] {
  return lexTokens(text).map((t) => [text.slice(t.range.start.offset, t.range.end.offset), t.kind]);
}

describe('parser/lex-tokens', () => {
  it('classifies every token kind', () => {
    const text = 'const k = 2 [mg/L] # note\ndata d = "a.csv"\nfit f on d {\n  model y = k * exp(-pi * x)\n  param a in [0, inf]\n}';
    const got = new Map(kinds(text));
    expect(got.get('const')).toBe('keyword');
    expect(got.get('k')).toBe('identifier');
    expect(got.get('2')).toBe('number');
    expect(got.get('[mg/L]')).toBe('unit');
    expect(got.get('# note')).toBe('comment');
    expect(got.get('"a.csv"')).toBe('string');
    expect(got.get('exp')).toBe('function');
    expect(got.get('pi')).toBe('constant');
    expect(got.get('inf')).toBe('constant');
    expect(got.get('*')).toBe('operator');
    expect(got.get('{')).toBe('operator');
  });

  it('classes a soft keyword used as a name as an identifier', () => {
    const k = kinds('fit f on d {\n  model ln(rate) = level * x\n  param level\n  rate 0.1\n}');
    expect(k.filter(([s]) => s === 'rate').map(([, kind]) => kind)).toEqual(['identifier', 'keyword']);
    expect(k.filter(([s]) => s === 'level').map(([, kind]) => kind)).toEqual(['identifier', 'identifier']);
  });

  it('returns tokens in text order with ranges inside the text, even for broken input', () => {
    const text = 'fit f on { model "open\n @ y = (( \n}';
    const toks = lexTokens(text);
    expect(toks.length).toBeGreaterThan(3);
    for (let i = 1; i < toks.length; i++) expect(toks[i].range.start.offset).toBeGreaterThanOrEqual(toks[i - 1].range.end.offset);
    for (const t of toks) expect(t.range.end.offset).toBeLessThanOrEqual(text.length);
  });
});
