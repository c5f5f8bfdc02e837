import { describe, expect, it } from 'vitest';
import type { FitResult } from '../../../engine/result';
import { flaggedPointRows } from '../../../engine/front/views/influence';
import { rng } from '../../fixtures/random';

/** The rows the lists name, distinct and in ascending order, each with its flags in list order (the straightforward reading of the rule). */
function reference(inf: { exact: number[]; outliers: { row: number }[]; influential: number[]; highLeverage: number[] }): { rows: number[]; flags: Map<number, number> } {
  const flags = new Map<number, number>();
  for (const r of [...inf.exact, ...inf.outliers.map((o) => o.row), ...inf.influential, ...inf.highLeverage]) flags.set(r, (flags.get(r) ?? 0) + 1);
  return { rows: [...flags.keys()].sort((a, b) => a - b), flags };
}

describe('engine/front/views/influence flaggedPointRows', () => {
  it('shows the first 20 distinct flagged rows with all their flags and counts the rest, from overlapping unsorted lists', () => {
    const next = rng(11);
    const n = 5000;
    const pick = (k: number) => Array.from({ length: k }, () => 2 + Math.floor(next() * n));
    const inf = { exact: pick(3), outliers: pick(5).map((row) => ({ row, pValue: 0.01 })), influential: pick(40), highLeverage: pick(400) };
    const rowNumbers = Array.from({ length: n }, (_, i) => i + 2).reverse();
    const column = () => rowNumbers.map(() => next());
    const fit = {
      response: 'y', predictor: 'x',
      points: { row: rowNumbers, x: column(), y: column(), fitted: column(), leverage: column(), cooksDistance: column(), deletedStudentized: column() },
      influence: { ...inf, notable: [], linearised: false, cooksCutoff: 1, leverageCutoff: 0.01, cooksNotice: 0.001 },
    } as unknown as FitResult;
    const out = flaggedPointRows(fit);
    const ref = reference(inf);
    expect(out.rows.map((r) => Number(r[0].replace(/,/g, '')))).toEqual(ref.rows.slice(0, 20));
    expect(out.more).toBe(ref.rows.length - 20);
    for (const r of out.rows) expect(r[r.length - 1].split('; ').length).toBe(ref.flags.get(Number(r[0].replace(/,/g, ''))));
    // the figures are those of the row's own index in the points table
    const first = out.rows[0];
    const i = rowNumbers.indexOf(ref.rows[0]);
    expect(first[1]).not.toBe('n/a');
    expect(i).toBeGreaterThanOrEqual(0);
  });
});
