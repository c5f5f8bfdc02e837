/**
 * Parameter recovery of every single-fit sample scenario, judged over many
 * fresh seeds rather than the one chosen for the checked-in data: for each
 * scenario the generator (samples/generate.mjs) draws SEEDS new data sets
 * around its true values, the sample's own spec fits each one, and for every
 * parameter we count how often its reported 95 % interval misses the truth.
 *
 * Acceptance (common practice for a coverage check): a miss count is
 * Binomial(SEEDS, 0.05) when the intervals are right; with Bonferroni over
 * every parameter checked here (about 30), each count must stay at or below
 * the binomial 1 − 0.001/30 quantile (12 of 60 for 30 checks; 3 expected). Nonlinear intervals
 * are linearised, so a slightly higher miss rate would still pass; a rate far
 * off (a wrong standard error, a biased estimate) fails. Deterministic: the
 * seeds are fixed.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import binomialQuantile from '@stdlib/stats-base-dists-binomial-quantile';
import { generate, SEEDS } from '../../samples/generate.mjs';
import { cleanTemp, SAMPLES } from '../front/cli/helpers';
import { runSpec, tempDir } from '../run/helpers';

afterAll(cleanTemp);

/** Fresh data sets per scenario: enough for a coverage count, few enough for the suite (about 10 s). */
const DRAWS = 60;
/** Scenarios with one fit and truth per parameter, and the binding series (a joint fit over tables, truth per table); the plate sample is a per-group fit, judged by its own coverage check; potency, a joint fit, by test/run/joint.test.ts. */
const SINGLE = Object.keys(SEEDS).filter((s) => s !== 'plate' && s !== 'potency');
const ALPHA = 0.001;

/** Per fit: parameter → value, or (a fit over several tables, `binding`) table → parameter → value. */
type Truth = Record<string, Record<string, number> | Record<string, Record<string, number>>>;

describe('samples: parameter recovery over fresh seeds', () => {
  const truthOf = (files: Record<string, string>, name: string) => (JSON.parse(files['truth.json']) as { samples: Record<string, Truth> }).samples[name];
  const count = (t: Record<string, unknown>): number => Object.values(t).reduce<number>((m, v) => m + (typeof v === 'object' && v !== null ? count(v as Record<string, unknown>) : 1), 0);
  const checks = SINGLE.reduce((n, name) => n + count(truthOf(generate(), name)), 0);
  const limit = binomialQuantile(1 - ALPHA / checks, DRAWS, 0.05);

  it(`counts the checks and a limit from the binomial law (${checks} parameters)`, () => {
    expect(checks).toBeGreaterThan(15);
    expect(limit).toBeGreaterThan(3); // expected misses: 0.05 · DRAWS = 3
    expect(limit).toBeLessThan(DRAWS / 4);
  });

  for (const name of SINGLE) {
    it(`${name}: 95 % intervals miss the truth no more often than chance allows`, async () => {
      const spec = readFileSync(join(SAMPLES, name, `${name}.lsq`), 'utf8');
      const misses = new Map<string, number>();
      let fitted = 0;
      for (let k = 1; k <= DRAWS; k++) {
        const seed = SEEDS[name] * 1000 + k; // far from the seeds searched when choosing the checked-in data
        const files = generate({ [name]: seed });
        const dir = tempDir();
        mkdirSync(dir, { recursive: true });
        for (const [rel, text] of Object.entries(files)) if (rel.startsWith(`${name}/`)) writeFileSync(join(dir, rel.slice(name.length + 1)), text);
        const { result } = await runSpec(spec, dir);
        const truth = truthOf(files, name);
        for (const [fitName, byFit] of Object.entries(truth)) {
          // a joint fit over tables: each table's result against its own truth (the shared kd counted per table)
          const perTable = Object.values(byFit).every((v) => typeof v === 'object');
          const entries: [string | undefined, Record<string, number>][] = perTable
            ? Object.entries(byFit as Record<string, Record<string, number>>)
            : [[undefined, byFit as Record<string, number>]];
          for (const [group, params] of entries) {
          const fit = result.fits.find((f) => f.name === fitName && f.group === group)!;
          expect(fit.stop.converged, `${name} seed ${seed}: ${fitName} ${fit.stop.message}`).toBe(true);
          fitted++;
          for (const [param, value] of Object.entries(params)) {
            const p = fit.parameters.find((q) => q.name === param)!;
            const key = `${fitName}${group === undefined ? '' : `[${group}]`}.${param}`;
            const inside = value >= (p.lower as number) && value <= (p.upper as number);
            misses.set(key, (misses.get(key) ?? 0) + (inside ? 0 : 1));
          }
          }
        }
      }
      expect(fitted).toBeGreaterThanOrEqual(DRAWS);
      for (const [key, m] of misses) expect(m, `${name} ${key}: ${m} of ${DRAWS} intervals missed (limit ${limit})`).toBeLessThanOrEqual(limit);
    });
  }
});
