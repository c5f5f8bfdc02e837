/**
 * Every token of the `.lsq` language, in lexer order.
 *
 * Order matters: chevrotain takes the FIRST pattern that matches at a
 * position (not the longest), so the list in `ALL_TOKENS` is arranged as
 *  1. trivia - whitespace (skipped) and `#` comments (kept in group "comments"
 *     for the editor, never seen by the parser);
 *  2. literals - strings before the unterminated-string catcher; units before
 *     the plain `[`; numbers before `.` so `.5` is a number, and `..` before
 *     numbers so `1..2` reads as `1 .. 2`;
 *  3. keywords, longest first (so `inf` wins over `in`), each with
 *     `longer_alt: Identifier` so `param_x`, `fitted` or `index` are names;
 *  4. Identifier;
 *  5. operators and punctuation, longest first (`<=` before `<`, `..` before `.`).
 *
 * Soft keywords: most keywords also belong to the `Name` category, so a column
 * or parameter may be called `rate`, `weight` or `level`; the grammar accepts
 * `Name` wherever a name is expected. Reserved (never names): `and`, `or`,
 * `not`, `inf`.
 */
import { createToken, Lexer, type IToken, type TokenType } from 'chevrotain';
import { KEYWORD_SPECS, LINE_START_ROLES, RESERVED_ROLES, keywordsWithRole, type KeywordName } from './registry/keywords';

/** Category matched wherever a name is expected (identifiers and soft keywords). */
export const Name = createToken({ name: 'Name', pattern: Lexer.NA, label: 'a name' });

export const WhiteSpace = createToken({ name: 'WhiteSpace', pattern: /[ \t\r\n\f\v\u00a0\ufeff]+/, group: Lexer.SKIPPED, line_breaks: true });
export const Comment = createToken({ name: 'Comment', pattern: /#[^\r\n]*/, group: 'comments' });

/** `"..."`: file paths, delimiter marks and quoted column names such as `"temp (°C)"`. No escapes, no line breaks. */
export const StringLiteral = createToken({ name: 'StringLiteral', pattern: /"[^"\r\n]*"/, label: 'a "quoted" text' });
/** A `"` never closed on its line; collected apart and reported as a syntax error. */
export const UnterminatedString = createToken({ name: 'UnterminatedString', pattern: /"[^"\r\n]*/, group: 'unterminated' });
/**
 * Unit `[degC]`, `[1/min]`, `[mg/L]`: starts with a letter (or `°`, `µ`, `%`, or `1/`), no comma, no space,
 * so bounds such as `[0, 200]` or `[inf, 5]` never lex as a unit.
 */
export const Unit = createToken({
  name: 'Unit',
  pattern: /\[(?:[A-Za-z\u00b0\u00b5\u03bc\u03a9%]|1\/)[A-Za-z0-9\u00b0\u00b5\u03bc\u03a9%/*^.\u00b7()_-]*\]/,
  label: 'a unit such as [mg/L]',
});
export const DotDot = createToken({ name: 'DotDot', pattern: /\.\./, label: "'..'" });
/** `1`, `1.5`, `.5`, `1e-3`, `2.5E+4` (no trailing dot: `1.` is not a number). */
export const NumberLiteral = createToken({ name: 'NumberLiteral', pattern: /(?:\d+(?:\.\d+)?|\.\d+)(?:[eE][+-]?\d+)?/, label: 'a number' });

export const Identifier = createToken({ name: 'Identifier', pattern: /[A-Za-z_][A-Za-z0-9_]*/, categories: [Name], label: 'a name' });

/** Binary operators (category): the expression rule reads `operand (BinaryOperator operand)*`. */
export const BinaryOperator = createToken({ name: 'BinaryOperator', pattern: Lexer.NA, label: 'an operator' });
/** Prefix operators (category): `-`, `+`, `not`. */
export const PrefixOperator = createToken({ name: 'PrefixOperator', pattern: Lexer.NA, label: "'-', '+' or 'not'" });

/** The token of a keyword of registry/keywords.ts (a word not in the registry does not compile). */
function keyword(word: KeywordName, categories: TokenType[] = [Name]): TokenType {
  return createToken({
    name: word.charAt(0).toUpperCase() + word.slice(1),
    pattern: new RegExp(word),
    longer_alt: Identifier,
    categories,
    label: `'${word}'`,
  });
}

// Statements
export const Data = keyword('data');
export const Const = keyword('const');
export const Fit = keyword('fit');
export const Derive = keyword('derive');
export const Predict = keyword('predict');
export const Invert = keyword('invert');
export const Backcalc = keyword('backcalc');
export const Compare = keyword('compare');
export const Expect = keyword('expect');
// Data options
export const Where = keyword('where');
export const Delimiter = keyword('delimiter');
export const Decimal = keyword('decimal');
export const Units = keyword('units');
// Fit body
export const On = keyword('on');
export const Model = keyword('model');
export const Param = keyword('param');
export const In = keyword('in');
export const Fixed = keyword('fixed');
export const Shared = keyword('shared');
export const Sigma = keyword('sigma');
export const Weight = keyword('weight');
export const Method = keyword('method');
export const Loss = keyword('loss');
export const Scale = keyword('scale');
export const Level = keyword('level');
export const Iterations = keyword('iterations');
export const Tolerance = keyword('tolerance');
export const Rate = keyword('rate');
export const Explore = keyword('explore');
export const Profile = keyword('profile');
export const Bootstrap = keyword('bootstrap');
export const Seed = keyword('seed');
export const Per = keyword('per');
// Queries and expectations
export const At = keyword('at');
export const Readings = keyword('readings');
export const Within = keyword('within');
export const Above = keyword('above');
export const Below = keyword('below');
// Reserved words (never names)
export const And = keyword('and', [BinaryOperator]);
export const Or = keyword('or', [BinaryOperator]);
export const Not = keyword('not', [PrefixOperator]);
export const Inf = keyword('inf', []);

/** All keywords, longest first so a keyword that is a prefix of another (`in`, `inf`) comes after it. */
export const KEYWORD_TOKENS: readonly TokenType[] = [
  Data, Const, Fit, Derive, Predict, Invert, Backcalc, Compare, Expect, Where, Delimiter, Decimal, Units, On, Model, Param, In, Fixed, Shared,
  Sigma, Weight, Method, Loss, Scale, Level, Iterations, Tolerance, Rate, Explore, Profile, Bootstrap, Seed, Per, At, Readings, Within, Above, Below,
  And, Or, Not, Inf,
].sort((a, b) => String(b.PATTERN).length - String(a.PATTERN).length);

/** The word a keyword token matches. */
export function keywordOf(t: TokenType): KeywordName {
  return (t.PATTERN as RegExp).source as KeywordName;
}

/** Keyword spellings, for the language reference and the editor (the same words as registry/keywords.ts; a test holds them together). */
export const KEYWORDS: readonly string[] = KEYWORD_TOKENS.map(keywordOf).sort();
/** Keywords that can never be used as names (registry roles `operator` and `constant`). */
export const RESERVED_WORDS: readonly string[] = keywordsWithRole(...RESERVED_ROLES);

// Operators and punctuation (two-character forms first)
export const LessEq = createToken({ name: 'LessEq', pattern: /<=/, categories: [BinaryOperator], label: "'<='" });
export const GreaterEq = createToken({ name: 'GreaterEq', pattern: />=/, categories: [BinaryOperator], label: "'>='" });
export const EqEq = createToken({ name: 'EqEq', pattern: /==/, categories: [BinaryOperator], label: "'=='" });
export const NotEq = createToken({ name: 'NotEq', pattern: /!=/, categories: [BinaryOperator], label: "'!='" });
export const Less = createToken({ name: 'Less', pattern: /</, categories: [BinaryOperator], label: "'<'" });
export const Greater = createToken({ name: 'Greater', pattern: />/, categories: [BinaryOperator], label: "'>'" });
export const Equals = createToken({ name: 'Equals', pattern: /=/, label: "'='" });
export const Plus = createToken({ name: 'Plus', pattern: /\+/, categories: [BinaryOperator, PrefixOperator], label: "'+'" });
export const Minus = createToken({ name: 'Minus', pattern: /-/, categories: [BinaryOperator, PrefixOperator], label: "'-'" });
export const Star = createToken({ name: 'Star', pattern: /\*/, categories: [BinaryOperator], label: "'*'" });
export const Slash = createToken({ name: 'Slash', pattern: /\//, categories: [BinaryOperator], label: "'/'" });
export const Caret = createToken({ name: 'Caret', pattern: /\^/, categories: [BinaryOperator], label: "'^'" });
export const LParen = createToken({ name: 'LParen', pattern: /\(/, label: "'('" });
export const RParen = createToken({ name: 'RParen', pattern: /\)/, label: "')'" });
export const LBracket = createToken({ name: 'LBracket', pattern: /\[/, label: "'['" });
export const RBracket = createToken({ name: 'RBracket', pattern: /\]/, label: "']'" });
export const LBrace = createToken({ name: 'LBrace', pattern: /\{/, label: "'{'" });
export const RBrace = createToken({ name: 'RBrace', pattern: /\}/, label: "'}'" });
export const Comma = createToken({ name: 'Comma', pattern: /,/, label: "','" });
export const Dot = createToken({ name: 'Dot', pattern: /\./, label: "'.'" });

export const OPERATOR_TOKENS: readonly TokenType[] = [
  LessEq, GreaterEq, EqEq, NotEq, Less, Greater, Equals, Plus, Minus, Star, Slash, Caret,
  LParen, RParen, LBracket, RBracket, LBrace, RBrace, Comma, Dot,
];

/** Lexer order (see the module comment). The categories (`Name`, operators) match nothing themselves and come last. */
export const ALL_TOKENS: readonly TokenType[] = [
  WhiteSpace, Comment,
  StringLiteral, UnterminatedString, Unit, DotDot, NumberLiteral,
  ...KEYWORD_TOKENS,
  Identifier,
  ...OPERATOR_TOKENS,
  Name, BinaryOperator, PrefixOperator,
];

/**
 * Keywords that, first on their line, always start a statement, fit item or
 * data option - even where a name could stand. This keeps recovery local:
 * in `model y = a *` followed by a line `param b`, the `param` is not taken
 * as the missing operand. (Inside a line they remain usable as names, e.g.
 * `ln(rate)`; a name that must start a line can be written in quotes.)
 */
export const LINE_START_KEYWORDS: ReadonlySet<TokenType> = new Set(
  KEYWORD_TOKENS.filter((t) => LINE_START_ROLES.includes(KEYWORD_SPECS[keywordOf(t)].role)),
);

/** Payload set on a token that is the first token on its line. */
export const FIRST_ON_LINE = 'first-on-line';

/** Marks each token that starts a line (after lexing, before parsing). */
export function markLineStarts(tokens: IToken[]): void {
  let lastLine = 0;
  for (const t of tokens) {
    if ((t.startLine ?? 0) > lastLine) t.payload = FIRST_ON_LINE;
    lastLine = t.endLine ?? t.startLine ?? lastLine;
  }
}

/** True when a token is a statement keyword at the start of its line (never read as a name). */
export function startsStatement(t: IToken): boolean {
  return t.payload === FIRST_ON_LINE && LINE_START_KEYWORDS.has(t.tokenType);
}

export const lexer = new Lexer(ALL_TOKENS as TokenType[], {
  positionTracking: 'full',
  ensureOptimizations: false,
});
