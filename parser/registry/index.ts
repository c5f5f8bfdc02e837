/**
 * One registry per kind of name in the `.lsq` language (DEVELOPERS.md, "One
 * list, many forms"): functions, constants, statistics, methods, losses, fit
 * options, keywords. Each module holds the names with everything the parser
 * side knows about them; the engine adds behaviour keyed by the same names
 * (engine/compile/functions.ts, engine/run/statistics.ts) and the parity
 * tests in test/registry/ hold every other copy to them.
 */
export * from './functions';
export * from './constants';
export * from './statistics';
export * from './methods';
export * from './losses';
export * from './options';
export * from './keywords';
