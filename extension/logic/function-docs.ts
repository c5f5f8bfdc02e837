/**
 * Documentation lookups for hover and completion, from the parser's docs
 * modules (parser/functions-doc.ts, parser/keyword-doc.ts), so the editor
 * and LANGUAGE.md say the same thing.
 */
import { CONSTANT_DOCS, FUNCTION_DOCS } from '../../parser/functions-doc';
import { KEYWORD_DOCS, STATISTIC_DOCS, STDERR_DOC } from '../../parser/keyword-doc';
import { isFunctionName } from '../../parser/plan';

export interface FunctionDoc {
  signature: string;
  summary: string;
}

/** Documentation of a whitelisted function, or undefined. */
export function functionDoc(name: string): FunctionDoc | undefined {
  if (!isFunctionName(name)) return undefined;
  const d = FUNCTION_DOCS[name];
  return { signature: d.signature, summary: d.doc };
}

export function keywordDoc(word: string): string | undefined {
  return Object.prototype.hasOwnProperty.call(KEYWORD_DOCS, word) ? KEYWORD_DOCS[word] : undefined;
}

export function statisticDoc(name: string): string | undefined {
  if (name === 'se') return STDERR_DOC;
  return Object.prototype.hasOwnProperty.call(STATISTIC_DOCS, name) ? STATISTIC_DOCS[name as keyof typeof STATISTIC_DOCS] : undefined;
}

export function constantDoc(name: string): string | undefined {
  return name === 'pi' || name === 'e' || name === 'inf' ? CONSTANT_DOCS[name] : undefined;
}
