/**
 * One misspelling, one diagnostic: a column misspelt in a fit's model is
 * reported there, and the statements that name the real column (predict,
 * invert) are not told to follow the misspelling.
 */
import { describe, expect, it } from 'vitest';
import { analyze, type CheckContext } from '../../parser/index';

const HEADERS: CheckContext = { headers: () => ['dose_uM', 'activity_pct'] };
const spec = (model: string, after: string) => [
  'data plate = "assay.csv"',
  'fit inhibition on plate {',
  `  model ${model}`,
  '  param high = 100',
  '  param low = 0',
  '  param ic50 = 1 in [0, inf]',
  '  param hill = 1 in [0.1, 10]',
  '}',
  after,
].join('\n');
const MODEL = 'activity_pct = low + (high - low) / (1 + (dose_uM / ic50)^hill)';

describe('parser/check: no cascade from one misspelling', () => {
  it('a column misspelt in the model is the only error; the predict line naming the real column has none', () => {
    const text = spec(MODEL.replace('dose_uM', 'dose_um'), 'predict inhibition at dose_uM = 0.1, 1');
    const { diagnostics, plan } = analyze(text, HEADERS);
    expect(diagnostics.map((d) => [d.code, text.slice(d.range.start.offset, d.range.end.offset), d.suggestions])).toEqual([
      ['undefined_name', 'dose_um', ['dose_uM']],
    ]);
    // the misspelt name is no predictor of the fit
    expect(plan.fits[0].blocks[0].predictor).toBeUndefined();
  });

  it('a query name that is no column either is reported against the data, with the real columns as suggestions', () => {
    const text = spec(MODEL.replace('dose_uM', 'dose_um'), 'predict inhibition at dose_ux = 1');
    const { diagnostics } = analyze(text, HEADERS);
    const q = diagnostics.find((d) => d.range.start.line === 9);
    expect(q?.code).toBe('unknown_column');
    expect(q?.suggestions).toEqual(['dose_uM']);
    expect(diagnostics.every((d) => !(d.suggestions ?? []).includes('dose_um'))).toBe(true);
  });

  it('a misspelt response does not make invert at the real response an error', () => {
    const text = spec(MODEL.replace('activity_pct', 'activity_pc'), 'invert inhibition at activity_pct = 50');
    const { diagnostics } = analyze(text, HEADERS);
    expect(diagnostics.map((d) => [d.code, text.slice(d.range.start.offset, d.range.end.offset)])).toEqual([['undefined_name', 'activity_pc']]);
  });

  it('a misspelt query against a correct model still gets the model column as its fix', () => {
    const text = spec(MODEL, 'predict inhibition at dose_um = 1');
    const d = analyze(text, HEADERS).diagnostics;
    expect(d.map((x) => [x.code, x.suggestions])).toEqual([['predictor_mismatch', ['dose_uM']]]);
  });

  it('with the header unknown, names are taken as columns and the mismatch is reported as before', () => {
    const text = spec(MODEL.replace('dose_uM', 'dose_um'), 'predict inhibition at dose_uM = 1');
    const d = analyze(text).diagnostics;
    expect(d.map((x) => x.code)).toEqual(['predictor_mismatch']);
  });
});
