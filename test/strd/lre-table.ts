/** The plain-text tables of the StRD harness (strd-cli.ts, pipeline.ts, no-start.ts): one aligner and one way to print the LRE columns. */

/** The LRE columns every StRD table shows, in this order. */
export const LRE_HEADERS = ['LRE params', 'LRE SE', 'LRE RSS'] as const;

/** LREs to one decimal; `*` after the RSS where the floor rule applied (run-strd.ts). */
export function lreCells(r: { minLreParams: number; minLreSE: number; lreRSS: number; floor: boolean }): string[] {
  return [r.minLreParams.toFixed(1), r.minLreSE.toFixed(1), r.lreRSS.toFixed(1) + (r.floor ? '*' : '')];
}

/** Columns padded to their widest cell (those with `right(k)` right-aligned), two spaces apart, the header over a rule of dashes. */
export function plainTable(head: readonly string[], body: readonly string[][], right: (k: number) => boolean): string {
  const widths = head.map((h, k) => body.reduce((w, b) => Math.max(w, b[k].length), h.length));
  const line = (cells: readonly string[]) => cells.map((c, k) => (right(k) ? c.padStart(widths[k]) : c.padEnd(widths[k]))).join('  ');
  return [line(head), line(widths.map((w) => '-'.repeat(w))), ...body.map(line)].join('\n');
}
