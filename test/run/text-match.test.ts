/**
 * Text values in where conditions (parser/check-expr.ts decides, engine/run/text-match.ts matches):
 * `compound == "CPD-A"` keeps the rows whose cell reads that text; an item that names a column too
 * is a located error; a numbers-only column compared with text is a located run error.
 */
import { describe, expect, it } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyze } from '../../parser/index';
import { headerLookup } from '../../engine/data/header';
import { runSpec, tempDir } from './helpers';

/** A line y = a + b·x per compound, with the compound names holding spaces, dashes and a quoted comma. */
function plate(dir: string): void {
  const rows = ['compound,x,y,Reference'];
  const names = ['CPD-A', 'CPD B', '"C, quoted"', 'NA'];
  names.forEach((name, k) => {
    for (let x = 0; x < 5; x++) rows.push(`${name},${x},${(k + 1) * 10 + (k + 1) * x + (x % 2 ? 0.01 : -0.01)},${x}`);
  });
  rows.push(',7,99,0'); // missing compound
  writeFileSync(join(dir, 'plate.csv'), rows.join('\n') + '\n');
}

const spec = (cond: string) => `data plate = "plate.csv" where ${cond}\nfit line on plate {\n  model y = a + b * x\n  param a\n  param b\n}\n`;

describe('run/text-match', () => {
  it('keeps the rows whose cell reads the text (spaces inside count, quotes of the file removed)', async () => {
    const dir = tempDir();
    plate(dir);
    for (const [cond, a, b] of [['compound == "CPD-A"', 10, 1], ['"CPD B" == compound', 20, 2], ['compound == "C, quoted"', 30, 3]] as const) {
      const { result } = await runSpec(spec(cond), dir);
      expect(result.errors).toEqual([]);
      const fit = result.fits[0];
      expect(fit.goodness.n).toBe(5);
      // exact line plus ±0.01 alternating: estimates near the generating values
      expect(fit.parameters[0].estimate).toBeCloseTo(a, 1);
      expect(fit.parameters[1].estimate).toBeCloseTo(b, 1);
    }
  });

  it('!= keeps the other rows; a missing cell is dropped and counted, also for !=', async () => {
    const dir = tempDir();
    plate(dir);
    const { result } = await runSpec(spec('compound != "CPD-A" and compound != "CPD B" and compound != "C, quoted"'), dir);
    // NA and the empty cell are missing (6 rows dropped), the three names excluded: no row is left,
    // an error at the condition that counts the 15 usable rows
    expect(result.fits).toEqual([]);
    expect(result.errors.map((e) => e.code)).toEqual(['no_rows']);
    expect(result.errors[0].message).toMatch(/none of the 15 usable rows/);
  });

  it('a missing label row counts as dropped', async () => {
    const dir = tempDir();
    plate(dir);
    const { result } = await runSpec(spec('compound != "CPD-A"'), dir);
    const fit = result.fits[0];
    expect(fit.goodness.n).toBe(10);
    expect(fit.rowsDropped).toBe(6);
  });

  it('an item that names a column too is a located error with the fix', () => {
    const dir = tempDir();
    plate(dir);
    const text = spec('compound == "Reference"');
    const { diagnostics } = analyze(text, { headers: headerLookup(dir) });
    const d = diagnostics.find((x) => x.code === 'text_or_column');
    expect(d?.severity).toBe('error');
    expect(text.slice(d!.range.start.offset, d!.range.end.offset)).toBe('"Reference"');
    expect(d!.message).toMatch(/write Reference without quotes/);
  });

  it('text outside a where condition, or compared with a number, is an error', () => {
    const dir = tempDir();
    plate(dir);
    const inModel = `data plate = "plate.csv"\nfit line on plate {\n  model y = a + b * when(compound == "CPD-A", x, 0)\n  param a\n  param b\n}\n`;
    expect(analyze(inModel, { headers: headerLookup(dir) }).diagnostics.map((d) => d.code)).toContain('text_not_allowed');
    expect(analyze(spec('x == "CPD-A" or "CPD-A" == 3'), { headers: headerLookup(dir) }).diagnostics.map((d) => d.code)).toContain('text_not_allowed');
  });

  it('quoted columns compared with numbers stay columns (as before)', () => {
    const dir = tempDir();
    plate(dir);
    const { plan, diagnostics } = analyze(spec('"Reference" > 1'), { headers: headerLookup(dir) });
    expect(diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
    expect(plan.data[0].filter).toMatchObject({ kind: 'compare', left: { kind: 'column', name: 'Reference' } });
  });

  it('a numbers-only column compared with text is a located run error with the number form', async () => {
    const dir = tempDir();
    plate(dir);
    const { result } = await runSpec(spec('x == "3"'), dir, { headers: false });
    expect(result.errors.map((e) => e.code)).toEqual(['text_on_numbers']);
    expect(result.errors[0].message).toMatch(/x == 3/);
    expect(result.errors[0].range).toBeDefined();
  });
});
