import { describe, expect, it } from 'vitest';
import { completionsAt } from '../../extension/logic/completion';
import { FUNCTION_NAMES, KEYWORD_SPECS, LOSSES, METHODS, STATISTICS } from '../../parser/registry';
import { analysisOf, COOLING, COOLING_HEADERS } from './helpers';

/** Completions with the cursor where `marker` is written (the marker is removed). */
function at(textWithMarker: string, headers = COOLING_HEADERS) {
  const offset = textWithMarker.indexOf('|');
  const text = textWithMarker.slice(0, offset) + textWithMarker.slice(offset + 1);
  return completionsAt(analysisOf(text, 'found', headers), offset);
}
const labels = (items: { label: string }[]) => items.map((i) => i.label);

describe('extension/logic/completion', () => {
  it('offers statement keywords at the start of a top-level line', () => {
    const items = at(`${COOLING}\n|`);
    expect(labels(items)).toEqual(expect.arrayContaining(['data', 'const', 'fit', 'predict', 'invert', 'compare', 'expect']));
    expect(labels(items)).not.toContain('model');
    expect(items.find((i) => i.label === 'fit')?.documentation).toBe(KEYWORD_SPECS.fit.doc);
  });

  it('offers fit-body keywords inside a fit block', () => {
    const text = COOLING.replace('  sigma temp_sd\n', '  sigma temp_sd\n  |\n');
    expect(labels(at(text))).toEqual(expect.arrayContaining(['model', 'param', 'sigma', 'weight', 'method', 'loss', 'level', 'explore', 'per']));
    expect(labels(at(text))).not.toContain('predict');
  });

  it('offers the solver methods after `method` and the losses after `loss`', () => {
    expect(labels(at(COOLING.replace('  sigma temp_sd\n', '  sigma temp_sd\n  method |\n')))).toEqual([...METHODS]);
    expect(labels(at(COOLING.replace('  sigma temp_sd\n', '  sigma temp_sd\n  loss |\n')))).toEqual([...LOSSES]);
  });

  it('offers parameters, header columns, constants and functions in a model expression', () => {
    const items = at(COOLING.replace('exp(-time_min / tau)', 'exp(-time_min / |tau)'));
    const l = labels(items);
    expect(l).toEqual(expect.arrayContaining(['rise', 'tau', ...COOLING_HEADERS, 'ambient', 'pi', 'e', ...FUNCTION_NAMES]));
    expect(items.find((i) => i.label === 'tau')?.kind).toBe('parameter');
    expect(items.find((i) => i.label === 'batch')?.kind).toBe('column');
    expect(items.find((i) => i.label === 'atan2')?.snippet).toBe('atan2(${1}, ${2})');
  });

  it('quotes column names that are not plain identifiers', () => {
    const headers = ['time (min)', 'temp_C', 'temp_sd'];
    const items = at(COOLING.replace('exp(-time_min / tau)', 'exp(-time_min / |tau)'), headers);
    expect(items.find((i) => i.label === 'time (min)')?.insertText).toBe('"time (min)"');
    expect(items.find((i) => i.label === 'temp_C')?.insertText).toBeUndefined();
  });

  it('offers data names after `fit NAME on` and fit names after query keywords', () => {
    expect(labels(at(`${COOLING}fit other on |`))).toEqual(['bench']);
    expect(labels(at(`${COOLING}predict |`))).toEqual(['newton']);
    expect(labels(at(`${COOLING}compare newton, |`))).toEqual(['newton']);
  });

  it('offers parameters and statistics after `expect FIT.`', () => {
    const l = labels(at(`${COOLING}expect newton.|`));
    expect(l).toEqual(['rise', 'tau', ...STATISTICS]);
  });

  it('offers names used in the model but not declared after `param`', () => {
    const text = COOLING.replace('  param tau  = 10 in [0.1, 1000] [min]\n', '  param |\n');
    expect(labels(at(text))).toEqual(['tau']);
  });

  it('offers the columns of the fit data after `per`', () => {
    expect(labels(at(COOLING.replace('  sigma temp_sd\n', '  sigma temp_sd\n  per |\n')))).toEqual(COOLING_HEADERS);
  });

  it('offers nothing inside a comment', () => {
    expect(at(`${COOLING}# fit |`)).toEqual([]);
  });

  it('offers CSV files inside the path of a data statement', () => {
    const text = `${COOLING}data other = "`;
    const a = analysisOf(text);
    expect(labels(completionsAt(a, text.length, { csvFiles: ['cooling.csv', 'runs/b.csv'] }))).toEqual(['cooling.csv', 'runs/b.csv']);
  });

  it('derive: offers the keyword, then fits, constants, derived quantities and functions, then FIT members', () => {
    const start = at(`${COOLING}\nder|`);
    expect(start.find((i) => i.label === 'derive')?.documentation).toBe(KEYWORD_SPECS.derive.doc);
    const spec = `${COOLING}derive half_life = ln(2) * newton.tau [min]\n`;
    const expr = labels(at(`${spec}derive q = 2 * |`));
    expect(expr).toEqual(expect.arrayContaining(['newton', 'half_life', 'ambient', 'pi', 'ln']));
    expect(expr).not.toContain('time_min');
    expect(labels(at(`${spec}derive q = 2 * newton.|`))).toEqual(['rise', 'tau', ...STATISTICS]);
  });

  it('expect: offers derived quantities beside fits, and only se after a derived quantity', () => {
    const spec = `${COOLING}derive half_life = ln(2) * newton.tau [min]\n`;
    expect(labels(at(`${spec}expect |`))).toEqual(['newton', 'half_life']);
    expect(labels(at(`${spec}expect half_life.|`))).toEqual(['se', 'lower', 'upper']);
  });
});

describe('extension/logic/completion ranking', () => {
  const sorted = (items: { label: string; sortText?: string }[]) => [...items].sort((x, y) => (x.sortText ?? x.label).localeCompare(y.sortText ?? y.label)).map((i) => i.label);

  it('puts columns first where a column is expected: sigma, weight, the response, per, where, predict … at', () => {
    for (const line of ['  sigma |', '  weight |', '  sigma sqrt(|']) {
      const items = at(COOLING.replace('  sigma temp_sd\n', `${line}\n`));
      const order = sorted(items);
      expect(order.slice(0, COOLING_HEADERS.length), line).toEqual([...COOLING_HEADERS].sort());
      // parameters are not allowed in sigma or weight: not offered
      expect(order, line).not.toContain('tau');
      // then constants, then functions
      expect(order.indexOf('ambient')).toBeLessThan(order.indexOf('abs'));
    }
    const response = sorted(at(COOLING.replace('model temp_C =', 'model |')));
    expect(response.slice(0, COOLING_HEADERS.length)).toEqual([...COOLING_HEADERS].sort());
    const where = sorted(at(COOLING.replace('where time_min >= 0', 'where |')));
    expect(where.slice(0, COOLING_HEADERS.length)).toEqual([...COOLING_HEADERS].sort());
    expect(sorted(at(`${COOLING}predict newton at |`))).toEqual(['time_min']);
  });

  it('puts the fit\'s parameters, then its columns, before constants and functions on the model side', () => {
    const order = sorted(at(COOLING.replace('exp(-time_min / tau)', 'exp(-time_min / |tau)')));
    expect(order.slice(0, 2)).toEqual(['rise', 'tau']);
    expect(order.slice(2, 2 + COOLING_HEADERS.length)).toEqual([...COOLING_HEADERS].sort());
    expect(order.indexOf('pi')).toBeLessThan(order.indexOf('exp'));
  });

  it('offers the real column after `predict … at` when the model misspells it', () => {
    const text = COOLING.replace('exp(-time_min', 'exp(-time_mn');
    const l = labels(at(text.replace('predict newton at time_min', 'predict newton at |')));
    // the header's columns but the response; never the misspelling
    expect(l).toEqual(['time_min', 'temp_sd', 'batch']);
  });
});
