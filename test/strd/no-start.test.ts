import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { requireInCi } from '../fixtures/required';
import { strdDir, strdAvailable, readStrd } from './read-strd';
import { NLS_ORDER } from './run-strd';
import { makeWorkDir } from './pipeline';
import { meetsNoStartTargets, noStartTable, NO_START_TARGETS, runNoStart, type NoStartRow } from './no-start';
import { applyRelabelling, relabellings } from './relabel';

const dir = strdDir();
const available = requireInCi('NIST StRD data', strdAvailable(dir), `STRD_DIR=${dir}`);

let work: ReturnType<typeof makeWorkDir> | null = null;
const rows: NoStartRow[] = [];
beforeAll(() => {
  if (available) work = makeWorkDir();
});
afterAll(() => {
  work?.dispose();
  if (process.env.STRD_TABLE && rows.length) console.log(`\nNIST StRD without start values (via spec)\n${noStartTable(rows)}\n`);
});

describe.skipIf(!available)('test/strd/no-start: NIST StRD nonlinear with no start values, via spec', () => {
  for (const name of NLS_ORDER) {
    it(`NIST StRD ${name} without start values reaches the certified minimum`, async () => {
      const ds = readStrd('nls', name, dir);
      const row = await runNoStart(ds, work!.dir);
      rows.push(row);
      expect(row.errors).toEqual([]);
      const fit = row.fit!;
      expect(fit.parameters.every((q) => q.start === 'guessed')).toBe(true);
      expect(fit.stop.converged, fit.stop.message).toBe(true);
      // NIST StRD certified residual sum of squares, 7 digits
      expect(row.lreRSS).toBeGreaterThanOrEqual(NO_START_TARGETS.rss);
      // NIST StRD certified parameters and standard errors, up to a relabelling of interchangeable terms
      expect(row.minLreParams).toBeGreaterThanOrEqual(NO_START_TARGETS.params);
      expect(row.minLreSE).toBeGreaterThanOrEqual(NO_START_TARGETS.se);
      expect(meetsNoStartTargets(row)).toBe(true);
      // the search ran (a nonlinear parameter had no start) and reports the minimum it returned
      expect(fit.search?.reason).toBe('no_start');
      expect(fit.search!.minima.filter((m) => m.reported)).toHaveLength(1);
      expect(fit.search!.minima[0].ssr).toBeLessThanOrEqual(fit.goodness.ssr * (1 + 1e-8));
    });
  }
});

describe('test/strd/relabel', () => {
  it('lists the identity first and the group of each symmetric model', () => {
    const b = (n: number) => Array.from({ length: n }, (_, k) => `b${k + 1}`);
    expect(relabellings('Misra1a', b(2))).toHaveLength(1);
    expect(relabellings('Lanczos1', b(6))).toHaveLength(6);
    expect(relabellings('Gauss1', b(8))).toHaveLength(8);
    expect(relabellings('ENSO', b(9))).toHaveLength(8);
    const v = { b1: 1, b2: 2, b3: 3, b4: 4, b5: -5, b6: 6, b7: 7, b8: 8 };
    const all = relabellings('Gauss1', b(8)).map((m) => applyRelabelling(m, v));
    expect(all[0]).toEqual(v);
    expect(all).toContainEqual({ b1: 1, b2: 2, b3: 6, b4: 7, b5: 8, b6: 3, b7: 4, b8: -5 });
    expect(all).toContainEqual({ b1: 1, b2: 2, b3: 6, b4: 7, b5: -8, b6: 3, b7: 4, b8: 5 });
  });
});
