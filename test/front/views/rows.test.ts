/**
 * engine/front/views/rows.ts with engine/run/fit-data.ts: how a fit's n came
 * from the rows of its file, counted once in the engine (result.ts
 * `rowAccount`) and stated the same way by every view — the CLI summary, the
 * Markdown report, the JSON and the results panel's header. Real-data shapes
 * (invented calibration readings): a blank in the predictor, a `where` that
 * removes a row and one that removes every row, weights of 0, a symlinked
 * CSV, a per-group fit (counts per group and in total).
 */
import { mkdirSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { FitResult, RowAccount, RunResult } from '../../../engine/result';
import { runText } from '../../../engine/front/views/text';
import { markdownReport } from '../../../engine/front/views/markdown';
import { accountOf, groupsAccount, leftOutClause, nSentence } from '../../../engine/front/views/rows';
import { resultToJson } from '../../../engine/run/json';
import { buildPanelModel, panelFit } from '../../../extension/logic/panel-model';
import { EXIT } from '../../../engine/front/cli/io';
import { cleanTemp, cli, tempDir, validateResult } from '../cli/helpers';
import { runSpec } from '../../run/helpers';

afterAll(cleanTemp);

/**
 * 17 rows: line 5 has weight 0 (plate A), line 7 a blank predictor (plate A), line 18 conc 99 (plate B), which
 * `where conc < 50` removes. So the single fit has n = 14 of 17; plate A 6 of 8, plate B 8 of 9.
 */
const CSV = `conc,signal,w,plate
0,0.02,1,A
1,1.05,1,A
2,2.1,1,A
3,2.9,0,A
4,4.2,1,A
,5.1,1,A
6,6.05,1,A
7,7.1,1,A
8,8.0,1,B
9,9.2,1,B
10,10.1,1,B
11,10.9,1,B
12,12.2,1,B
13,13.0,1,B
14,14.1,1,B
15,15.3,1,B
99,99,1,B
`;

const spec = (file: string, where = 'conc < 50') => `data cal = "${file}" where ${where}
fit line on cal {
  model signal = a + b * conc
  param a
  param b
  weight w
}
fit byplate on cal {
  model signal = a + b * conc
  param a
  param b
  weight w
  per plate
}
`;

function setup(): string {
  const dir = tempDir('lw-rows-');
  mkdirSync(join(dir, 'store'));
  writeFileSync(join(dir, 'store', 'readings.csv'), CSV);
  // the spec reads the data through a symbolic link, as lab shares often do
  symlinkSync(join(dir, 'store', 'readings.csv'), join(dir, 'cal.csv'));
  return dir;
}

const counts = (a: RowAccount | undefined) => Object.fromEntries((a?.leftOut ?? []).map((l) => [l.reason, l.count]));
const single = (r: RunResult) => r.fits.find((f) => f.name === 'line')!;
const groups = (r: RunResult) => r.fits.filter((f) => f.name === 'byplate');

describe('engine/front/views/rows', () => {
  const dir = setup();

  it('counts each reason once in the engine: where, empty cell, weight 0; rows = fitted + left out', async () => {
    const { result } = await runSpec(spec('cal.csv'), dir);
    const f = single(result);
    expect(f.goodness.n).toBe(14);
    expect(f.rowAccount).toEqual({ rows: 17, fitted: 14, leftOut: [{ reason: 'where', count: 1 }, { reason: 'missing_cell', count: 1 }, { reason: 'weight_zero', count: 1 }] });
    expect(f.fitRowAccount).toBeUndefined();
    expect(nSentence(accountOf(f))).toBe('n = 14 fitted (of 17 rows: 1 removed by where, 1 with an empty or NA cell, 1 with weight 0)');
  });

  it('per group: each group its own rows, the fit as a whole in fitRowAccount, the groups adding up to it', async () => {
    const { result } = await runSpec(spec('cal.csv'), dir);
    const [a, b] = groups(result);
    expect([a.group, b.group]).toEqual(['A', 'B']);
    expect(a.rowAccount).toMatchObject({ rows: 8, fitted: 6 });
    expect(counts(a.rowAccount)).toEqual({ missing_cell: 1, weight_zero: 1 });
    expect(b.rowAccount).toMatchObject({ rows: 9, fitted: 8 });
    expect(counts(b.rowAccount)).toEqual({ where: 1 });
    expect(a.fitRowAccount).toEqual(single(result).rowAccount);
    // the groups' accounts sum to the whole (no row here lacks a group label)
    const summed = groupsAccount([{ ...a, fitRowAccount: undefined }, { ...b, fitRowAccount: undefined }]);
    expect(summed).toEqual(a.fitRowAccount);
    for (const f of result.fits) expect(f.rowAccount!.rows).toBe(f.rowAccount!.fitted + f.rowAccount!.leftOut.reduce((k, l) => k + l.count, 0));
  });

  it('states the same sentence in the CLI text, the Markdown report, the JSON and the panel header', async () => {
    const { result } = await runSpec(spec('cal.csv'), dir);
    const text = runText(result);
    const report = markdownReport(result);
    const json = JSON.parse(resultToJson(result)) as RunResult;
    for (const f of result.fits) {
      const clause = leftOutClause(accountOf(f))!;
      expect(clause).toMatch(/^of \d+ rows: /);
      // CLI and report: the goodness-of-fit row of n carries the clause
      expect(text).toMatch(new RegExp(`points \\(n\\) +${f.goodness.n} +\\(${clause.replace(/[()]/g, '\\$&')}\\)`));
      expect(report).toContain(`| points (n) | ${f.goodness.n} | ${clause} |`);
      // JSON: the same counts as data
      const back = json.fits.find((x) => x.name === f.name && x.group === f.group)!;
      expect(back.rowAccount).toEqual(f.rowAccount);
      expect(leftOutClause(accountOf(back))).toBe(clause);
      // panel header: the engine's sentence, with the file lines of the rows it can name
      const header = panelFit(f, false).rows;
      expect(header.startsWith(`n = ${f.goodness.n} fitted (of ${f.rowAccount!.rows} rows: `)).toBe(true);
      for (const l of f.rowAccount!.leftOut) expect(header).toContain(`${l.count} ${{ where: 'removed by where', missing_cell: 'with an empty or NA cell', no_group: 'without a group label', weight_zero: 'with weight 0' }[l.reason]}`);
    }
    expect(panelFit(single(result), false).rows).toBe('n = 14 fitted (of 17 rows: 1 removed by where, 1 with an empty or NA cell (line 7), 1 with weight 0 (line 5), drawn hollow)');
    // the per-group heading states the whole fit in the CLI and the report alike
    const whole = 'n = 14 fitted over 2 groups (of 17 rows: 1 removed by where, 1 with an empty or NA cell, 1 with weight 0)';
    expect(text).toContain(`  ${whole}`);
    expect(report).toContain(whole);
    // and the panel's group table summary
    const model = buildPanelModel(result, { specUri: 'file:///s.lsq', specName: 's.lsq' });
    expect(model.groups.find((g) => g.fit === 'byplate')?.summary).toContain(whole);
  });

  it('the JSON written by the CLI validates against the schema and carries the counts', async () => {
    writeFileSync(join(dir, 's.lsq'), spec('cal.csv'));
    const run = await cli(dir, 'fit', 's.lsq', '--json', '-');
    const value = JSON.parse(run.stdout) as RunResult;
    expect(validateResult(value)).toEqual({ ok: true, errors: '' });
    expect(counts(single(value).rowAccount)).toEqual({ where: 1, missing_cell: 1, weight_zero: 1 });
  });

  it('a where that removes every row is a located refusal, not a fit', async () => {
    writeFileSync(join(dir, 'none.lsq'), spec('cal.csv', 'conc > 500'));
    const run = await cli(dir, 'fit', 'none.lsq');
    expect(run.code).toBe(EXIT.inputError);
    // at the condition (line 1, column 28: `conc > 500`), with the rows it had
    expect(run.stderr).toContain('none.lsq:1:28: error: fit line: the where condition of the data statement leaves none of the 16 usable rows of cal.csv');
    expect(run.stderr).toContain('none.lsq:1:28: error: fit byplate: the where condition');
    expect(run.stdout).not.toMatch(/NaN|points \(n\)/);
  });

  it('a result written before rowAccount existed still states what it knows (empty cells, weight 0)', () => {
    const old = { goodness: { n: 14 }, rowsDropped: 1, excluded: { reason: 'weight_zero', row: [5], x: [3], y: [2.9] } } as unknown as FitResult;
    expect(nSentence(accountOf(old))).toBe('n = 14 fitted (of 16 rows: 1 with an empty or NA cell, 1 with weight 0)');
    const clean = { goodness: { n: 9 }, rowsDropped: 0 } as unknown as FitResult;
    expect(nSentence(accountOf(clean))).toBe('n = 9 fitted (all 9 rows)');
    expect(leftOutClause(accountOf(clean))).toBeNull();
  });
});
