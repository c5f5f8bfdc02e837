/**
 * The forms of the registries (parser/registry/) that live in files other
 * than TypeScript: LANGUAGE.md's tables and the TextMate grammar's word
 * lists. test/registry/generated.test.ts checks that the files hold exactly
 * these; `npm run gen` writes them.
 */
import {
  FUNCTION_CATEGORY_TITLES, FUNCTION_NAMES, FUNCTION_SPECS, FIT_OPTION_SPECS, KEYWORD_NAMES, KEYWORD_SPECS, LOSSES, LOSS_SPECS,
  METHODS, METHOD_SPECS, STATISTICS, STATISTIC_SPECS, STATISTIC_UNIT_TEXT, CONSTANT_NAMES, keywordsWithRole,
  type FunctionCategory, type KeywordRole,
} from '../../parser/registry';
import { CODES } from '../../parser/messages';
import { QUERY_MEMBERS, QUERY_MEMBER_SPECS } from '../../parser/registry/statistics';

/** A table cell: `|` escaped. */
const cell = (s: string) => s.replace(/\|/g, '\\|');
const code = (s: string) => `\`${cell(s)}\``;
const table = (head: readonly string[], rows: readonly (readonly string[])[]) =>
  [`| ${head.join(' | ')} |`, `|${head.map(() => '---').join('|')}|`, ...rows.map((r) => `| ${r.join(' | ')} |`)].join('\n');

export function functionsTable(): string {
  const order = Object.keys(FUNCTION_CATEGORY_TITLES) as FunctionCategory[];
  const names = [...FUNCTION_NAMES].sort((a, b) => order.indexOf(FUNCTION_SPECS[a].category) - order.indexOf(FUNCTION_SPECS[b].category));
  return table(['Function', 'Kind', 'Meaning'], names.map((f) => [code(FUNCTION_SPECS[f].signature), FUNCTION_CATEGORY_TITLES[FUNCTION_SPECS[f].category], cell(FUNCTION_SPECS[f].doc)]));
}

export function statisticsTable(): string {
  return table(['Statistic', 'Meaning', 'Unit'], STATISTICS.map((s) => [code(s), cell(STATISTIC_SPECS[s].doc), STATISTIC_UNIT_TEXT[STATISTIC_SPECS[s].unit]]));
}

export function optionsTable(): string {
  const keys = Object.keys(FIT_OPTION_SPECS) as (keyof typeof FIT_OPTION_SPECS)[];
  return table(['Item', 'Meaning', 'Default'], keys.map((k) => [code(FIT_OPTION_SPECS[k].syntax), cell(FIT_OPTION_SPECS[k].meaning), cell(FIT_OPTION_SPECS[k].default)]));
}

export function methodsTable(): string {
  return table(['Method', 'Solver'], METHODS.map((m) => [code(m), cell(METHOD_SPECS[m].doc)]));
}

export function lossesTable(): string {
  return table(['Loss', 'ρ(z), z = (residual / scale)²', 'Meaning'], LOSSES.map((l) => [code(l), cell(LOSS_SPECS[l].rho), cell(LOSS_SPECS[l].doc)]));
}

const ROLE_TITLES: Readonly<Record<KeywordRole, string>> = {
  declaration: 'statements that declare', query: 'statements that query or check', data_option: 'data options', fit_item: 'fit items',
  part: 'words inside a statement', operator: 'logical operators (reserved)', constant: 'constant (reserved)',
};

export function keywordsTable(): string {
  const roles = Object.keys(ROLE_TITLES) as KeywordRole[];
  return table(['Role', 'Keywords'], roles.map((r) => [ROLE_TITLES[r], keywordsWithRole(r).map(code).join(' ')]));
}

export function diagnosticsTable(): string {
  return table(['Code', 'Severity', 'When'], Object.entries(CODES).map(([c, d]) => [code(c), d.severity, d.when]));
}

export function queryMembersTable(): string {
  return table(['Number', 'Of', 'Meaning'], QUERY_MEMBERS.map((m) => [code(m), QUERY_MEMBER_SPECS[m].query, cell(QUERY_MEMBER_SPECS[m].doc.replace(/^[^ ]+ - /, ''))]));
}

/** The generated sections of parser/LANGUAGE.md, by marker name. */
export const LANGUAGE_SECTIONS: Readonly<Record<string, () => string>> = {
  options: optionsTable,
  methods: methodsTable,
  losses: lossesTable,
  functions: functionsTable,
  statistics: statisticsTable,
  keywords: keywordsTable,
  diagnostics: diagnosticsTable,
  'query members': queryMembersTable,
};

export const BEGIN = (name: string) => `<!-- generated from parser/registry: ${name} (npm run gen) -->`;
export const END = (name: string) => `<!-- end of generated: ${name} -->`;

/** The text with every generated section replaced by its rendering; throws when a marker is missing. */
export function withSections(text: string, sections: Readonly<Record<string, () => string>>): string {
  let out = text;
  for (const [name, render] of Object.entries(sections)) {
    const b = out.indexOf(BEGIN(name));
    const e = out.indexOf(END(name));
    if (b < 0 || e < b) throw new Error(`LANGUAGE.md has no generated section "${name}" (markers ${BEGIN(name)} … ${END(name)})`);
    out = `${out.slice(0, b + BEGIN(name).length)}\n${render()}\n${out.slice(e)}`;
  }
  return out;
}

const alt = (words: readonly string[]) => words.join('|');

/** The TextMate grammar's entries made of registry words (repository.keyword, .value, .function, .constant). */
export function grammarLists(): Record<string, unknown> {
  return {
    keyword: {
      patterns: [
        { match: `^\\s*(${alt(keywordsWithRole('declaration'))})\\b`, name: 'storage.type.lsq' },
        { match: `^\\s*(${alt(keywordsWithRole('query'))})\\b`, name: 'keyword.control.query.lsq' },
        { match: `^\\s*(${alt(keywordsWithRole('fit_item'))})\\b`, name: 'keyword.other.fit.lsq' },
        { match: `\\b(${alt(keywordsWithRole('data_option', 'part'))})\\b`, name: 'keyword.other.lsq' },
        { match: `\\b(${alt(keywordsWithRole('operator'))})\\b`, name: 'keyword.operator.logical.lsq' },
      ],
    },
    value: { match: `\\b(${alt([...METHODS, ...LOSSES])})\\b`, name: 'support.constant.option.lsq' },
    function: { match: `\\b(${alt(FUNCTION_NAMES)})\\s*(?=\\()`, name: 'support.function.builtin.lsq' },
    constant: { match: `\\b(${alt(CONSTANT_NAMES)})\\b`, name: 'constant.language.lsq' },
  };
}

/** Every word of the language's registries (for checking hand-written grammar patterns). */
export const REGISTRY_WORDS: ReadonlySet<string> = new Set<string>([...KEYWORD_NAMES, ...METHODS, ...LOSSES, ...FUNCTION_NAMES, ...CONSTANT_NAMES, ...STATISTICS]);
