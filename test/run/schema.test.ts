import Ajv from 'ajv';
import { describe, expect, it } from 'vitest';
import schema from '../../engine/result.schema.json';
import { resultToJson, resultToJsonValue } from '../../engine/run/json';
import { normals, runSpec, tempDir, writeCsv } from './helpers';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';

const validate = new Ajv().compile(schema);

describe('engine/result.schema.json', () => {
  const dir = tempDir();
  const xs = Array.from({ length: 12 }, (_, i) => i);
  const e = normals(9, 12);
  writeCsv(dir, 's.csv', ['x', 'y', 'g', 'sd'], xs.map((x, i) => [x, 2 + 0.7 * x + 0.2 * e[i], i < 11 ? 'P' : 'Q', 0.2]));

  it('validates results of a rich run (groups, failure, queries, expectations, errors)', async () => {
    const { result } = await runSpec(`data d = "s.csv"
data missing = "missing.csv"
fit a on d {
  model y = p0 + p1 * x
  param p0
  param p1
  sigma sd
}
fit b on d {
  model y = p0 * exp(k * x)
  param p0 = 1
  param k = 0.1 in [0, 1]
}
fit grouped on d {
  model y = p0 + p1 * x
  param p0
  param p1
  per g
}
fit gone on missing {
  model y = c
  param c
}
predict a at x = 3 sigma 0.5
invert a at y = 5 sigma 0.5 readings 2
backcalc a
compare a, b
expect a.p1 within 0.5 .. 1
expect grouped.r2 above 0.9
expect a.prediction.upper at x = 3 sigma 0.5 below 100
expect gone.n above 1`, dir, { headers: false });
    expect(result.fits.some((f) => f.stop.code === 'failed')).toBe(true);
    expect(result.errors.length).toBeGreaterThan(0);
    const json = resultToJsonValue(result);
    const ok = validate(json);
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
  });

  it('rejects a result with a wrong field, so the check above can fail', async () => {
    const { result } = await runSpec(`data d = "s.csv"
fit a on d {
  model y = p0 + p1 * x
  param p0
  param p1
}`, dir);
    const json = resultToJsonValue<{ fits: { stop: { code: string } }[] }>(result);
    json.fits[0].stop.code = 'finished';
    expect(validate(json)).toBe(false);
  });
});

describe('run/json resultToJson', () => {
  it('writes NaN and ±Infinity as null and typed arrays as arrays', () => {
    const text = resultToJson({ a: NaN, b: [1, Infinity, -Infinity], c: Float64Array.of(2, NaN), d: { e: -0.5 } }, 0);
    expect(JSON.parse(text)).toEqual({ a: null, b: [1, null, null], c: [2, null], d: { e: -0.5 } });
  });
});

describe('test fixtures against engine/result.schema.json', () => {
  // Hand-kept results the view and panel tests read: they must stay results the engine could write.
  const root = join(__dirname, '..', '..');
  const files = ['test/fixtures', 'test/extension/fixtures'].flatMap((dir) => readdirSync(join(root, dir)).filter((f) => f.endsWith('-run.json')).map((f) => `${dir}/${f}`));
  it('finds the result fixtures', () => expect(files.length).toBeGreaterThanOrEqual(3));
  for (const file of files) {
    it(`${file} is a valid result`, () => {
      const value = JSON.parse(readFileSync(join(root, file), 'utf8'));
      const ok = validate(value);
      expect(ok, JSON.stringify(validate.errors?.slice(0, 5))).toBe(true);
    });
  }
});
