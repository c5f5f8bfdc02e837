/**
 * Delimiter detection from the first record (the header).
 *
 * Rule (documented for users): count commas, semicolons and tabs outside
 * double quotes in the first record; the most frequent wins; ties are broken
 * in the order tab, semicolon, comma; a header with none of them is a single
 * column read as comma-separated. When the decimal mark is a comma, the comma
 * is not a candidate (the usual pairing is `;` with decimal `,`).
 */
import type { DecimalMark, Delimiter } from './types';

export function detectDelimiter(text: string, decimal: DecimalMark = '.'): Delimiter {
  const counts = { ',': 0, ';': 0, '\t': 0 };
  let inQuotes = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '"') inQuotes = !inQuotes; // an escaped quote "" toggles twice: no net change
    else if (!inQuotes && (c === '\n' || c === '\r')) break;
    else if (!inQuotes && (c === ',' || c === ';' || c === '\t')) counts[c]++;
  }
  if (decimal === ',') counts[','] = -1;
  const order: Delimiter[] = ['\t', ';', ','];
  let best: Delimiter = decimal === ',' ? ';' : ',';
  let bestCount = 0;
  for (const d of order) {
    if (counts[d] > bestCount) {
      best = d;
      bestCount = counts[d];
    }
  }
  return best;
}

/** Human-readable name of a delimiter for messages. */
export function delimiterName(d: Delimiter): string {
  return d === '\t' ? 'tab' : d === ';' ? 'semicolon' : 'comma';
}
