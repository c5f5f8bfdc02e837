/**
 * Tables of the results panel as tab-separated text for the clipboard (to
 * paste into a spreadsheet or a lab notebook): one line per row, the header
 * first, cells as the panel shows them (the CLI's digits). A tab or line
 * break inside a cell becomes a space, so every line keeps its columns.
 *
 * Pure: strings in, string out.
 */

/** A cell made safe for one TSV field. */
export function tsvCell(text: string): string {
  return text.replace(/[\t\r\n]+/g, ' ').trim();
}

/** `headers` and `rows` as TSV, lines ended by "\n". */
export function toTsv(headers: readonly string[], rows: readonly (readonly string[])[]): string {
  return [headers, ...rows].map((r) => r.map(tsvCell).join('\t')).join('\n') + '\n';
}

/** Largest chart image the page may hand to the host to save (a 2× PNG of a wide chart is well under 4 MB). */
export const MAX_IMAGE_CHARS = 20_000_000;

/** A file name for a saved chart: the chart's title with characters other than letters, digits, `.`, `_` and `-` as `-`. */
export function chartImageName(title: string, format: 'png' | 'svg'): string {
  const stem = title.replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^[-.]+|-+$/g, '').slice(0, 80) || 'chart';
  return `${stem}.${format}`;
}
