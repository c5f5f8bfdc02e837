/**
 * engine/front/views/table.ts: every number column of a text or Markdown table
 * in one notation (engine/format.ts rule 6), fixed columns aligned on the
 * decimal point in text; the results panel's tables take the same notation
 * (extension/logic/panel-align.ts `panelNumberColumns`), so a column reads the
 * same in all three.
 */
import { describe, expect, it } from 'vitest';
import { alignDecimals, markdownTable, textTable } from '../../../engine/front/views/table';
import { panelNumberColumns } from '../../../extension/logic/panel-align';
import { MISSING } from '../../../engine/format';

const HEADERS = ['name', 'estimate', 'p', 'note'];
// a mixed column (fixed beside exponent), a fixed column with a missing value and the p floor, a text column
const ROWS = [
  ['k1', '0.0011280465', '0.0421', 'ok'],
  ['k2', '8.69597e-8', '< 0.0001', '2 rows'],
  ['k3', '-0.25', MISSING, ''],
  ['k4', '0', '0.5', '1e-9 in a note'],
];
const ALIGN = ['left', 'right', 'right', 'left'] as const;

/** The cells of column `c` in the body of a text table (the extents of the rule's dashes). */
function textColumn(lines: string[], c: number): string[] {
  const extents = [...lines[1].matchAll(/-+/g)].map((m) => [m.index!, m.index! + m[0].length]);
  const [a, b] = extents[c];
  return lines.slice(2).map((l) => l.slice(a, b).trim());
}

describe('engine/front/views/table', () => {
  it('text: a mixed column all in exponent notation, a fixed one aligned on the point, text left alone', () => {
    const lines = textTable(HEADERS, ROWS.map((r) => [...r]), [...ALIGN]);
    expect(textColumn(lines, 1)).toEqual(['1.1280465e-3', '8.69597e-8', '-2.5e-1', '0']);
    // the p column stays fixed: the decimal points of 0.0421 and 0.5 in one place, n/a and < 0.0001 as written
    const body = lines.slice(2);
    const point = (l: string, cell: string) => l.indexOf(cell) + cell.indexOf('.');
    expect(point(body[0], '0.0421')).toBe(point(body[3], '0.5'));
    expect(body[1]).toContain('< 0.0001');
    expect(body[2]).toContain(MISSING);
    expect(textColumn(lines, 3)).toEqual(['ok', '2 rows', '', '1e-9 in a note']);
  });

  it('Markdown: the same notation per column as the text table', () => {
    const md = markdownTable(HEADERS, ROWS.map((r) => [...r]), [...ALIGN]);
    const cells = md.slice(2).map((l) => l.slice(2, -2).split(' | '));
    expect(cells.map((r) => r[1])).toEqual(['1.1280465e-3', '8.69597e-8', '-2.5e-1', '0']);
    expect(cells.map((r) => r[2])).toEqual(['0.0421', '&lt; 0.0001', MISSING, '0.5']); // `<` escaped for Markdown (escape.ts)
  });

  it('panel: numeric columns in the same notation as the CLI, the row labels and text columns unchanged', () => {
    const panel = panelNumberColumns(ROWS, (j) => j === 1 || j === 2);
    const text = textTable(HEADERS, ROWS.map((r) => [...r]), [...ALIGN]);
    for (const c of [1, 2]) expect(panel.map((r) => r[c])).toEqual(textColumn(text, c));
    expect(panel.map((r) => r[0])).toEqual(ROWS.map((r) => r[0]));
    expect(panel.map((r) => r[3])).toEqual(ROWS.map((r) => r[3]));
    // the input rows are not changed (the panel's Copy takes them as given)
    expect(ROWS[0][1]).toBe('0.0011280465');
  });

  it('aligns fixed cells on the point: padding after the number, a space for a missing point', () => {
    expect(alignDecimals(['0.056', '1.0048', '12', MISSING, '-3.5'])).toEqual(['0.056 ', '1.0048', '12     ', MISSING, '-3.5   ']);
    expect(alignDecimals(['1', '22', '333'])).toEqual(['1', '22', '333']);
  });
});

describe('engine/front/views/table mixed tables', () => {
  it('keeps each value\'s own notation in a table whose rows are different quantities (the summary across groups)', () => {
    const headers = ['', 'median', 'IQR'];
    const rows = [['ec50', '44.4874', '4.39'], ['R²', '0.999159', '4.152e-5']];
    const mixed = textTable(headers, rows.map((r) => [...r]), ['left', 'right', 'right'], '  ', { mixed: true });
    expect(textColumn(mixed, 2)).toEqual(['4.39', '4.152e-5']);
    const md = markdownTable(headers, rows.map((r) => [...r]), ['left', 'right', 'right'], { mixed: true });
    expect(md.slice(2).map((l) => l.split('|')[3].trim())).toEqual(['4.39', '4.152e-5']);
    // without it, the column rule puts the whole column in exponent form
    const one = textTable(headers, rows.map((r) => [...r]), ['left', 'right', 'right']);
    expect(textColumn(one, 2)[0]).toMatch(/e[+-]\d+$/);
  });
});
