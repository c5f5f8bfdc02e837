import { describe, expect, it } from 'vitest';
import { analyze } from '../../parser/index';
import { compileColumnExpr } from '../../engine/compile';
import { parseCsvText } from '../../engine/data/csv';
import { prepareFitData, sortGroupLabels } from '../../engine/run/fit-data';

function prepare(spec: string, csv: string) {
  const { plan } = analyze(spec);
  const t = parseCsvText(csv, { file: 'd.csv' });
  if (!t.ok) throw new Error('csv');
  return prepareFitData(plan.fits[0], plan.data[0], t.table, compileColumnExpr);
}

describe('run/fit-data prepareFitData', () => {
  it('sorts group labels numerically when all are numbers, else by code point', () => {
    expect(sortGroupLabels(['10', '9', '2.5', '-1'])).toEqual(['-1', '2.5', '9', '10']);
    expect(sortGroupLabels(['b', 'B', 'a', '10', '9'])).toEqual(['10', '9', 'B', 'a', 'b']);
  });

  it('evaluates the response expression, weights from σ and the filter', () => {
    const r = prepare(`data d = "d.csv" where x > 0
fit f on d {
  model ln(y) = a + b * x
  param a
  param b
  sigma s
}`, 'x,y,s\n0,1,1\n1,2.718281828459045,0.5\n2,7.38905609893065,2\n');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const d = r.data[0];
    expect(d.n).toBe(2);
    expect(Array.from(d.lines)).toEqual([3, 4]);
    expect(d.y[0]).toBeCloseTo(1, 14);
    expect(Array.from(d.weights!)).toEqual([4, 0.25]);
    expect(d.sigmaAbsolute).toBe(true);
    expect(d.predictor).toBe('x');
  });

  it('locates a non-positive σ and a response that is not finite', () => {
    const r = prepare(`data d = "d.csv"
fit f on d {
  model ln(y) = a + b * x
  param a
  param b
  sigma s
}`, 'x,y,s\n0,1,1\n1,-2,0\n');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors.map((e) => [e.code, e.row])).toEqual([['non_finite_response', 3], ['bad_sigma', 3]]);
    expect(r.errors[1].range).toBeDefined();
  });

  it('splits groups and counts dropped rows per group', () => {
    const r = prepare(`data d = "d.csv"
fit f on d {
  model y = a * x
  param a
  per lot
}`, 'lot,x,y\n2,1,1\n10,1,2\n2,2,NA\n10,2,4\n,3,3\n');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.data.map((d) => [d.group, d.n, d.rowsDropped, d.rowsWithoutGroup])).toEqual([['2', 1, 1, 1], ['10', 2, 0, 1]]);
    expect(Array.from(r.data[1].lines)).toEqual([3, 5]);
  });
});

describe('run/fit-data weight 0 and empty data', () => {
  const GROUPED = `data d = "d.csv"
fit f on d {
  model y = a + b * x
  param a
  param b
  weight w
  per g
}`;

  it('keeps weight-0 rows apart, per group, with their lines and values', () => {
    const r = prepare(GROUPED, 'g,x,y,w\nA,1,2,1\nB,1,5,0\nA,2,4,0\nB,2,6,1\nA,3,6,1\nB,3,7,1\nC,1,1,0\n');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.data.map((d) => d.group)).toEqual(['A', 'B', 'C']);
    const [a, b, c] = r.data;
    expect([a.n, Array.from(a.lines), Array.from(a.excluded!.lines), Array.from(a.excluded!.y)]).toEqual([2, [2, 6], [4], [4]]);
    expect([b.n, Array.from(b.lines), Array.from(b.excluded!.lines), Array.from(b.excluded!.x!)]).toEqual([2, [5, 7], [3], [1]]);
    // a group whose rows all have weight 0 stays a group, with no rows to fit
    expect([c.n, Array.from(c.excluded!.lines)]).toEqual([0, [8]]);
    expect(Array.from(a.weights!)).toEqual([1, 1]);
  });

  it('no row of the table, or none left after dropping, is a located no_rows error', () => {
    const header = prepare(GROUPED, 'g,x,y,w\r\n');
    expect(!header.ok && header.errors[0]).toMatchObject({ code: 'no_rows', row: 1, file: 'd.csv' });
    const missing = prepare(GROUPED, 'g,x,y,w\nA,1,,1\n,2,3,1\n');
    expect(!missing.ok && missing.errors[0]).toMatchObject({ code: 'no_rows', row: 2, field: 3, column: 'y' });
    // the label column comes first in the header: its missing cell is the place
    const label = prepare(GROUPED, 'g,x,y,w\n,1,2,1\n');
    expect(!label.ok && label.errors[0]).toMatchObject({ code: 'no_rows', row: 2, field: 1, column: 'g' });
  });
});
