/**
 * Profile-likelihood intervals of derived quantities (engine/run/derived-profile.ts,
 * derived-intervals.ts) end to end, against a brute-force reference computed
 * once with scipy 1.17.1 / numpy 2.4.6: the fit by scipy.optimize.least_squares
 * (xtol = ftol = gtol = 1e-15); for each value v of the quantity the sum of
 * squares minimised over k with a eliminated through the constraint
 * (scipy.optimize.minimize_scalar, method 'bounded', xatol 1e-14); each end by
 * scipy.optimize.brentq on τ(v) = ±t(6, 0.975), xtol 1e-13; τ as in
 * Bates & Watts 1988, §6.1.
 */
import { describe, expect, it } from 'vitest';
import type { DerivedResult } from '../../engine/result';
import { runSpec, tempDir, writeCsv } from './helpers';
import { derivedIntervalBlock } from '../../engine/front/views/bootstrap';

const dir = tempDir();
// Invented: a dye fading in a test cuvette, 8 readings.
writeCsv(dir, 'fade.csv', ['t', 'y'], [[0, 10.21], [1, 7.62], [2, 6.18], [3, 4.51], [4, 3.83], [6, 2.12], [8, 1.41], [10, 0.78]]);
// Invented: a calibration line and a second instrument.
writeCsv(dir, 'cal.csv', ['x', 'y'], [[1, 0.52], [2, 1.07], [3, 1.49], [4, 2.06], [5, 2.47], [6, 3.05]]);

const spec = `data fade = "fade.csv"
fit d on fade {
  model y = a * exp(-k * t)
  param a = 10
  param k = 0.3
}
derive t1 = ln(d.a) / d.k
derive at5 = d.a * exp(-5 * d.k)
derive kk = d.k
`;

const find = (ds: readonly DerivedResult[] | undefined, name: string) => (ds ?? []).find((d) => d.name === name)!;

function expectEnds(d: DerivedResult, lower: number, upper: number, rel: number): void {
  const iv = d.profile?.interval;
  expect(d.profile?.status).toBe('computed');
  expect(iv?.lower.kind).toBe('reached');
  expect(iv?.upper.kind).toBe('reached');
  expect(Math.abs(iv!.lower.value! - lower)).toBeLessThan(rel * d.stderr!);
  expect(Math.abs(iv!.upper.value! - upper)).toBeLessThan(rel * d.stderr!);
}

describe('engine/run/derived-profile: profile intervals of derive quantities', () => {
  it('against scipy brute force: ln(a)/k (its profile interval asymmetric about the value) and a·exp(−5k)', async () => {
    const { result } = await runSpec(spec, dir);
    expect(result.errors).toEqual([]);
    const t1 = find(result.derived, 't1');
    // scipy 1.17.1: value 9.066031057887928, delta-method se 0.20643886707635112, profile [8.574397168468888, 9.591585670454426]
    expect(t1.value).toBeCloseTo(9.066031057887928, 8);
    expect(t1.stderr! / 0.20643886707635112).toBeCloseTo(1, 6);
    // tolerance 1e-6·se: the reference's bounded scalar minimisation (xatol 1e-14 on k) and our reduced fits (tolerance 1e-10)
    expectEnds(t1, 8.574397168468888, 9.591585670454426, 1e-6);
    // the Wald interval is [8.5609, 9.5712]: the upper end moves by 2 % of the half-width (under the 10 % of profile_differs)
    expect(t1.profile!.interval!.differs).toBe(false);
    const at5 = find(result.derived, 'at5');
    // scipy 1.17.1: value 2.8210478396132923, se 0.07567788009085255, profile [2.635335665195417, 3.0073198182102647]
    expect(at5.value).toBeCloseTo(2.8210478396132923, 8);
    expectEnds(at5, 2.635335665195417, 3.0073198182102647, 1e-6);
    expect(t1.profile!.note).toMatch(/solved from it/);
  });

  it('a quantity that is one parameter has that parameter\'s profile interval', async () => {
    const { result } = await runSpec(spec, dir);
    const k = result.fits[0].parameters.find((p) => p.name === 'k')!.profile!;
    const kk = find(result.derived, 'kk').profile!.interval!;
    const se = result.fits[0].parameters.find((p) => p.name === 'k')!.stderr!;
    expect(kk.lower.kind).toBe(k.lower.kind);
    expect(kk.upper.kind).toBe(k.upper.kind);
    // the same end search on the same reduced problem (k held at v, Newton solving k = v in one step): equal within 1e-9·se
    expect(Math.abs(kk.lower.value! - k.lower.value!)).toBeLessThan(1e-9 * se);
    expect(Math.abs(kk.upper.value! - k.upper.value!)).toBeLessThan(1e-9 * se);
  });

  it('profile intervals respect transformations: 1/k has the ends 1/(ends of k), with profile_differs (Bates & Watts 1988, §6.1)', async () => {
    // Invented: a slow drift read over a short time: k is poorly determined, 1/k strongly curved
    writeCsv(dir, 'slow.csv', ['t', 'y'], [[0, 5.0], [1, 5.02], [2, 4.953], [3, 4.881], [4, 4.915], [5, 4.851]]);
    const { result } = await runSpec(`data slow = "slow.csv"
fit s on slow {
  model y = a * exp(-k * t)
  param a = 5
  param k = 0.01
}
derive tau = 1 / s.k
`, dir);
    const k = result.fits[0].parameters.find((p) => p.name === 'k')!.profile!;
    const tau = find(result.derived, 'tau');
    const iv = tau.profile!.interval!;
    // S̃ over {θ : 1/k = v} is S̃ of k at 1/v: the ends map exactly (to the end search's tolerance, 1e-9·se relative)
    expect(iv.lower.value! * k.upper.value!).toBeCloseTo(1, 7);
    expect(iv.upper.value! * k.lower.value!).toBeCloseTo(1, 7);
    // the symmetric interval [55.7, 249.6] misses the upper end 418 by far
    expect(iv.differs).toBe(true);
    expect((tau.warnings ?? []).map((w) => w.code)).toEqual(['profile_differs']);
  });

  it('a ratio of a linear model gets a profile interval; several fits or profile never say why not', async () => {
    const { result } = await runSpec(`data cal = "cal.csv"
fit c on cal {
  model y = b0 + b1 * x
  param b0
  param b1
}
fit c2 on cal {
  model y = m * x
  param m
  profile never
}
derive xint = -c.b0 / c.b1
derive both = c.b1 / c2.m
derive off = c2.m * 2
`, dir);
    expect(find(result.derived, 'xint').profile?.status).toBe('computed');
    expect(find(result.derived, 'both').profile).toEqual({ status: 'skipped', note: expect.stringMatching(/several fits/), interval: null });
    expect(find(result.derived, 'off').profile?.status).toBe('skipped');
    expect(find(result.derived, 'off').profile?.note).toMatch(/profile never/);
  });
});

describe('derived profile of a quantity that reads a standard error', () => {
  // Regression: `cal.intercept.se` was read as the intercept itself by the profile and the bootstrap,
  // so the profile eliminated the intercept and collapsed to a point. A standard error is a fixed
  // number there (as in the delta method), so 3.3·se(a)/b depends on b alone, and the profile
  // interval of a monotone function of one parameter is that function of the parameter's profile
  // interval (invariance of the likelihood under reparametrisation, Bates & Watts 1988, §6.1); for a
  // line the slope's profile interval is its symmetric one, b ± t·se(b) (common practice).
  it('eliminates the slope and maps the slope interval through 3.3·se(a)/b', async () => {
    const { result } = await runSpec(`data cal = "cal.csv"
fit line on cal {
  model y = a + b * x
  param a
  param b
  profile always
}
derive lodse = 3.3 * line.a.se / line.b
`, dir);
    const fit = result.fits[0];
    const a = fit.parameters.find((q) => q.name === 'a')!;
    const b = fit.parameters.find((q) => q.name === 'b')!;
    const d = find(result.derived, 'lodse');
    expect(d.value).toBeCloseTo((3.3 * a.stderr!) / b.estimate, 12);
    const lower = (3.3 * a.stderr!) / b.upper!;
    const upper = (3.3 * a.stderr!) / b.lower!;
    expect(upper - lower).toBeGreaterThan(0.5 * d.stderr!);
    expectEnds(d, lower, upper, 1e-6);
    // no bootstrap ran: the block has the profile columns only (no empty bootstrap columns)
    const block = derivedIntervalBlock(result)!;
    expect(block.heading).toBe('Derived quantities: profile intervals');
    expect(block.headers).toEqual(['quantity', 'profile 95% low', 'profile 95% high', 'against the symmetric interval']);
    expect(block.rows.every((r) => r.length === 4)).toBe(true);
  });
});
