import { describe, expect, it } from 'vitest';
import { lexer, KEYWORDS, RESERVED_WORDS } from '../../parser/tokens';

const lex = (text: string) => {
  const r = lexer.tokenize(text);
  return { types: r.tokens.map((t) => t.tokenType.name), images: r.tokens.map((t) => t.image), errors: r.errors, groups: r.groups };
};

describe('parser/tokens', () => {
  it('reads keywords, but names that merely start with one are identifiers', () => {
    expect(lex('param param_x fitted index info inf in').types).toEqual([
      'Param', 'Identifier', 'Identifier', 'Identifier', 'Identifier', 'Inf', 'In',
    ]);
  });

  it('lexes units only when the bracket starts with a letter or 1/ and has no comma or space', () => {
    expect(lex('[degC] [1/min] [mg/L]').types).toEqual(['Unit', 'Unit', 'Unit']);
    expect(lex('[0, 200]').types).toEqual(['LBracket', 'NumberLiteral', 'Comma', 'NumberLiteral', 'RBracket']);
    expect(lex('[inf, 5]').types).toEqual(['LBracket', 'Inf', 'Comma', 'NumberLiteral', 'RBracket']);
    expect(lex('[-inf, 5]').types).toEqual(['LBracket', 'Minus', 'Inf', 'Comma', 'NumberLiteral', 'RBracket']);
    expect(lex('[a b]').types).toEqual(['LBracket', 'Identifier', 'Identifier', 'RBracket']);
  });

  it('reads the number forms of the language and splits 1..2 into 1 .. 2', () => {
    const r = lex('1 1.5 .5 1e-3 2.5E+4 1..2');
    expect(r.types).toEqual(['NumberLiteral', 'NumberLiteral', 'NumberLiteral', 'NumberLiteral', 'NumberLiteral', 'NumberLiteral', 'DotDot', 'NumberLiteral']);
    expect(r.images).toEqual(['1', '1.5', '.5', '1e-3', '2.5E+4', '1', '..', '2']);
  });

  it('shares one string token between paths and quoted column names', () => {
    const r = lex('"cooling.csv" "temp (°C)"');
    expect(r.types).toEqual(['StringLiteral', 'StringLiteral']);
    expect(r.images[1]).toBe('"temp (°C)"');
  });

  it('keeps comments out of the parser input and sets unterminated strings apart', () => {
    const r = lex('fit # note\n"open');
    expect(r.types).toEqual(['Fit']);
    expect(r.groups.comments.map((t) => t.image)).toEqual(['# note']);
    expect(r.groups.unterminated.map((t) => t.image)).toEqual(['"open']);
  });

  it('prefers two-character operators', () => {
    expect(lex('<= >= == != < > = ..').types).toEqual(['LessEq', 'GreaterEq', 'EqEq', 'NotEq', 'Less', 'Greater', 'Equals', 'DotDot']);
  });

  it('reports characters outside the language', () => {
    expect(lex('a @ b').errors).toHaveLength(1);
  });

  it('lists the keywords, reserved words among them', () => {
    for (const w of RESERVED_WORDS) expect(KEYWORDS).toContain(w);
    expect(new Set(KEYWORDS).size).toBe(KEYWORDS.length);
    expect(KEYWORDS).toContain('predict');
  });
});
