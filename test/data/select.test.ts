import { describe, expect, it } from 'vitest';
import { parseCsvText } from '../../engine/data/csv';
import { selectRows } from '../../engine/data/select';
import type { DataTable } from '../../engine/data/types';

function table(text: string, decimal: '.' | ',' = '.'): DataTable {
  const r = parseCsvText(text, { file: 'd.csv', decimal });
  if (!r.ok) throw new Error(JSON.stringify(r.errors));
  return r.table;
}

describe('data/select selectRows', () => {
  const t = table('id,x,y,g\n1,0,1,A\n2,1,,A\n3,2,5,B\n4,3,7,NA\n5,4,9,B\n');

  it('returns used columns, dropping rows with missing cells and counting them', () => {
    const r = selectRows(t, { numeric: ['x', 'y'], file: 'd.csv' });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(Array.from(r.selection.columns[0])).toEqual([0, 2, 3, 4]);
    expect(Array.from(r.selection.columns[1])).toEqual([1, 5, 7, 9]);
    expect(Array.from(r.selection.lines)).toEqual([2, 4, 5, 6]);
    expect(r.selection.dropped).toBe(1);
  });

  it('ignores missing cells in columns that are not used', () => {
    const r = selectRows(t, { numeric: ['x'], file: 'd.csv' });
    expect(r.ok && r.selection.n).toBe(5);
  });

  it('reads labels and drops rows with a missing label', () => {
    const r = selectRows(t, { numeric: ['x', 'y'], label: 'g', file: 'd.csv' });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.selection.labels).toEqual(['A', 'B', 'B']);
    expect(r.selection.dropped).toBe(2);
    expect(r.selection.droppedLabels).toEqual(['A', '']);
  });

  it('applies a filter after dropping, without counting filtered rows as dropped', () => {
    const r = selectRows(t, {
      numeric: ['x', 'y'],
      file: 'd.csv',
      filter: (cols, n, out) => {
        for (let i = 0; i < n; i++) out[i] = cols[0][i] >= 2 ? 1 : 0;
      },
    });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(Array.from(r.selection.columns[0])).toEqual([2, 3, 4]);
    expect(r.selection.filteredOut).toBe(1);
    expect(r.selection.dropped).toBe(1);
  });

  it('locates non-numeric cells in used columns: file, line, column, value', () => {
    const r = selectRows(t, { numeric: ['x', 'g'], file: 'd.csv' });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors[0]).toMatchObject({ code: 'non_numeric_cell', file: 'd.csv', row: 2, column: 'g', value: 'A' });
    expect(r.errors.map((e) => e.row)).toEqual([2, 3, 4, 6]);
  });

  it('quotes cell text and column names on one line: a line break or a control inside a quoted cell is escaped', () => {
    const r = selectRows(table('x,"y\nnew"\n1,"two\nlines\u001b[2J"\n'), { numeric: ['y\nnew'], file: 'd.csv' });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors[0].value).toBe('two\nlines\u001b[2J'); // the exact text stays in the error's value
    expect(r.errors[0].message).toBe('d.csv:3:2: column "y\\u000anew" holds "two\\u000alines\\u001b[2J", not a number');
  });

  it('hints at a decimal comma', () => {
    const r = selectRows(table('x;y\n1;2,5\n'), { numeric: ['y'], file: 'd.csv' });
    expect(!r.ok && r.errors[0].message).toContain('decimal ","');
  });

  it('reports a missing column listing the header', () => {
    const r = selectRows(t, { numeric: ['x', 'temp'], file: 'd.csv' });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors[0]).toMatchObject({ code: 'missing_column', column: 'temp', row: 1 });
    expect(r.errors[0].message).toContain('"x"');
  });

  it('reports an ambiguous duplicate column', () => {
    const r = selectRows(table('x,x\n1,2\n'), { numeric: ['x'], file: 'd.csv' });
    expect(!r.ok && r.errors[0].code).toBe('duplicate_column');
  });
});
