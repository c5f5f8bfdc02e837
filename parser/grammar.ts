/**
 * The `.lsq` grammar as one chevrotain CstParser (one reused instance).
 *
 *   spec       := statement*
 *   statement  := data | const | fit | derive | predict | invert | backcalc | compare | expect
 *   data       := 'data' Name '=' String ( 'where' expr | 'delimiter' String | 'decimal' String | 'units' column Unit (',' column Unit)* )*
 *   const      := 'const' Name '=' value Unit?
 *   fit        := 'fit' Name 'on' Name (',' Name)* '{' fitItem* '}'
 *   fitItem    := 'model' expr '=' expr
 *               | 'param' Name ( '=' value | 'in' '[' value ',' value ']' | 'fixed' | 'shared' | Unit )*
 *               | ('sigma' | 'weight') expr | ('method' | 'profile') Name | 'loss' Name ('scale' value)?
 *               | ('level' | 'iterations' | 'tolerance' | 'rate' | 'explore') value | 'per' column
 *               | 'bootstrap' value Name? ('seed' value)?
 *   derive     := 'derive' Name '=' expr Unit?
 *   predict    := ('predict' | 'invert') Name 'at' column '=' value (',' value)* queryOpt*
 *   queryOpt   := 'readings' value | ('sigma' | 'weight') value (',' value)*
 *   backcalc   := 'backcalc' Name
 *   compare    := 'compare' Name ('within' Name | (',' Name)*)
 *   expect     := 'expect' Name ( '.' ( Name | String ) )* ( 'at' column '=' value queryOpt* )? ( 'within' value '..' value | ('above'|'below') value )
 *   value      := ('-' | '+')? ( Number | 'inf' | Name )
 *   column     := Name | String
 *
 *   expr       := operand ( BinaryOperator operand )*
 *   operand    := ( '-' | '+' | 'not' )* ( Number | String | Name ( '(' expr (',' expr)* ')' | ( '.' ( Name | String ) )+ )? | '(' expr ')' )
 *
 * A dotted name `FIT.NAME` reads a fit's result; the checker allows it only in `derive`.
 *
 * A statement keyword that is first on its line is never read as a name in
 * an operand, value, column, parameter name or option value (tokens.ts
 * `startsStatement`), which keeps error recovery on the right line.
 *
 * Expression precedence, loosest first, is applied in precedence.ts: or < and <
 * not < comparison < + - < * / < sign < ^ (right-associative, binds tighter
 * than a leading sign: -x^2 = -(x^2), 2^3^2 = 2^(3^2), 2^-1 allowed).
 */
import './compat';
import { CstParser, type CstNode, type IParserErrorMessageProvider, type IToken, type TokenType, EOF } from 'chevrotain';
import * as T from './tokens';

function show(tok: IToken | undefined): string {
  if (!tok || tok.tokenType === EOF) return 'the end of the file';
  const image = tok.image.length > 24 ? tok.image.slice(0, 24) + '…' : tok.image;
  return `'${image}'`;
}

function label(t: TokenType): string {
  return t.LABEL ?? t.name;
}

function unexpected(tok: IToken): string {
  return `unexpected ${show(tok)}: a statement starts with data, const, fit, derive, predict, invert, backcalc, compare or expect`;
}

/** Short, user-facing syntax messages (the parser's defaults name internal token types). */
const messages: IParserErrorMessageProvider = {
  buildMismatchTokenMessage: ({ expected, actual }) =>
    expected === EOF ? unexpected(actual) : `expected ${label(expected)} but found ${show(actual)}`,
  buildNotAllInputParsedMessage: ({ firstRedundant }) => unexpected(firstRedundant),
  buildNoViableAltMessage: ({ expectedPathsPerAlt, actual, customUserDescription }) => {
    const firsts = new Set<string>();
    for (const alt of expectedPathsPerAlt) for (const path of alt) if (path[0]) firsts.add(label(path[0]));
    const what = customUserDescription ?? [...firsts].slice(0, 8).join(', ');
    return `expected ${what} but found ${show(actual[0])}`;
  },
  buildEarlyExitMessage: ({ actual, customUserDescription }) =>
    `expected ${customUserDescription ?? 'more input'} but found ${show(actual[0])}`,
};

export class LsqParser extends CstParser {
  constructor() {
    super(T.ALL_TOKENS as TokenType[], { recoveryEnabled: true, maxLookahead: 3, errorMessageProvider: messages });
    this.performSelfAnalysis();
  }

  public spec = this.RULE('spec', () => {
    this.MANY(() => this.SUBRULE(this.statement));
  });

  private statement = this.RULE('statement', () => {
    this.OR({
      DEF: [
        { ALT: () => this.SUBRULE(this.dataStatement) },
        { ALT: () => this.SUBRULE(this.constStatement) },
        { ALT: () => this.SUBRULE(this.fitStatement) },
        { ALT: () => this.SUBRULE(this.deriveStatement) },
        { ALT: () => this.SUBRULE(this.queryStatement) },
        { ALT: () => this.SUBRULE(this.backcalcStatement) },
        { ALT: () => this.SUBRULE(this.compareStatement) },
        { ALT: () => this.SUBRULE(this.expectStatement) },
      ],
      ERR_MSG: 'a statement (data, const, fit, derive, predict, invert, backcalc, compare or expect)',
    });
  });

  private dataStatement = this.RULE('dataStatement', () => {
    this.CONSUME(T.Data);
    this.CONSUME(T.Name, { LABEL: 'name' });
    this.CONSUME(T.Equals);
    this.CONSUME(T.StringLiteral, { LABEL: 'path' });
    this.MANY(() => this.SUBRULE(this.dataOption, { LABEL: 'options' }));
  });

  private dataOption = this.RULE('dataOption', () => {
    this.OR([
      { ALT: () => { this.CONSUME(T.Where); this.SUBRULE(this.expression, { LABEL: 'condition' }); } },
      { ALT: () => { this.CONSUME(T.Delimiter); this.CONSUME(T.StringLiteral, { LABEL: 'delimiterValue' }); } },
      { ALT: () => { this.CONSUME(T.Decimal); this.CONSUME2(T.StringLiteral, { LABEL: 'decimalValue' }); } },
      {
        ALT: () => {
          this.CONSUME(T.Units);
          this.AT_LEAST_ONE_SEP({ SEP: T.Comma, DEF: () => this.SUBRULE(this.columnUnit, { LABEL: 'columnUnits' }) });
        },
      },
    ]);
  });

  /** `COLUMN [UNIT]` in a data statement's `units` list. */
  private columnUnit = this.RULE('columnUnit', () => {
    this.SUBRULE(this.column, { LABEL: 'column' });
    this.CONSUME(T.Unit, { LABEL: 'unit' });
  });

  private constStatement = this.RULE('constStatement', () => {
    this.CONSUME(T.Const);
    this.CONSUME(T.Name, { LABEL: 'name' });
    this.CONSUME(T.Equals);
    this.SUBRULE(this.value);
    this.OPTION(() => this.CONSUME(T.Unit, { LABEL: 'unit' }));
  });

  private fitStatement = this.RULE('fitStatement', () => {
    this.CONSUME(T.Fit);
    this.CONSUME(T.Name, { LABEL: 'name' });
    this.CONSUME(T.On);
    this.CONSUME2(T.Name, { LABEL: 'data' });
    // `fit NAME on A, B, C`: one joint fit over several tables (parser/check-fit.ts)
    this.MANY2(() => { this.CONSUME(T.Comma); this.CONSUME3(T.Name, { LABEL: 'data' }); });
    this.CONSUME(T.LBrace);
    this.MANY(() => this.SUBRULE(this.fitItem, { LABEL: 'items' }));
    this.CONSUME(T.RBrace);
  });

  private fitItem = this.RULE('fitItem', () => {
    this.OR({
      DEF: [
        { ALT: () => this.SUBRULE(this.modelItem) },
        { ALT: () => this.SUBRULE(this.paramItem) },
        { ALT: () => this.SUBRULE(this.exprOption) },
        { ALT: () => this.SUBRULE(this.nameOption) },
        { ALT: () => this.SUBRULE(this.lossOption) },
        { ALT: () => this.SUBRULE(this.numberOption) },
        { ALT: () => this.SUBRULE(this.perOption) },
        { ALT: () => this.SUBRULE(this.bootstrapOption) },
      ],
      ERR_MSG: 'model, param, sigma, weight, method, loss, level, iterations, tolerance, rate, explore, profile, bootstrap, per or }',
    });
  });

  private modelItem = this.RULE('modelItem', () => {
    this.CONSUME(T.Model);
    this.SUBRULE(this.expression, { LABEL: 'response' });
    this.CONSUME(T.Equals);
    this.SUBRULE2(this.expression, { LABEL: 'model' });
  });

  private paramItem = this.RULE('paramItem', () => {
    this.CONSUME(T.Param);
    this.SUBRULE(this.word);
    this.MANY(() => this.SUBRULE(this.paramPart, { LABEL: 'parts' }));
  });

  private paramPart = this.RULE('paramPart', () => {
    this.OR([
      { ALT: () => { this.CONSUME(T.Equals); this.SUBRULE(this.value, { LABEL: 'initial' }); } },
      { ALT: () => this.SUBRULE(this.bounds) },
      { ALT: () => this.CONSUME(T.Fixed) },
      { ALT: () => this.CONSUME(T.Shared) },
      { ALT: () => this.CONSUME(T.Unit) },
    ]);
  });

  private bounds = this.RULE('bounds', () => {
    this.CONSUME(T.In);
    this.CONSUME(T.LBracket);
    this.SUBRULE(this.value, { LABEL: 'low' });
    this.CONSUME(T.Comma);
    this.SUBRULE2(this.value, { LABEL: 'high' });
    this.CONSUME(T.RBracket);
  });

  private exprOption = this.RULE('exprOption', () => {
    this.OR([{ ALT: () => this.CONSUME(T.Sigma, { LABEL: 'keyword' }) }, { ALT: () => this.CONSUME(T.Weight, { LABEL: 'keyword' }) }]);
    this.SUBRULE(this.expression);
  });

  private nameOption = this.RULE('nameOption', () => {
    this.OR([{ ALT: () => this.CONSUME(T.Method, { LABEL: 'keyword' }) }, { ALT: () => this.CONSUME(T.Profile, { LABEL: 'keyword' }) }]);
    this.SUBRULE(this.word);
  });

  private bootstrapOption = this.RULE('bootstrapOption', () => {
    this.CONSUME(T.Bootstrap);
    this.SUBRULE(this.value, { LABEL: 'replicates' });
    // `seed` is a soft keyword (also a Name): it is never read as the resampling word
    this.OPTION({ GATE: () => this.LA(1).tokenType !== T.Seed && !T.startsStatement(this.LA(1)), DEF: () => this.SUBRULE(this.word) });
    this.OPTION2(() => {
      this.CONSUME(T.Seed);
      this.SUBRULE2(this.value, { LABEL: 'seed' });
    });
  });

  private lossOption = this.RULE('lossOption', () => {
    this.CONSUME(T.Loss);
    this.SUBRULE(this.word);
    this.OPTION(() => {
      this.CONSUME(T.Scale);
      this.SUBRULE(this.value, { LABEL: 'scale' });
    });
  });

  private numberOption = this.RULE('numberOption', () => {
    this.OR([
      { ALT: () => this.CONSUME(T.Level, { LABEL: 'keyword' }) },
      { ALT: () => this.CONSUME(T.Iterations, { LABEL: 'keyword' }) },
      { ALT: () => this.CONSUME(T.Tolerance, { LABEL: 'keyword' }) },
      { ALT: () => this.CONSUME(T.Rate, { LABEL: 'keyword' }) },
      { ALT: () => this.CONSUME(T.Explore, { LABEL: 'keyword' }) },
    ]);
    this.SUBRULE(this.value);
  });

  private perOption = this.RULE('perOption', () => {
    this.CONSUME(T.Per);
    this.SUBRULE(this.column);
  });

  private deriveStatement = this.RULE('deriveStatement', () => {
    this.CONSUME(T.Derive);
    this.CONSUME(T.Name, { LABEL: 'name' });
    this.CONSUME(T.Equals);
    this.SUBRULE(this.expression);
    this.OPTION(() => this.CONSUME(T.Unit, { LABEL: 'unit' }));
  });

  private queryStatement = this.RULE('queryStatement', () => {
    this.OR([{ ALT: () => this.CONSUME(T.Predict, { LABEL: 'keyword' }) }, { ALT: () => this.CONSUME(T.Invert, { LABEL: 'keyword' }) }]);
    this.CONSUME(T.Name, { LABEL: 'fit' });
    this.CONSUME(T.At);
    this.SUBRULE(this.column);
    this.CONSUME(T.Equals);
    this.AT_LEAST_ONE_SEP({ SEP: T.Comma, DEF: () => this.SUBRULE(this.value, { LABEL: 'values' }) });
    this.MANY(() => this.SUBRULE(this.queryOption, { LABEL: 'options' }));
  });

  private queryOption = this.RULE('queryOption', () => {
    this.OR([
      { ALT: () => { this.CONSUME(T.Readings, { LABEL: 'keyword' }); this.SUBRULE(this.value, { LABEL: 'readings' }); } },
      { ALT: () => { this.CONSUME(T.Sigma, { LABEL: 'keyword' }); this.AT_LEAST_ONE_SEP({ SEP: T.Comma, DEF: () => this.SUBRULE2(this.value, { LABEL: 'spread' }) }); } },
      { ALT: () => { this.CONSUME(T.Weight, { LABEL: 'keyword' }); this.AT_LEAST_ONE_SEP2({ SEP: T.Comma, DEF: () => this.SUBRULE3(this.value, { LABEL: 'spread' }) }); } },
    ]);
  });

  private backcalcStatement = this.RULE('backcalcStatement', () => {
    this.CONSUME(T.Backcalc);
    this.CONSUME(T.Name, { LABEL: 'fit' });
  });

  private compareStatement = this.RULE('compareStatement', () => {
    this.CONSUME(T.Compare);
    this.CONSUME(T.Name, { LABEL: 'fits' });
    // `compare a within b` declares a nested in b; else a list `compare a, b, ...`
    this.OR([
      { ALT: () => { this.CONSUME(T.Within, { LABEL: 'within' }); this.CONSUME2(T.Name, { LABEL: 'fits' }); } },
      { ALT: () => this.MANY(() => { this.CONSUME(T.Comma); this.CONSUME3(T.Name, { LABEL: 'fits' }); }) },
    ]);
  });

  private expectStatement = this.RULE('expectStatement', () => {
    this.CONSUME(T.Expect);
    this.CONSUME(T.Name, { LABEL: 'fit' });
    this.MANY(() => {
      this.CONSUME(T.Dot);
      // FIT."GROUP".PARAM: a quoted path element names a group (parser/check-queries.ts)
      this.OR2([{ ALT: () => this.CONSUME2(T.Name, { LABEL: 'path' }) }, { ALT: () => this.CONSUME(T.StringLiteral, { LABEL: 'path' }) }]);
    });
    this.OPTION(() => {
      this.CONSUME(T.At);
      this.SUBRULE(this.column, { LABEL: 'atColumn' });
      this.CONSUME(T.Equals);
      this.SUBRULE5(this.value, { LABEL: 'atValue' });
      this.MANY2(() => this.SUBRULE(this.queryOption, { LABEL: 'options' }));
    });
    this.OR([
      { ALT: () => { this.CONSUME(T.Within); this.SUBRULE(this.value, { LABEL: 'low' }); this.CONSUME(T.DotDot); this.SUBRULE2(this.value, { LABEL: 'high' }); } },
      { ALT: () => { this.CONSUME(T.Above); this.SUBRULE3(this.value, { LABEL: 'above' }); } },
      { ALT: () => { this.CONSUME(T.Below); this.SUBRULE4(this.value, { LABEL: 'below' }); } },
    ]);
  });

  private value = this.RULE('value', () => {
    this.OPTION(() => this.OR([{ ALT: () => this.CONSUME(T.Minus, { LABEL: 'sign' }) }, { ALT: () => this.CONSUME(T.Plus, { LABEL: 'sign' }) }]));
    this.OR2({
      DEF: [
        { ALT: () => this.CONSUME(T.NumberLiteral, { LABEL: 'number' }) },
        { ALT: () => this.CONSUME(T.Inf, { LABEL: 'inf' }) },
        { GATE: () => !T.startsStatement(this.LA(1)), ALT: () => this.CONSUME(T.Name, { LABEL: 'name' }) },
      ],
      ERR_MSG: 'a number',
    });
  });

  private column = this.RULE('column', () => {
    this.OR({
      DEF: [
        { GATE: () => !T.startsStatement(this.LA(1)), ALT: () => this.CONSUME(T.Name, { LABEL: 'name' }) },
        { ALT: () => this.CONSUME(T.StringLiteral, { LABEL: 'quoted' }) },
      ],
      ERR_MSG: 'a column name',
    });
  });

  /** A name where a value is often still missing while typing (a keyword starting the next line is not taken). */
  private word = this.RULE('word', () => {
    this.OR({
      DEF: [{ GATE: () => !T.startsStatement(this.LA(1)), ALT: () => this.CONSUME(T.Name, { LABEL: 'name' }) }],
      ERR_MSG: 'a name',
    });
  });

  // ---- expressions -------------------------------------------------------
  // Flat on purpose: `operand (operator operand)*`, with prefix signs/not on
  // each operand. Precedence and associativity are applied when the syntax
  // tree is built (to-ast.ts, precedence climbing). One grammar rule per
  // operand instead of one per precedence level keeps parsing fast.

  public expression = this.RULE('expression', () => {
    this.SUBRULE(this.operand, { LABEL: 'operands' });
    this.MANY(() => {
      this.CONSUME(T.BinaryOperator, { LABEL: 'operators' });
      this.SUBRULE2(this.operand, { LABEL: 'operands' });
    });
  });

  private operand = this.RULE('operand', () => {
    this.MANY(() => this.CONSUME(T.PrefixOperator, { LABEL: 'prefix' }));
    this.OR({
      DEF: [
        { ALT: () => this.CONSUME(T.NumberLiteral, { LABEL: 'number' }) },
        { ALT: () => this.CONSUME(T.StringLiteral, { LABEL: 'quoted' }) },
        {
          GATE: () => !T.startsStatement(this.LA(1)),
          ALT: () => {
            this.CONSUME(T.Name, { LABEL: 'name' });
            this.OPTION(() => this.OR2([
              {
                ALT: () => {
                  this.CONSUME(T.LParen, { LABEL: 'call' });
                  this.MANY_SEP({ SEP: T.Comma, DEF: () => this.SUBRULE(this.expression, { LABEL: 'args' }) });
                  this.CONSUME(T.RParen, { LABEL: 'close' });
                },
              },
              {
                ALT: () => this.AT_LEAST_ONE(() => {
                  this.CONSUME(T.Dot, { LABEL: 'dot' });
                  // a quoted member names a group of a per-group fit: FIT."GROUP".PARAM (checked in check-derive.ts)
                  this.OR3([{ ALT: () => this.CONSUME2(T.Name, { LABEL: 'member' }) }, { ALT: () => this.CONSUME2(T.StringLiteral, { LABEL: 'member' }) }]);
                }),
              },
            ]));
          },
        },
        {
          ALT: () => {
            this.CONSUME2(T.LParen, { LABEL: 'open' });
            this.SUBRULE2(this.expression, { LABEL: 'inner' });
            this.CONSUME2(T.RParen, { LABEL: 'close' });
          },
        },
      ],
      ERR_MSG: 'a number, a name or (',
    });
  });
}

/** The one parser instance (chevrotain parsers are reusable: set `input`, call a rule). */
let instance: LsqParser | undefined;
export function getParser(): LsqParser {
  instance ??= new LsqParser();
  return instance;
}

export type { CstNode };
