/**
 * Delimiter detection from the header line.
 *
 * Rule (documented for users): in the first line that holds anything but
 * spaces, tabs, commas, semicolons and quotes (the header; a quoted line
 * break continues the line), count commas, semicolons and tabs outside double
 * quotes; the most frequent wins; ties are broken in the order tab,
 * semicolon, comma; a header with none of them is a single column read as
 * comma-separated. When the decimal mark is a comma, the comma is not a
 * candidate (the usual pairing is `;` with decimal `,`). The CSV scanner
 * (`csv-scan.ts`) applies the same rule to bytes; a test checks they agree.
 */
import type { DecimalMark, Delimiter } from './types';

export function detectDelimiter(text: string, decimal: DecimalMark = '.'): Delimiter {
  let comma = 0;
  let semicolon = 0;
  let tab = 0;
  let content = false;
  let inQuotes = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '"') inQuotes = !inQuotes; // an escaped quote "" toggles twice: no net change
    else if (inQuotes) {
      if (!' \t\r\n,;'.includes(c)) content = true;
    } else if (c === '\n' || c === '\r') {
      if (content) break;
      comma = semicolon = tab = 0;
    } else if (c === ',') comma++;
    else if (c === ';') semicolon++;
    else if (c === '\t') tab++;
    else if (c !== ' ' && c !== '\uFEFF') content = true;
  }
  return pickDelimiter(comma, semicolon, tab, decimal);
}

/** The delimiter from the counts of one line, by the rule above. */
export function pickDelimiter(comma: number, semicolon: number, tab: number, decimal: DecimalMark): Delimiter {
  const counts: [Delimiter, number][] = [['\t', tab], [';', semicolon], [',', decimal === ',' ? -1 : comma]];
  let best: Delimiter = decimal === ',' ? ';' : ',';
  let bestCount = 0;
  for (const [d, k] of counts) {
    if (k > bestCount) {
      best = d;
      bestCount = k;
    }
  }
  return best;
}

/** Human-readable name of a delimiter for messages. */
export function delimiterName(d: Delimiter): string {
  return d === '\t' ? 'tab' : d === ';' ? 'semicolon' : 'comma';
}
