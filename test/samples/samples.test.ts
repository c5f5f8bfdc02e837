/**
 * Every sample end to end: it checks clean, fits with exit 0 and passing
 * expectations, its JSON validates, its charts are well-formed, the true
 * parameters of the generator lie inside the intervals, and the generator
 * reproduces the checked-in data byte for byte.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import type { RunResult } from '../../engine/result';
import { chartSvgs } from '../../engine/views/svg';
import { cleanTemp, cli, SAMPLE_NAMES, SAMPLES, sampleCopy, validateResult } from '../cli/helpers';
import { markItems, parseXml } from '../views/xml';
import { generate } from '../../samples/generate.mjs';

afterAll(cleanTemp);

type Truth = { samples: Record<string, Record<string, Record<string, number>>> };
const truth = JSON.parse(readFileSync(join(SAMPLES, 'truth.json'), 'utf8')) as Truth;

async function runSample(name: string): Promise<RunResult> {
  const r = await cli(sampleCopy(name), 'fit', `${name}.lsq`, '--json', '-');
  expect(r.code, `${name}: ${r.stderr}`).toBe(0);
  return JSON.parse(r.stdout) as RunResult;
}

describe('samples', () => {
  it('has at least six scenarios, each with a data file, a header comment and expectations', () => {
    expect(SAMPLE_NAMES.length).toBeGreaterThanOrEqual(6);
    for (const name of SAMPLE_NAMES) {
      const spec = readFileSync(join(SAMPLES, name, `${name}.lsq`), 'utf8');
      expect(spec.startsWith('# '), name).toBe(true);
      expect(spec).toMatch(/^expect /m);
      expect(spec).toMatch(/^data \w+ = "[^"]+\.csv"/m);
    }
    for (const clinical of ['photometer', 'doseresponse']) {
      expect(readFileSync(join(SAMPLES, clinical, `${clinical}.lsq`), 'utf8')).toMatch(/CAUTION: .*\n(#.*\n)*#.*qualified people/);
    }
  });

  it('regenerates the checked-in data exactly (samples/generate.mjs)', () => {
    const files = generate();
    expect(Object.keys(files).length).toBe(SAMPLE_NAMES.length + 1);
    for (const [rel, text] of Object.entries(files)) expect(readFileSync(join(SAMPLES, rel), 'utf8'), rel).toBe(text);
  });

  for (const name of SAMPLE_NAMES) {
    describe(name, () => {
      it('fits with every expectation passing and schema-valid JSON', async () => {
        const result = await runSample(name);
        const v = validateResult(result);
        expect(v.ok, v.errors).toBe(true);
        expect(result.errors).toEqual([]);
        expect(result.expectations.length).toBeGreaterThan(0);
        for (const e of result.expectations) expect(e.passed, `${e.expectation.text}: ${e.message}`).toBe(true);
        for (const f of result.fits) expect(f.stop.converged, f.name).toBe(true);
      });

      it('recovers the true parameters within 99.9 % intervals (and the reported 95 % ones, for these seeds)', async () => {
        const result = await runSample(name);
        const expected = truth.samples[name];
        for (const [fitName, params] of Object.entries(expected)) {
          const fit = result.fits.find((f) => f.name === fitName);
          expect(fit, fitName).toBeDefined();
          const t999 = tQuantile(0.9995, fit!.goodness.dof); // two-sided 99.9 %
          for (const [param, value] of Object.entries(params)) {
            const p = fit!.parameters.find((q) => q.name === param)!;
            expect(p, `${fitName}.${param}`).toBeDefined();
            const half = t999 * (p.stderr as number);
            expect(Math.abs(p.estimate - value), `${fitName}.${param}: ${p.estimate} vs true ${value}`).toBeLessThanOrEqual(half);
            expect(value).toBeGreaterThanOrEqual(p.lower as number);
            expect(value).toBeLessThanOrEqual(p.upper as number);
          }
        }
      });

      it('draws well-formed charts with one symbol per data point', async () => {
        const result = await runSample(name);
        for (const fit of result.fits) {
          const charts = await chartSvgs(fit);
          expect(charts.length).toBe(fit.points.x ? 5 : 4);
          for (const c of charts) {
            const root = parseXml(c.svg);
            if (c.id !== 'histogram') expect(markItems(root, 'data_points'), `${fit.name} ${c.id}`).toHaveLength(fit.goodness.n);
          }
        }
      });
    });
  }
});
