import { describe, expect, it } from 'vitest';
import { degreeInputError, degreePrompt, maxDegreeFor, polynomialFor } from '../../extension/logic/new-spec-degree';
import { MAX_POLY_DEGREE, scaffoldSpec } from '../../engine/templates';

/** Invented calibration: absorbance at 12 concentrations in duplicate, one blank cell. */
const conc = Array.from({ length: 24 }, (_, i) => Math.floor(i / 2) * 2.5);
const abs = conc.map((c, i) => (i === 5 ? NaN : 0.02 + 0.11 * c - 0.0009 * c * c));

describe('extension/logic/new-spec-degree', () => {
  it('bounds the degree by the data: distinct x values − 1, rows − 2, and the template limit', () => {
    expect(maxDegreeFor(conc, abs)).toBe(11); // 12 distinct concentrations, 23 rows with both numbers
    expect(maxDegreeFor([1, 2, 3, 4], [5, 6, 7, 8])).toBe(2); // 4 rows: 3 coefficients at most
    expect(maxDegreeFor([1, 1, 2, 2, 2], [1, 2, 3, 4, 5])).toBe(1); // two distinct x values
    expect(maxDegreeFor([1, 2], [1, NaN])).toBe(0);
    const many = Array.from({ length: 500 }, (_, i) => i);
    expect(maxDegreeFor(many, many)).toBe(MAX_POLY_DEGREE);
  });

  it('starts the input box at the default degree 2, or at the most the data allow', () => {
    expect(degreePrompt(11)).toMatchObject({ value: '2', title: 'New spec: degree of the polynomial' });
    expect(degreePrompt(11).prompt).toMatch(/^a whole number from 1 to 11 /);
    expect(degreePrompt(1).value).toBe('1');
  });

  it('accepts whole numbers from 1 to the maximum and says what is wrong otherwise', () => {
    expect(degreeInputError('3', 11)).toBeUndefined();
    expect(degreeInputError(' 11 ', 11)).toBeUndefined();
    expect(degreeInputError('12', 11)).toBe('these data allow degree 11 at most');
    expect(degreeInputError('21', 30)).toBe(`the template writes degrees up to ${MAX_POLY_DEGREE}`);
    expect(degreeInputError('0', 11)).toBe('a polynomial has degree 1 or more');
    for (const bad of ['', '2.5', '-1', 'two', '1e1', '3 4']) expect(degreeInputError(bad, 11), bad).toBe('the degree is a whole number from 1 to 11');
  });

  it('gives the polynomial template of the degree typed, which scaffolds a spec with that many coefficients', () => {
    expect(polynomialFor('12', 11)).toBeNull();
    const t = polynomialFor('3', 11)!;
    expect(t.title).toBe('polynomial of degree 3');
    const r = scaffoldSpec({ template: t, dataPath: 'cal.csv', headers: ['conc', 'absorbance'], x: 'conc', y: 'absorbance', xValues: conc, yValues: abs });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.text).toMatch(/model absorbance = c0 \+ c1 \* conc \+ c2 \* conc\^2 \+ c3 \* conc\^3/);
    expect(r.text).not.toContain('c4');
  });
});
