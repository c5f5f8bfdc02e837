/**
 * Limits that keep the parser, the checker and the compiler within bounded
 * time and stack for any text (editors run them on every keystroke). Each
 * value is far above what people write and far below where the machinery
 * would fail; the measurements behind them are in the comments and in
 * test/parser/limits.test.ts.
 */

/**
 * Deepest nesting of an expression: parentheses and function calls
 * (`exp(exp(x))` is 2 deep), and operators whose operand is itself an
 * operation — signs (`- - x`), powers (`x^y^z`, right-associative),
 * comparisons and `not`. A chain of `+ -`, `* /`, `and` or `or` at one level
 * counts once however long it is (`a + b + … + z` is 1 deep), so long sums
 * are not limited.
 *
 * Why 100: hand-written models nest a handful of levels (the deepest of the
 * samples and test specs nests 6). The recursive-descent parser (chevrotain) is the deepest
 * consumer, and it is deepest in a cold process (interpreted frames are
 * larger than optimised ones). Measured 2026-12-03 with the limit lifted,
 * Node 20.20.2, default 984 KiB stack, `leastwise check` in a fresh process:
 * nested calls `exp(exp(…))` overflow between 300 and 350 levels, nested
 * parentheses between 600 and 700; `leastwise fit` of a run of signs
 * (parse, check, plan, compile and fit) between 2,400 and 2,800. Inside the
 * test runner, once warm, calls reach 925 levels. 100 keeps a margin of three
 * for callers that start deeper in the stack (the editor's extension host).
 * test/parser/limits.test.ts checks the margin (the parser alone reads 250
 * nested calls) and the limit itself at 100 and 101 levels.
 */
export const MAX_NESTING = 100;

/**
 * Work budget of the "did you mean" lookups of one check, in table cells of
 * the bounded edit distance (suggest.ts; each candidate looked at also counts
 * one). Once spent, later unknown names are still reported, without
 * suggestions. Why 2·10⁷: an ordinary spec spends a few thousand (a typo
 * against a 100-column header costs about 1,500); the budget lets the first
 * ~25 unknown names of a spec be compared with a 10,000-column header of
 * look-alike names (`sensor_0000` …), and costs about 0.1 s when spent
 * (measured with benchmark 11, `npm run bench -- --only 11`).
 */
export const MAX_SUGGEST_CELLS = 20_000_000;
