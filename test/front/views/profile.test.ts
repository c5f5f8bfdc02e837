/**
 * engine/front/views/profile.ts: the profile-interval table and line in the
 * CLI text, the Markdown report and the panel model, for each kind of end
 * (reached, open at a bound, not reached, not found) and each status
 * (computed, linear, skipped). Invented results; the numbers are checked in
 * test/run/profile.test.ts.
 */
import { describe, expect, it } from 'vitest';
import type { FitResult, ParameterResult, ProfileEnd } from '../../../engine/result';
import { hasProfileTable, PROFILE_HEADERS, profileLine, profileRows } from '../../../engine/front/views/profile';
import { fitTextLines } from '../../../engine/front/views/text';
import { panelFit } from '../../../extension/logic/panel-model';
import { runSpec, tempDir, writeCsv } from '../../run/helpers';

const dir = tempDir();
writeCsv(dir, 'wash.csv', ['t', 'y'], [[0.5, 8.61], [1, 7.12], [2, 5.30], [3, 3.81], [4, 2.92], [6, 1.77], [8, 1.26], [10, 0.83]]);

async function washFit(extra = ''): Promise<FitResult> {
  const { result } = await runSpec(`data d = "wash.csv"\nfit wash on d {\n  model y = a * exp(-k * t)\n  param a = 9\n  param k = 0.3\n${extra}}\n`, dir);
  return result.fits[0];
}

/** The fit with the profile of `k` replaced by the given ends. */
function withEnds(f: FitResult, lower: ProfileEnd, upper: ProfileEnd): FitResult {
  return { ...f, parameters: f.parameters.map((p): ParameterResult => (p.name === 'k' ? { ...p, profile: { lower, upper, differs: true, refits: 3 } } : p)) };
}

describe('engine/front/views/profile', () => {
  it('a computed profile: a line naming the t level and the method, a row per free parameter in the digits of the symmetric interval', async () => {
    const f = await washFit();
    expect(hasProfileTable(f)).toBe(true);
    expect(profileLine(f)).toMatch(/^Profile intervals \(95 %, where the profile t statistic \|τ\| ≤ t = 2\.44691; Bates & Watts 1988, §6\.1; \d+ reduced fits\)$/);
    const rows = profileRows(f);
    expect(rows.map((r) => r[0])).toEqual(['a', 'k']);
    // the digits of the symmetric interval under the one formatting policy (engine/format.ts: JCGM 100:2008 §7.2.6, two significant digits of the uncertainty)
    expect(rows[1].slice(1)).toEqual(['0.258', '0.329', 'differs: use the profile interval']);
    expect(rows[0][3]).toBe('close');
    expect(PROFILE_HEADERS(0.9)).toEqual(['parameter', 'profile 90% low', 'profile 90% high', 'against the symmetric interval']);
    const text = fitTextLines(f).join('\n');
    expect(text).toContain('profile 95% low');
    expect(text.indexOf('Profile intervals')).toBeLessThan(text.indexOf('Goodness of fit'));
  });

  it('open and missing ends are words, never numbers', async () => {
    const f = withEnds(await washFit(), { kind: 'bound', value: 0 }, { kind: 'not_reached', value: 123.4 });
    expect(profileRows(f)[1].slice(1, 3)).toEqual(['open at bound 0', 'open (not reached)']);
    const failed = withEnds(await washFit(), { kind: 'failed', value: null, reason: 'the reduced fit stopped: iteration limit' }, { kind: 'reached', value: 0.33 });
    expect(profileRows(failed)[1][1]).toBe('not found');
    expect(profileRows(failed)[1][3]).toContain('iteration limit');
  });

  it('linear and skipped fits: one line saying why, no table; the panel model carries the same', async () => {
    const never = await washFit('  profile never\n');
    expect(hasProfileTable(never)).toBe(false);
    expect(profileLine(never)).toBe('Profile intervals: switched off (`profile never`)');
    expect(panelFit(never, false).profile).toEqual({ line: profileLine(never), headers: [], rows: [] });
    const computed = await washFit();
    expect(panelFit(computed, false).profile).toEqual({ line: profileLine(computed), headers: PROFILE_HEADERS(0.95), rows: profileRows(computed) });
    const { result } = await runSpec('data d = "wash.csv"\nfit line on d {\n  model y = a + b * t\n  param a\n  param b\n}\n', dir);
    expect(profileLine(result.fits[0])).toContain('linear in its parameters');
  });
});
