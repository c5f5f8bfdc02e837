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
