import { describe, expect, it } from 'vitest';
import { formatAtDigit, formatEstimate, formatLevel, formatNumber, formatP, lastDigitExponent, MISSING } from '../../../engine/front/views/format';

describe('views/format', () => {
  it('prints missing and non-finite values as n/a', () => {
    expect(formatNumber(null)).toBe(MISSING);
    expect(formatNumber(NaN)).toBe(MISSING);
    expect(formatNumber(Infinity)).toBe(MISSING);
  });

  it('uses significant digits and drops trailing zeros in fixed notation', () => {
    expect(formatNumber(12.3456789)).toBe('12.3457');
    expect(formatNumber(0.5)).toBe('0.5');
    expect(formatNumber(-203.1, 6)).toBe('-203.1');
    expect(formatNumber(0)).toBe('0');
  });

  it('switches to exponent notation outside [1e-4, 1e6)', () => {
    expect(formatNumber(3.21e-7)).toBe('3.21e-7');
    expect(formatNumber(2.5e6, 3)).toBe('2.5e+6');
    expect(formatNumber(0.0001)).toBe('0.0001');
  });

  it('rounds an estimate at the 4th significant digit of its standard error (module rule)', () => {
    // SE 0.123456 -> last digit 1e-4 -> estimate 12.0457, SE 0.1235
    expect(lastDigitExponent(0.123456)).toBe(-4);
    const f = formatEstimate(12.045678, 0.123456, 11.8, 12.29);
    expect(f).toEqual({ estimate: '12.0457', stderr: '0.1235', lower: '11.8000', upper: '12.2900' });
  });

  it('keeps large uncertainties in whole units', () => {
    const f = formatEstimate(98765.4321, 1234.5, 96000, 101000);
    expect(f.estimate).toBe('98765');
    expect(f.stderr).toBe('1235');
  });

  it('uses matching exponent digits for tiny estimates', () => {
    const f = formatEstimate(2.378e-5, 1.234e-7, null, null);
    // last digit at 1e-10 -> the estimate keeps 6 significant digits
    expect(f.estimate).toBe('2.37800e-5');
    expect(f.stderr).toBe('1.234e-7');
    expect(formatEstimate(2.378e-4, 1.234e-6, null, null).estimate).toBe('0.000237800');
    expect(f.lower).toBe(MISSING);
  });

  it('falls back to 6 significant digits without a standard error', () => {
    expect(formatEstimate(1.23456789, null, null, null).estimate).toBe('1.23457');
    expect(formatEstimate(1.23456789, 0, null, null).stderr).toBe(MISSING);
  });

  it('rounds to tens and hundreds when the last digit is above the units', () => {
    expect(formatAtDigit(123456, 2)).toBe('123500');
  });

  it('labels levels and p-values', () => {
    expect(formatLevel(0.95)).toBe('95%');
    expect(formatLevel(0.999)).toBe('99.9%');
    expect(formatP(3e-7)).toBe('< 1e-4');
    expect(formatP(0.04213)).toBe('0.0421');
  });
});
