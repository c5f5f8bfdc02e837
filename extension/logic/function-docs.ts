/**
 * Documentation lookups for hover and completion, from the registries of
 * names (parser/registry/), so the editor and LANGUAGE.md say the same thing.
 */
import {
  CONSTANT_SPECS, KEYWORD_SPECS, STATISTIC_SPECS, STATISTIC_UNIT_TEXT, isMember, MEMBER_SPECS,
  functionSpec, isConstantName, isKeyword, isStatisticName,
} from '../../parser/registry';

export interface FunctionDoc {
  signature: string;
  summary: string;
}

/** Documentation of a whitelisted function, or undefined. */
export function functionDoc(name: string): FunctionDoc | undefined {
  const d = functionSpec(name);
  return d ? { signature: d.signature, summary: d.doc } : undefined;
}

export function keywordDoc(word: string): string | undefined {
  return isKeyword(word) ? KEYWORD_SPECS[word].doc : undefined;
}

/** A statistic's doc line and its unit (`se` after a parameter: its standard error). */
export function statisticDoc(name: string): string | undefined {
  if (isMember(name)) return MEMBER_SPECS[name].doc;
  if (!isStatisticName(name)) return undefined;
  const s = STATISTIC_SPECS[name];
  return `${s.doc} (${STATISTIC_UNIT_TEXT[s.unit]})`;
}

export function constantDoc(name: string): string | undefined {
  return isConstantName(name) ? CONSTANT_SPECS[name].doc : undefined;
}
