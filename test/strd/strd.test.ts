import { describe, it, expect } from 'vitest';
import { requireInCi } from '../fixtures/required';
import { strdDir, strdAvailable, readStrd } from './read-strd';
import { fitDataset, NLS_ORDER, LLS_ORDER, TARGETS, STRD_LM_OPTIONS, type StrdRow } from './run-strd';

const dir = strdDir();
const available = requireInCi('NIST StRD data', strdAvailable(dir), `STRD_DIR=${dir}`);

describe.skipIf(!available)('NIST StRD nonlinear regression (Levenberg–Marquardt, both starts)', () => {
  for (const name of NLS_ORDER) {
    for (const start of [1, 2] as const) {
      it(`NIST StRD ${name} start ${start}: parameters LRE >= ${TARGETS.nls.params}, SE and RSS LRE >= ${TARGETS.nls.se}`, () => {
        const row = fitDataset(readStrd('nls', name, dir), start);
        expect(row.stop === 'small_reduction' || row.stop === 'small_step' || row.stop === 'small_gradient').toBe(true);
        expect(row.minLreParams).toBeGreaterThanOrEqual(TARGETS.nls.params);
        expect(row.minLreSE).toBeGreaterThanOrEqual(TARGETS.nls.se);
        expect(row.lreRSS).toBeGreaterThanOrEqual(TARGETS.nls.rss);
      });
    }
  }
});

describe.skipIf(!available)('NIST StRD nonlinear regression with sign bounds (interior reflective trust region, both starts)', () => {
  // Sign bounds: [0, inf] where the certified value and both starts are positive, [-inf, 0] where all are
  // negative (run-strd.ts signBounds). A converged fit must be at the certified minimum (parameters scored
  // under the best relabelling of interchangeable terms, relabel.ts); the rest must say they did not converge.
  const rows: StrdRow[] = [];
  for (const name of NLS_ORDER) {
    for (const start of [1, 2] as const) {
      it(`NIST StRD ${name} start ${start} with sign bounds: at the certified minimum, or reported not converged`, () => {
        const row = fitDataset(readStrd('nls', name, dir), start, STRD_LM_OPTIONS, { solver: 'reflective', bounds: 'sign' });
        rows.push(row);
        const converged = row.stop === 'small_reduction' || row.stop === 'small_step' || row.stop === 'small_gradient';
        if (converged) {
          expect(row.minLreRelabelled).toBeGreaterThanOrEqual(TARGETS.nls.params);
          expect(row.lreRSS).toBeGreaterThanOrEqual(TARGETS.nls.rss);
        }
      });
    }
  }
  it('at most one of the 54 runs misses the minimum (measured: MGH17 from start 1, stagnated)', () => {
    expect(rows).toHaveLength(54);
    const missed = rows.filter((r) => !(r.lreRSS >= TARGETS.nls.rss && r.minLreRelabelled >= TARGETS.nls.params));
    expect(missed.length).toBeLessThanOrEqual(1);
  });
});

describe.skipIf(!available)('NIST StRD linear regression (pivoted QR + refinement)', () => {
  for (const name of LLS_ORDER) {
    it(`NIST StRD ${name}: parameters LRE >= ${TARGETS.lls.params}, SE and RSS LRE >= ${TARGETS.lls.se}`, () => {
      const row = fitDataset(readStrd('lls', name, dir), null);
      expect(row.stop).toBe('exact');
      expect(row.minLreParams).toBeGreaterThanOrEqual(TARGETS.lls.params);
      expect(row.minLreSE).toBeGreaterThanOrEqual(TARGETS.lls.se);
      expect(row.lreRSS).toBeGreaterThanOrEqual(TARGETS.lls.rss);
    });
  }
});

describe.skipIf(!available)('test/strd/read-strd', () => {
  it('NIST StRD MGH09: reads starts, certified values, RSS and data block', () => {
    const ds = readStrd('nls', 'MGH09', dir);
    expect(ds.parameters.map((p) => p.name)).toEqual(['b1', 'b2', 'b3', 'b4']);
    expect(ds.parameters[0].starts).toEqual([25, 0.25]);
    expect(ds.parameters[0].certified).toBe(1.9280693458e-1);
    expect(ds.parameters[0].digits).toBe(11);
    expect(ds.rss).toBe(3.0750560385e-4);
    expect(ds.n).toBe(11);
    expect(ds.columns).toEqual(['y', 'x']);
    expect(ds.data[1][0]).toBe(4);
  });
  it('NIST StRD Longley: reads 7 parameters, ANOVA residual SS and 6 predictors', () => {
    const ds = readStrd('lls', 'Longley', dir);
    expect(ds.parameters).toHaveLength(7);
    expect(ds.parameters[6].certified).toBe(1829.15146461355);
    expect(ds.rss).toBe(836424.055505915);
    expect(ds.columns).toHaveLength(7);
    expect(ds.n).toBe(16);
  });
  it('NIST StRD Wampler1: a printed zero counts its decimal places as digits', () => {
    const ds = readStrd('lls', 'Wampler1', dir);
    expect(ds.rss).toBe(0);
    expect(ds.rssDigits).toBe(15);
  });
});
