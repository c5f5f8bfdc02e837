/**
 * CLI-level data problems (engine/data, engine/run/fit-data): every CSV error
 * at its exact `file:line:column` for LF, CRLF, CR-only files and mixes,
 * header-only and all-missing data as located data errors (exit 2), wide
 * headers and the data statement's options in `check`, weight-0 rows left
 * out of the fit.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { EXIT } from '../../../engine/front/cli/io';
import { cleanTemp, cli, hasStackTrace, tempDir, validateResult } from './helpers';

afterAll(cleanTemp);

const LINE_SPEC = 'data d = "d.csv"\nfit f on d {\n  model y = a + b * x\n  param a\n  param b\n}\n';

/** Line-end styles; `mixed` cycles CRLF, LF, CR from line to line and uses a lone CR inside quotes. */
const STYLES = { LF: ['\n'], CRLF: ['\r\n'], CR: ['\r'], mixed: ['\r\n', '\n', '\r'] } as const;

/**
 * A file whose lines are `lines` (a line may hold `<BR>`, a line break inside
 * a quoted cell, so one record spans two file lines), ended per `style`.
 */
function csv(style: keyof typeof STYLES, lines: string[]): string {
  const ends = STYLES[style];
  let k = 0;
  const next = () => ends[k++ % ends.length];
  return lines.map((l) => l.replace(/<BR>/g, () => (style === 'mixed' ? '\r' : next())) + next()).join('');
}

async function fitWith(text: string, spec = LINE_SPEC, ...args: string[]) {
  const dir = tempDir('lw-data-');
  writeFileSync(join(dir, 'd.csv'), text);
  writeFileSync(join(dir, 's.lsq'), spec);
  const r = await cli(dir, 'fit', 's.lsq', ...args);
  expect(hasStackTrace(r.stdout + r.stderr)).toBe(false);
  return r;
}

/** Line 1 header; the record of lines 3-4 holds a quoted line break; line 6 is the place of the problem under test. */
const around = (line6: string, line34 = '"two<BR>lines",2,4.1') => ['note,x,y', 'a,1,2.0', line34, 'c,3,6.2', line6, 'e,5,9.9'];

describe.each(Object.keys(STYLES) as (keyof typeof STYLES)[])('data errors in a %s file', (style) => {
  it('a bad cell after a quoted line break: exact line and column', async () => {
    const r = await fitWith(csv(style, around('d,4,oops')));
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stderr).toContain('d.csv:6:3: error: column "y" holds "oops", not a number');
  });

  it('a bad cell in the second line of a record with a quoted line break', async () => {
    const r = await fitWith(csv(style, around('d,4,8.0', '"two<BR>lines",2,bad')));
    expect(r.stderr).toContain('d.csv:4:3: error: column "y" holds "bad", not a number');
  });

  it('a row with too few fields names the missing column', async () => {
    const r = await fitWith(csv(style, around('d,4')));
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stderr).toContain('d.csv:6:3: error: 2 fields where the header has 3 (comma-separated); column "y" (field 3) is missing');
  });

  it('a row with too many fields names the first extra field', async () => {
    const r = await fitWith(csv(style, around('d,4,8.0,9')));
    expect(r.stderr).toContain('d.csv:6:4: error: 4 fields where the header has 3 (comma-separated); field 4 has no column');
  });

  it('text after a closing quote', async () => {
    const r = await fitWith(csv(style, around('"d"x,4,8.0')));
    expect(r.stderr).toMatch(/d\.csv:6:1: error: text after the closing quote of a quoted cell in "note" \(field 1\)/);
  });

  it('a quoted cell that is never closed, at the line where it opens', async () => {
    const r = await fitWith(csv(style, around('d,4,"8.0')));
    expect(r.stderr).toMatch(/d\.csv:6:3: error: the quoted cell of "y" \(field 3\) that opens here is never closed/);
  });

  it('reads the clean file with the quoted line break, every record on its line', async () => {
    const r = await fitWith(csv(style, around('d,4,8.0')), LINE_SPEC, '--json', '-');
    expect(r.code).toBe(EXIT.ok);
    const fit = JSON.parse(r.stdout).fits[0];
    expect(fit.points.row).toEqual([2, 3, 5, 6, 7]);
    expect(fit.goodness.n).toBe(5);
  });
});

describe('data errors: empty data', () => {
  it('a header-only file is a data error at its header line (exit 2), BOM and CRLF or not', async () => {
    for (const text of ['x,y\n', '\uFEFFx,y\r\n', '\n\nx,y']) {
      const r = await fitWith(text);
      expect(r.code).toBe(EXIT.inputError);
      const line = text.startsWith('\n') ? 3 : 1;
      expect(r.stderr).toContain(`d.csv:${line}: error: fit f: d.csv has a header but no data rows`);
    }
  });

  it('all rows missing a used cell is a data error at the first missing cell', async () => {
    const r = await fitWith('x,y,z\n1,NA,7\n,2,7\n3,,7\n');
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stderr).toContain('d.csv:2:2: error: fit f: every one of the 3 data rows of d.csv has an empty or NA cell in a column the fit uses (x, y), so no row is left (the first such cell is here)');
  });

  it('fewer usable rows than free parameters is a data error at the fit statement, with what was left out', async () => {
    const r = await fitWith('x,y\n1,2\n2,NA\n3,4\n', LINE_SPEC.replace('param b\n', 'param b\n  param c\n').replace('b * x', 'b * x + c * x^2'));
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stderr).toMatch(/^s\.lsq:2:1: error: fit f: d\.csv leaves 2 usable rows \(1 dropped for an empty or NA cell\) for 3 free parameters: at least 3 are needed/m);
    expect(r.stderr).not.toMatch(/^error:/m);
    const w = await fitWith('x,y,w\n1,2,1\n2,3,0\n', LINE_SPEC.replace('param b\n', 'param b\n  weight w\n'));
    expect(w.code).toBe(EXIT.inputError);
    expect(w.stderr).toMatch(/^s\.lsq:2:1: error: fit f: d\.csv leaves 1 usable row \(1 left out by a weight of 0\) for 2 free parameters/m);
    const json = await fitWith('x,y\n1,2\n', LINE_SPEC, '--json', '-');
    const e = (JSON.parse(json.stdout) as { errors: { code: string; file?: string; range?: { start: { line: number } } }[] }).errors;
    expect(e.map((x) => [x.code, x.file, x.range?.start.line])).toEqual([['too_few_rows', 'd.csv', 2]]);
  });

  it('a where condition that keeps no row is located at the condition in the spec', async () => {
    const r = await fitWith('x,y\n1,2\n2,3\n3,5\n', LINE_SPEC.replace('"d.csv"', '"d.csv" where x > 10'));
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stderr).toMatch(/^s\.lsq:1:\d+: error: fit f: the where condition of the data statement leaves none of the 3 usable rows of d\.csv/m);
  });

  it('a blank file and one of only delimiters say so', async () => {
    // at line 1, where the header was expected
    expect((await fitWith('')).stderr).toMatch(/^d\.csv:1: error: d\.csv is empty: expected a header line naming the columns$/m);
    expect((await fitWith(',,\r\n;\r\n')).stderr).toMatch(/^d\.csv:1: error: d\.csv has no header line: it holds only blank lines and delimiters$/m);
  });
});

describe('check: headers read as fit reads them', () => {
  it('honours delimiter ";" (the header has more commas than semicolons)', async () => {
    const dir = tempDir('lw-data-');
    writeFileSync(join(dir, 'd.csv'), 'temp, degC, raw;time\n20,5;1\n21,5;2\n23;3\n');
    const spec = (opt: string) => `data d = "d.csv"${opt}\nfit f on d {\n  model "temp, degC, raw" = a + b * time\n  param a\n  param b\n}\n`;
    writeFileSync(join(dir, 'ok.lsq'), spec(' delimiter ";" decimal ","'));
    writeFileSync(join(dir, 'bad.lsq'), spec(''));
    const ok = await cli(dir, 'check', 'ok.lsq');
    expect(ok.stdout).toBe('');
    expect(ok.code).toBe(EXIT.ok);
    const bad = await cli(dir, 'check', 'bad.lsq');
    expect(bad.code).toBe(EXIT.inputError);
    expect(bad.stdout).toMatch(/bad\.lsq:3:\d+: error: .*temp, degC, raw/);
    const fitted = await cli(dir, 'fit', 'ok.lsq', '--json', '-');
    expect(fitted.code).toBe(EXIT.ok);
  });

  it('reads a header of 100,000 columns (about 690 KB) whole', async () => {
    const dir = tempDir('lw-wide-');
    const names = Array.from({ length: 100_000 }, (_, j) => `c${j}`);
    const row = (k: number) => names.map((_, j) => (j === 99_999 ? 2 * k + 1 : k)).join(',');
    writeFileSync(join(dir, 'd.csv'), `${names.join(',')}\n${row(1)}\n${row(2)}\n${row(3)}\n`);
    writeFileSync(join(dir, 's.lsq'), 'data d = "d.csv"\nfit f on d {\n  model c99999 = a + b * c0\n  param a\n  param b\n}\n');
    const checked = await cli(dir, 'check', 's.lsq');
    expect(checked.stdout).toBe('');
    expect(checked.code).toBe(EXIT.ok);
    writeFileSync(join(dir, 'typo.lsq'), 'data d = "d.csv"\nfit f on d {\n  model c100000 = a + b * c0\n  param a\n  param b\n}\n');
    expect((await cli(dir, 'check', 'typo.lsq')).stdout).toMatch(/typo\.lsq:3:\d+: error: 'c100000' is not a parameter, constant or column/);
    const fitted = await cli(dir, 'fit', 's.lsq', '--json', '-');
    expect(fitted.code).toBe(EXIT.ok);
    const fit = JSON.parse(fitted.stdout).fits[0];
    expect(fit.parameters.map((p: { estimate: number }) => p.estimate)).toEqual([expect.closeTo(1, 12), expect.closeTo(2, 12)]);
  });

  it('a header that does not end within 16 MiB is a warning at the data statement, not a cut header', async () => {
    const dir = tempDir('lw-huge-');
    writeFileSync(join(dir, 'd.csv'), `x,${'y'.repeat(17 * 1024 * 1024)}\n1,2\n`);
    writeFileSync(join(dir, 's.lsq'), 'data d = "d.csv"\nfit f on d {\n  model y = a + b * x\n  param a\n  param b\n}\n');
    const r = await cli(dir, 'check', 's.lsq');
    expect(r.stdout).toContain('s.lsq:1:1: warning: the header of d.csv does not end within its first 16 MiB');
  });
});

describe('weight 0 leaves a point out', () => {
  const data = 'x,y,w\n1,2.1,1\n2,3.9,1\n3,6.2,0\n4,8.1,1\n5,9.8,1\n6,40,0\n7,14.1,1\n';
  const spec = (extra: string) => `data d = "d.csv"${extra}\nfit f on d {\n  model y = a + b * x\n  param a\n  param b\n  weight w\n}\n`;

  it('lists the rows in the result, keeps them out of n, dof and the estimates, and warns', async () => {
    const r = await fitWith(data, spec(''), '--json', '-');
    expect(r.code).toBe(EXIT.ok);
    const json = JSON.parse(r.stdout);
    expect(validateResult(json).ok).toBe(true);
    const fit = json.fits[0];
    expect(fit.excluded).toEqual({ reason: 'weight_zero', row: [4, 7], x: [3, 6], y: [6.2, 40] });
    expect(fit.goodness.n).toBe(5);
    expect(fit.goodness.dof).toBe(3);
    expect(fit.points.row).toEqual([2, 3, 5, 6, 8]);
    expect(fit.warnings.map((w: { message: string }) => w.message)).toContain('2 rows of d.csv have weight 0 and are left out of the fit (lines 4, 7); they are still drawn');
    // the same numbers as leaving the rows out with a filter
    const filtered = JSON.parse((await fitWith(data, spec(' where w > 0'), '--json', '-')).stdout).fits[0];
    expect(fit.parameters).toEqual(filtered.parameters);
    expect(fit.goodness).toEqual(filtered.goodness);
  });

  it('negative and non-finite weights stay located errors; all weights 0 is a data error', async () => {
    const neg = await fitWith(data.replace('3,6.2,0', '3,6.2,-1'), spec(''));
    expect(neg.code).toBe(EXIT.inputError);
    expect(neg.stderr).toMatch(/d\.csv:4:3: error: fit f: weight must be non-negative and finite \(0 leaves a row out\), got -1 at data line 4/);
    const inf = await fitWith(data, spec('').replace('weight w', 'weight 1 / (w - w)'));
    expect(inf.code).toBe(EXIT.inputError);
    expect(inf.stderr).toMatch(/weight must be non-negative and finite/);
    const none = await fitWith(data, spec('').replace('weight w', 'weight 0 * w'));
    expect(none.code).toBe(EXIT.inputError);
    expect(none.stderr).toMatch(/s\.lsq:6:\d+: error: fit f: every one of the 7 usable rows of d\.csv has a weight of 0/);
  });

  it('a sigma of infinity stays an error (the language reads it as a division by zero, not as "leave out")', async () => {
    const r = await fitWith('x,y,s\n1,2,1\n2,4,0\n3,6,1\n', 'data d = "d.csv"\nfit f on d {\n  model y = a + b * x\n  param a\n  param b\n  sigma 1 / s\n}\n');
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stderr).toMatch(/sigma must be positive and finite, got inf at data line 3/);
  });

  it('a sigma whose weight 1/σ² leaves the range of doubles is a located error, not a silent drop', async () => {
    const spec = 'data d = "d.csv"\nfit f on d {\n  model y = a + b * x\n  param a\n  param b\n  sigma s\n}\n';
    for (const sigma of ['1e-200', '1e200']) {
      const r = await fitWith(`x,y,s\n1,2,1\n2,4,${sigma}\n3,6,1\n4,8.1,1\n`, spec);
      expect(r.code).toBe(EXIT.inputError);
      expect(r.stderr).toContain(`d.csv:3:3: error: fit f: sigma ${Number(sigma)} at data line 3 is out of range`);
    }
  });

  it('draws the left-out rows hollow in the data chart', async () => {
    const dir = tempDir('lw-w0-');
    writeFileSync(join(dir, 'd.csv'), data);
    writeFileSync(join(dir, 's.lsq'), spec(''));
    const r = await cli(dir, 'fit', 's.lsq', '--charts', 'charts', '--quiet');
    expect(r.code).toBe(EXIT.ok);
    const { readFileSync } = await import('node:fs');
    const svg = readFileSync(join(dir, 'charts', 'f-fit.svg'), 'utf8');
    expect(svg).toContain('Hollow points: 2 rows left out of the fit (weight 0).');
  });
});
