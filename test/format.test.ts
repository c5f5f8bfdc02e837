import { describe, expect, it } from 'vitest';
import {
  CHART_FORMAT, columnNotation, DIGITS, formatAtDigit, formatBounds, formatWritten, formatEstimate, formatInterval, formatLevel, formatNumber, formatP, formatPercent,
  formatPlusMinus, MISSING, P_FLOOR, pClause, uncertaintyExponent, UNCERTAINTY_DIGITS,
} from '../engine/format';

describe('engine/format (the one number-formatting policy)', () => {
  describe('plain numbers (rules 1–3)', () => {
    it('prints a result value that is not a finite number as n/a (JSON carries them all as null), a written number\'s infinities as inf', () => {
      expect(formatNumber(null)).toBe(MISSING);
      expect(formatNumber(undefined)).toBe(MISSING);
      expect(formatNumber(NaN)).toBe(MISSING);
      expect(formatNumber(Infinity)).toBe(MISSING);
      expect(formatNumber(-Infinity)).toBe(MISSING);
      expect(formatWritten(Infinity)).toBe('inf');
      expect(formatWritten(-Infinity)).toBe('-inf');
      expect(formatWritten(NaN)).toBe('NaN');
      expect(formatWritten(0.000123456789)).toBe(formatNumber(0.000123456789));
      expect(formatBounds(0, Infinity)).toBe('[0, inf]');
    });

    it('uses significant digits by context and drops trailing zeros in fixed notation', () => {
      expect(DIGITS.value).toBe(6);
      expect(formatNumber(12.3456789)).toBe('12.3457');
      expect(formatNumber(0.5)).toBe('0.5');
      expect(formatNumber(-203.1)).toBe('-203.1');
      expect(formatNumber(-0.000123456)).toBe('-0.000123456');
      expect(formatNumber(0)).toBe('0');
      expect(formatNumber(-0)).toBe('0');
    });

    it('switches to exponent notation outside [1e-4, 1e6)', () => {
      expect(formatNumber(3.21e-7)).toBe('3.21e-7');
      expect(formatNumber(2.5e6, 3)).toBe('2.5e+6');
      expect(formatNumber(0.0001)).toBe('0.0001');
      expect(formatNumber(999999.4)).toBe('999999');
      expect(formatNumber(-1.5e300)).toBe('-1.5e+300');
    });

    it('never prints a non-zero number as 0, however tiny', () => {
      for (const v of [1e-300, -1e-300, 5e-324, 1e-5, -4e-5]) {
        const s = formatNumber(v, 1);
        expect(s, String(v)).not.toMatch(/^-?0(\.0*)?$/);
        expect(Number(s)).not.toBe(0);
      }
    });

    it('prints intervals and percentages by the same rules', () => {
      expect(formatInterval(-Infinity, 2.5)).toBe('[n/a, 2.5]');
      expect(formatInterval(null, 1e-7)).toBe('[n/a, 1e-7]');
      expect(formatPercent(0.0342)).toBe('3.4%');
      expect(formatPercent(NaN)).toBe(MISSING);
      expect(formatLevel(0.95)).toBe('95%');
      expect(formatLevel(0.999)).toBe('99.9%');
    });
  });

  describe('estimates with an uncertainty (rule 4, JCGM 100:2008 §7.2.6)', () => {
    it('rounds the uncertainty to two significant digits by default', () => {
      expect(UNCERTAINTY_DIGITS).toBe(2);
      expect(uncertaintyExponent(0.123456)).toBe(-2);
      expect(formatEstimate(12.045678, 0.123456, 11.8, 12.29)).toEqual({ estimate: '12.05', stderr: '0.12', lower: '11.80', upper: '12.29' });
    });

    it('JCGM 100:2008 §7.2.6 worked example: y = 10.057 62 Ω with u = 27 mΩ is reported as 10.058 Ω (from memory)', () => {
      expect(formatEstimate(10.05762, 0.027, null, null)).toMatchObject({ estimate: '10.058', stderr: '0.027' });
    });

    it('JCGM 100:2008 §7.2.2 example: m = 100.021 47 g with u = 0.35 mg keeps five decimals (from memory)', () => {
      expect(formatEstimate(100.02147, 0.00035, null, null)).toMatchObject({ estimate: '100.02147', stderr: '0.00035' });
    });

    it('rounds to the nearest digit, not up: 28.05 kHz → 28 kHz (the §7.2.6 example), 10.47 → 10 (the guide allows 11 by rounding up; we do not)', () => {
      expect(formatEstimate(1000.4, 28.05, null, null).stderr).toBe('28');
      expect(formatEstimate(1000.4, 10.47, null, null).stderr).toBe('10');
    });

    it('shows one significant digit on request', () => {
      expect(formatEstimate(10.05762, 0.027, null, null, 1)).toMatchObject({ estimate: '10.06', stderr: '0.03' });
    });

    it('moves the last digit when rounding carries into a new digit (0.0996 → 0.10)', () => {
      expect(uncertaintyExponent(0.0996)).toBe(-2);
      expect(formatEstimate(1.23456, 0.0996, null, null)).toMatchObject({ estimate: '1.23', stderr: '0.10' });
      expect(formatEstimate(123456, 9960, null, null)).toMatchObject({ estimate: '123000', stderr: '10000' });
    });

    it('keeps large uncertainties in whole units and rounds to tens or hundreds', () => {
      expect(formatEstimate(98765.4321, 1234.5, 96000, 101000)).toEqual({ estimate: '98800', stderr: '1200', lower: '96000', upper: '101000' });
      expect(formatAtDigit(123456, 2)).toBe('123500');
    });

    it('prints negative estimates and interval ends to the same decimal place', () => {
      expect(formatEstimate(-12.3456, 0.0789, -12.5, -12.19)).toEqual({ estimate: '-12.346', stderr: '0.079', lower: '-12.500', upper: '-12.190' });
    });

    it('uses matching exponent digits for tiny and huge estimates', () => {
      expect(formatEstimate(2.378e-5, 1.234e-7, null, null)).toEqual({ estimate: '2.378e-5', stderr: '1.2e-7', lower: MISSING, upper: MISSING });
      expect(formatEstimate(2.378e-4, 1.234e-6, null, null).estimate).toBe('0.0002378');
      expect(formatEstimate(1.23456e7, 3456, null, null)).toMatchObject({ estimate: '1.23456e+7', stderr: '3500' });
      expect(formatEstimate(6.02214e23, 2.7e18, null, null)).toMatchObject({ estimate: '6.022140e+23', stderr: '2.7e+18' });
    });

    it('an uncertainty larger than the estimate never turns the estimate into 0 (issue 13: 1.0 printed as 0 beside ±60 165)', () => {
      const f = formatEstimate(1.0, 60165, -120330, 120340);
      expect(f).toEqual({ estimate: '1', stderr: '60000', lower: '-120000', upper: '120000' });
      // a degenerate fit: two equal parameters of 4.64 with a huge standard error
      expect(formatEstimate(4.64, 2.5e5, null, null).estimate).toBe('4.6');
      // a small negative estimate keeps its sign and digits instead of `-0.000`
      expect(formatEstimate(-0.0003, 0.03, -0.06, 0.06)).toEqual({ estimate: '-0.0003', stderr: '0.030', lower: '-0.060', upper: '0.060' });
      // an interval end near 0 likewise
      expect(formatEstimate(0.05, 0.025, 0.0001, 0.1).lower).toBe('0.0001');
    });

    it('prints an estimate of exactly 0 as 0 at the uncertainty digit', () => {
      expect(formatEstimate(0, 0.0123, -0.025, 0.025)).toEqual({ estimate: '0.000', stderr: '0.012', lower: '-0.025', upper: '0.025' });
      expect(formatEstimate(0, 1234, null, null).estimate).toBe('0');
    });

    it('falls back to DIGITS.value significant digits when the uncertainty is missing, 0 or not usable', () => {
      expect(formatEstimate(1.23456789, null, null, null)).toEqual({ estimate: '1.23457', stderr: MISSING, lower: MISSING, upper: MISSING });
      expect(formatEstimate(1.23456789, 0, 1.23456789, 1.23456789)).toEqual({ estimate: '1.23457', stderr: '0', lower: '1.23457', upper: '1.23457' });
      expect(formatEstimate(1.23456789, NaN, null, null).stderr).toBe(MISSING);
      expect(formatEstimate(1.23456789, Infinity, null, null).stderr).toBe(MISSING);
      expect(formatEstimate(1.23456789, -1, null, null).stderr).toBe(MISSING);
    });

    it('passes missing and infinite estimates and ends through as n/a', () => {
      expect(formatEstimate(NaN, 0.1, -Infinity, Infinity)).toEqual({ estimate: MISSING, stderr: '0.10', lower: MISSING, upper: MISSING });
      expect(formatEstimate(null, 0.1, null, null).estimate).toBe(MISSING);
    });

    it('writes estimate ± uncertainty', () => {
      expect(formatPlusMinus(10.05762, 0.027)).toBe('10.058 ± 0.027');
      expect(formatPlusMinus(10.05762, null)).toBe('10.0576');
    });
  });

  describe('p-values (rule 5)', () => {
    it('prints p below the display floor as < 0.0001, in a sentence as p < 0.0001', () => {
      expect(P_FLOOR).toBe(1e-4);
      expect(formatP(3e-7)).toBe('< 0.0001');
      expect(formatP(2e-30)).toBe('< 0.0001');
      expect(formatP(0)).toBe('< 0.0001');
      expect(pClause(3e-7)).toBe('p < 0.0001');
      expect(pClause(2e-30)).not.toContain('=');
    });

    it('prints p at or above the floor with DIGITS.p significant digits', () => {
      expect(formatP(1e-4)).toBe('0.0001');
      expect(formatP(0.04213)).toBe('0.0421');
      expect(formatP(1)).toBe('1');
      expect(pClause(0.04213)).toBe('p = 0.0421');
      expect(formatP(NaN)).toBe(MISSING);
      expect(pClause(null)).toBe(`p = ${MISSING}`);
    });
  });

  it('gives charts d3-format strings with the policy digits', () => {
    expect(CHART_FORMAT.value).toBe(`.${DIGITS.statistic}~g`);
  });
});

describe('one formatter in the tree', () => {
  it('no source file outside engine/format.ts formats numbers with toFixed, toPrecision or toExponential', async () => {
    const { readdirSync, readFileSync, statSync } = await import('node:fs');
    const path = await import('node:path');
    const root = path.join(__dirname, '..');
    const offenders: string[] = [];
    const walk = (dir: string) => {
      for (const name of readdirSync(path.join(root, dir))) {
        const rel = `${dir}/${name}`;
        if (statSync(path.join(root, rel)).isDirectory()) walk(rel);
        else if (name.endsWith('.ts') && rel !== 'engine/format.ts' && /\.to(Fixed|Precision|Exponential)\(/.test(readFileSync(path.join(root, rel), 'utf8'))) offenders.push(rel);
      }
    };
    for (const top of ['parser', 'engine', 'extension']) walk(top);
    expect(offenders).toEqual([]);
  });
});

describe('engine/format columnNotation (rule 6: one notation per table column)', () => {
  it('rewrites a mixed column in exponent notation, each cell with the significant digits it had', () => {
    // the column: 0.0011280465 printed beside 8.69597e-8
    expect(columnNotation(['0.0011280465', '8.69597e-8'])).toEqual(['1.1280465e-3', '8.69597e-8']);
    // trailing zeros after a point are printed digits and stay; negative values keep their sign
    expect(columnNotation(['0.10', '-2.5e+6', '-0.0300', '12'])).toEqual(['1.0e-1', '-2.5e+6', '-3.00e-2', '1.2e+1']);
    // the digits are the same digits: the rewritten cell reads back as the same number
    for (const c of columnNotation(['0.0011280465', '1234.5', '3.2e-9'])) expect(Number.isFinite(Number(c))).toBe(true);
    expect(Number(columnNotation(['0.0011280465', '1e-9'])[0])).toBe(0.0011280465);
  });

  it('leaves zeros, n/a, the p floor and text as they are, in a mixed column and in a fixed one', () => {
    expect(columnNotation(['0', MISSING, '< 0.0001', 'fixed', '', '0.5', '3e-7'])).toEqual(['0', MISSING, '< 0.0001', 'fixed', '', '5e-1', '3e-7']);
    const fixed = ['0', MISSING, '0.9747', '0.400749', '-12', '< 0.0001'];
    expect(columnNotation(fixed)).toEqual(fixed);
  });

  it('a column of NaN and n/a cells only, or an empty column, is unchanged', () => {
    expect(columnNotation([formatNumber(NaN), formatNumber(null)])).toEqual([MISSING, MISSING]);
    expect(columnNotation([])).toEqual([]);
  });

  it('below 1e6 a number is fixed even when its digits end before the units (rule 2)', () => {
    expect(formatNumber(100.4, 2)).toBe('100');
    expect(formatNumber(-123456, 2)).toBe('-120000');
    expect(formatNumber(2.5e6, 2)).toBe('2.5e+6');
  });
});
