/** `units COLUMN [UNIT], ...` in a data statement: the syntax, the plan's `units`, and located errors. */
import { describe, expect, it } from 'vitest';
import { analyze } from '../../parser/index';
import { codes, errors, marked } from './helpers';

const headers = () => ['conc', 'signal', 'temp (°C)'];

describe('data units', () => {
  it('puts each listed column unit in the plan, quoted columns too, in any option order', () => {
    const { plan, diagnostics } = analyze('data cal = "cal.csv" where conc >= 0 units conc [ng/mL], "temp (°C)" [degC] delimiter ";"', { headers });
    expect(errors(diagnostics)).toEqual([]);
    expect(plan.data[0].units).toEqual({ conc: 'ng/mL', 'temp (°C)': 'degC' });
    expect(plan.data[0].delimiter).toBe(';');
    expect(plan.data[0].filter).toBeDefined();
  });

  it('spreads over lines, and a statement after it still parses', () => {
    const text = 'data cal = "cal.csv"\n  units conc [ng/mL],\n        signal [AU]\nfit f on cal {\n  model signal = a * conc\n  param a\n}';
    const { plan, diagnostics } = analyze(text, { headers });
    expect(errors(diagnostics)).toEqual([]);
    expect(plan.data[0].units).toEqual({ conc: 'ng/mL', signal: 'AU' });
    expect(plan.fits.map((f) => f.name)).toEqual(['f']);
  });

  it('leaves `units` out of the plan when none is declared', () => {
    const { plan } = analyze('data cal = "cal.csv"', { headers });
    expect(plan.data[0]).not.toHaveProperty('units');
  });

  it('keeps `units` usable as a column name', () => {
    const { plan, diagnostics } = analyze('data d = "a.csv"\nfit f on d {\n  model y = a * units\n  param a\n}');
    expect(errors(diagnostics)).toEqual([]);
    expect(plan.fits[0].blocks[0].predictor).toBe('units');
  });

  it('reports a unit on a column the data does not have, at that column, with the near name as a fix', () => {
    const m = marked('data cal = "cal.csv" units conc [ng/mL], «sginal» [AU]');
    const { plan, diagnostics } = analyze(m.text, { headers });
    const e = errors(diagnostics);
    expect(codes(e)).toEqual(['unknown_column']);
    expect(e[0].message).toContain('sginal');
    expect(e[0].range.start).toEqual(m.start);
    expect(e[0].range.end).toEqual(m.end);
    expect(e[0].suggestions).toContain('signal');
    expect(plan.data[0].units).toEqual({ conc: 'ng/mL' });
  });

  it('cannot check the columns when the header is unknown, and keeps every unit', () => {
    const { plan, diagnostics } = analyze('data cal = "cal.csv" units anything [s]');
    expect(errors(diagnostics)).toEqual([]);
    expect(plan.data[0].units).toEqual({ anything: 's' });
  });

  it('reports a column given two units, and a second units option', () => {
    const m = marked('data cal = "cal.csv" units conc [ng/mL], «conc [mg/L]»');
    const twice = analyze(m.text, { headers });
    expect(codes(errors(twice.diagnostics))).toEqual(['duplicate_option']);
    expect(errors(twice.diagnostics)[0].range.start).toEqual(m.start);
    expect(twice.plan.data[0].units).toEqual({ conc: 'ng/mL' });
    const again = analyze('data cal = "cal.csv" units conc [ng/mL] units signal [AU]', { headers });
    expect(codes(errors(again.diagnostics))).toEqual(['duplicate_option']);
  });

  it('is a syntax error without a unit, or with bounds where the unit belongs', () => {
    for (const text of ['data cal = "cal.csv" units conc', 'data cal = "cal.csv" units conc [0, 1]', 'data cal = "cal.csv" units [ng/mL]', 'data cal = "cal.csv" units conc [ng/mL],']) {
      const e = errors(analyze(text, { headers }).diagnostics);
      expect(e.length, text).toBeGreaterThan(0);
      expect(e[0].range.start.line, text).toBe(1);
    }
  });

  it('handles a column named __proto__ as an own key', () => {
    const { plan } = analyze('data d = "a.csv" units __proto__ [s]');
    expect(Object.prototype.hasOwnProperty.call(plan.data[0].units, '__proto__')).toBe(true);
    expect(JSON.parse(JSON.stringify(plan.data[0].units))).toEqual(JSON.parse('{"__proto__":"s"}'));
  });
});
