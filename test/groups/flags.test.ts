/**
 * Degrees-of-freedom flags of engine/groups/flags.ts on real fits: groups with
 * as many rows as parameters (`no_dof`) and with two degrees of freedom
 * (`few_dof`), fitted by the runner from an invented per-group CSV.
 */
import { describe, expect, it } from 'vitest';
import { flagsOf } from '../../engine/groups/flags';
import { buildGroupTable, worstGroups } from '../../engine/groups/table';
import type { FitResult } from '../../engine/result';
import { THRESHOLDS as WARNING_THRESHOLDS } from '../../engine/thresholds';
import { runSpec, tempDir, writeCsv } from '../run/helpers';

const spec = `data d = "lines.csv"
fit line on d {
  model y = a + b * x
  param a
  param b
  per lot
}`;

async function fits(): Promise<FitResult[]> {
  const dir = tempDir();
  const rows: (string | number)[][] = [];
  // lot "ok": 8 points (6 dof); "four": 4 points (2 dof); "two": 2 points (0 dof); "one": 1 point (fails)
  for (let i = 0; i < 8; i++) rows.push(['ok', i, 1 + 0.5 * i + 0.01 * Math.sin(7 * i)]);
  for (let i = 0; i < 4; i++) rows.push(['four', i, 2 + 0.3 * i + 0.02 * Math.cos(5 * i)]);
  rows.push(['two', 0, 1], ['two', 1, 3], ['one', 0, 1]);
  writeCsv(dir, 'lines.csv', ['lot', 'x', 'y'], rows);
  const { result } = await runSpec(spec, dir);
  return result.fits;
}

describe('engine/groups/flags degrees of freedom', () => {
  it('flags no_dof (n = p) and few_dof (0 < n − p < 3), failed stays exclusive', async () => {
    const byGroup = new Map((await fits()).map((f) => [f.group, f]));
    expect(WARNING_THRESHOLDS.minDof).toBe(3);
    expect(byGroup.get('ok')!.goodness.dof).toBe(6);
    expect(flagsOf(byGroup.get('ok')!)).toEqual([]);
    expect(byGroup.get('four')!.goodness.dof).toBe(2);
    expect(flagsOf(byGroup.get('four')!)).toEqual(['few_dof']);
    expect(byGroup.get('two')!.goodness.dof).toBe(0);
    expect(byGroup.get('two')!.stop.converged).toBe(true);
    expect(flagsOf(byGroup.get('two')!)).toEqual(['no_dof']);
    expect(flagsOf(byGroup.get('one')!)).toEqual(['failed']);
    expect(flagsOf(byGroup.get('four')!, { minDof: 2 })).toEqual([]);
  });

  it('counts them in the summary and ranks no_dof above few_dof among the worst groups', async () => {
    const t = buildGroupTable(await fits());
    expect(t.summary).toMatchObject({ groups: 4, failed: 1, noDof: 1, fewDof: 1, flagged: 3 });
    expect(worstGroups(t, 4).map((r) => r.group)).toEqual(['one', 'two', 'four', 'ok']);
  });
});
