import { describe, expect, it } from 'vitest';
import { adjustGroupWarnings, durbinWatsonP, holmRejected } from '../../engine/groups/flags';
import { rng } from '../fixtures/random';
import { normals, runSpec, tempDir, writeCsv } from '../run/helpers';
import type { FitResult } from '../../engine/result';

// the warnings that rest on a test (the influence rules of thumb have no p-value and are not adjusted)
const RESIDUAL_CODES = ['residual_pattern', 'non_normal_residuals', 'curvature', 'lack_of_fit', 'outlier'];
const residualWarned = (fits: readonly FitResult[]) => fits.filter((f) => f.warnings.some((w) => RESIDUAL_CODES.includes(w.code))).length;

describe('groups/flags adjustGroupWarnings (Holm 1979 across the groups)', () => {
  it("Holm's step-down procedure by hand", () => {
    // Holm 1979: sorted p 0.005, 0.01, 0.03, 0.04 against 0.05/4, 0.05/3, 0.05/2, 0.05/1 = 0.0125, 0.0167, 0.025, 0.05:
    // the first two pass, 0.03 > 0.025 stops (by hand; the Holm-adjusted p-values, min(1, running max of (m − j + 1)·p₍ⱼ₎),
    // are 0.02, 0.03, 0.06, 0.06 — numpy 2.x: np.maximum.accumulate(np.array([4, 3, 2, 1]) * [0.005, 0.01, 0.03, 0.04]))
    expect(holmRejected([0.01, 0.04, 0.03, 0.005], 0.05)).toEqual([true, false, false, true]);
    // the same four at the per-test level alone would all pass 0.05: the adjustment is what drops two
    expect([0.01, 0.04, 0.03, 0.005].every((p) => p < 0.05)).toBe(true);
  });

  it('Durbin–Watson p by the large-sample normal approximation d ~ N(2, 4/n)', () => {
    // scipy 1.17.1 / numpy 2.4.6: 2 * norm.sf(abs(0.962296 - 2) / (2 / sqrt(14))) = 0.05221384854502667
    expect(durbinWatsonP(0.962296, 14)).toBeCloseTo(0.05221384854502667, 12);
    expect(durbinWatsonP(2, 14)).toBe(1);
  });

  it('with pure-noise p-values the chance of any flag in a family of 96 is the nominal 5 %, not 96 × 5 %', () => {
    // 4000 families of 96 independent uniform p-values (true nulls): Holm's family-wise error rate is
    // 1 − (1 − 0.05/96)^96 = 0.04878 (by hand; Holm 1979 guarantees ≤ 0.05 under any dependence)
    const u = rng(20261203);
    let familiesFlagged = 0;
    let rawFlags = 0;
    const families = 4000;
    for (let f = 0; f < families; f++) {
      const ps = Array.from({ length: 96 }, () => u());
      rawFlags += ps.filter((p) => p < 0.05).length;
      if (holmRejected(ps, 0.05).some(Boolean)) familiesFlagged++;
    }
    // binomial sd of the rate: √(0.0488·0.9512/4000) = 0.0034; ±4 sd
    expect(familiesFlagged / families).toBeGreaterThan(0.0488 - 0.0136);
    expect(familiesFlagged / families).toBeLessThan(0.0488 + 0.0136);
    // unadjusted: about 4.8 flags per family of 96 (sd of the mean 0.034)
    expect(rawFlags / families).toBeGreaterThan(4.8 - 0.15);
    expect(rawFlags / families).toBeLessThan(4.8 + 0.15);
  });

  it('fits of pure-noise groups: the raw per-group warnings come at about their nominal rate, the adjusted ones almost never; a real defect stays flagged and names the method', async () => {
    const dir = tempDir();
    const groups = 150;
    const n = 14;
    const z = normals(424242, groups * n);
    const rows: (string | number)[][] = [];
    for (let g = 0; g < groups; g++) {
      for (let i = 0; i < n; i++) {
        const x = i;
        // every group a straight line with normal scatter, except group 'bent', which curves strongly
        const bend = g === 0 ? 0.08 * (x - 6.5) ** 2 : 0;
        rows.push([g === 0 ? 'bent' : `w${g}`, x, (1 + 0.3 * x + bend + 0.05 * z[g * n + i]).toFixed(6)]);
      }
    }
    writeCsv(dir, 'plate.csv', ['well', 'x', 'y'], rows);
    const spec = 'data d = "plate.csv"\nfit line on d {\n  model y = a + b * x\n  param a = 0\n  param b = 0\n  per well\n}';
    const { result } = await runSpec(spec, dir);
    const fits = result.fits;
    expect(fits).toHaveLength(groups);
    // the raw decisions: each group's own tests at their single-fit levels (1 %, 1 %, 1 %, outliers 5 % family-wise per fit)
    const raw = fits.map((f) => ({ ...f, warnings: [...f.warnings, ...(f.setAside ?? [])] })).filter((f) => f.group !== 'bent');
    const rawCount = residualWarned(raw);
    // nominal rate of a noise group getting at least one, by hand: runs, Shapiro–Wilk, curvature at 1 % each, the
    // outlier test at 5 %, the Durbin–Watson band |d − 2| > 1 about 6.1 % at n = 14 (2·P(Z > 1/(2/√14)), d ~ N(2, 4/n)):
    // 1 − 0.99³·0.95·0.939 ≈ 0.135 (the tests are not independent: loose bounds). Measured: 20 of 149.
    expect(rawCount / raw.length).toBeGreaterThan(0.06);
    expect(rawCount / raw.length).toBeLessThan(0.22);
    // adjusted: each test family-wise at its level across the 150 groups, so chance alone leaves at most one or two
    const noise = fits.filter((f) => f.group !== 'bent');
    expect(residualWarned(noise)).toBeLessThanOrEqual(2);
    expect(fits.some((f) => (f.setAside ?? []).length > 0)).toBe(true);
    for (const w of fits.flatMap((f) => f.setAside ?? [])) {
      expect(w.adjusted).toMatchObject({ method: 'holm', family: groups });
      expect(w.message).toMatch(/not upheld across the fit's 150 groups by Holm's step-down procedure at family-wise level 0\.0[15] \(Holm 1979\)/);
    }
    const bent = fits.find((f) => f.group === 'bent')!;
    const curvature = bent.warnings.find((w) => w.code === 'curvature');
    expect(curvature?.adjusted).toMatchObject({ method: 'holm', family: groups, level: 0.01 });
    expect(curvature!.message).toMatch(/; upheld across the fit's 150 groups by Holm's step-down procedure at family-wise level 0\.01 \(Holm 1979\)$/);
    // idempotent: deciding again (as `gather` does over all shards) changes nothing
    expect(adjustGroupWarnings(fits)).toEqual(fits);
  });
});
