/**
 * Degrees-of-freedom flags of engine/groups/flags.ts on real fits: groups with
 * as many rows as parameters (`no_dof`) and with two degrees of freedom
 * (`few_dof`), fitted by the runner from an invented per-group CSV.
 */
import { describe, expect, it } from 'vitest';
import { flagsOf } from '../../engine/groups/flags';
import { buildGroupTable, worstGroups } from '../../engine/groups/table';
import type { FitResult } from '../../engine/result';
import { THRESHOLDS } from '../../engine/thresholds';
import { normals, runSpec, tempDir, writeCsv } from '../run/helpers';

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
    expect(THRESHOLDS.minDof).toBe(3);
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

describe('engine/groups/flags poor_fit of a model nonlinear in its parameters', () => {
  // invented: a first-order decay per lot; lot "noisy" has the right shape under scatter
  // as large as the signal (low R², nothing systematic), lot "wave" a shape the model cannot follow
  const decay = `data d = "decay.csv"
fit decay on d {
  model y = a * exp(-k * t) + c
  param a = 10
  param k = 0.1 in [0, inf]
  param c = 1
  per lot
}`;

  it('is flagged by its runs test, not by R²', async () => {
    const dir = tempDir();
    const rows: (string | number)[][] = [];
    // seeded normal scatter (test/fixtures/random.ts); a regression case of this one seed, not a recovery claim
    const e = normals(7, 40);
    for (let i = 0; i < 40; i++) rows.push(['noisy', i, (5 * Math.exp(-0.1 * i) + 2 + 2 * e[i]).toFixed(4)]);
    for (let i = 0; i < 40; i++) rows.push(['wave', i, (10 * Math.exp(-0.05 * i) + 2 + 3 * Math.cos(i / 2)).toFixed(4)]);
    writeCsv(dir, 'decay.csv', ['lot', 't', 'y'], rows);
    const { result } = await runSpec(decay, dir);
    const byGroup = new Map(result.fits.map((f) => [f.group, f]));
    const noisy = byGroup.get('noisy')!;
    const wave = byGroup.get('wave')!;
    for (const f of [noisy, wave]) {
      expect(f.stop.converged, f.group).toBe(true);
      expect(f.warnings.map((w) => w.code), f.group).toContain('r2_nonlinear');
    }
    // the old rule (R² < 0.9 for every fit) flagged the right model under scatter
    expect(noisy.goodness.r2).toBeLessThan(0.9);
    expect(noisy.residuals.runs!.pValue).toBeGreaterThan(THRESHOLDS.groupFamilyAlpha);
    expect(wave.residuals.runs!.pValue).toBeLessThan(THRESHOLDS.groupFamilyAlpha / 2);
    const table = buildGroupTable(result.fits);
    expect(table.rows.filter((r) => r.flags.includes('poor_fit')).map((r) => r.group)).toEqual(['wave']);
  });
});

describe('engine/groups/flags poor_fit of the groups of a joint fit with absolute σ', () => {
  // Invented: four straight lines with a shared slope, σ = 0.1 stated and the noise drawn with σ = 0.1, so each
  // group's χ² is near its own ν ≈ 10 − 1.25; judged against the pooled ν (≈ 35) every group would look too good.
  const jointSpec = `data d = "lines.csv"
fit line on d {
  model y = a + b * x
  param a
  param b shared
  sigma 0.1
  per lot
}`;
  it('judges each group on its own χ² and its own degrees of freedom (jointShare.dof), not the pooled fit\'s', async () => {
    const dir = tempDir();
    const z = normals(20261203, 40);
    const rows: (string | number)[][] = [];
    ['L1', 'L2', 'L3', 'L4'].forEach((lot, g) => {
      for (let i = 0; i < 10; i++) rows.push([lot, i, 1 + g + 0.5 * i + 0.1 * z[10 * g + i]]);
    });
    writeCsv(dir, 'lines.csv', ['lot', 'x', 'y'], rows);
    const { result } = await runSpec(jointSpec, dir);
    expect(result.fits).toHaveLength(4);
    for (const f of result.fits) {
      expect(f.jointShare, f.group).toBeDefined();
      // ν of the group: 10 rows less its own a and a quarter of the shared b (a share by the hat-matrix trace)
      expect(f.jointShare!.dof).toBeGreaterThan(8);
      expect(f.jointShare!.dof).toBeLessThan(9);
      expect(f.goodness.dof).toBe(35);
      expect(flagsOf(f), f.group).not.toContain('poor_fit');
    }
  });
});
