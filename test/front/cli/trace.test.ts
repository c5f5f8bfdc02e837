/**
 * `leastwise fit --trace`: the per-iteration solver trace in the summary and
 * in the JSON result (validated against engine/result.schema.json), for an
 * unbounded fit (Levenberg–Marquardt: samples/cooling with its bounds
 * removed) and a bounded one (the interior reflective trust region,
 * samples/doseresponse).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { EXIT } from '../../../engine/front/cli/io';
import type { RunResult } from '../../../engine/result';
import { cleanTemp, cli, sampleCopy, validateResult } from './helpers';

afterAll(cleanTemp);

/** samples/cooling without its parameter bounds. */
function unboundedCooling(): string {
  const dir = sampleCopy('cooling');
  const file = join(dir, 'cooling.lsq');
  const text = readFileSync(file, 'utf8');
  const next = text.replace(' in [0, 400]', '').replace(' in [0.1, 1000]', '');
  if (next === text) throw new Error('cooling.lsq has no bounds to remove');
  writeFileSync(file, next);
  return dir;
}

describe('cli/fit --trace', () => {
  it('prints the trace table and records it in the JSON (Levenberg–Marquardt, no bounds)', async () => {
    const r = await cli(unboundedCooling(), 'fit', 'cooling.lsq', '--trace');
    expect(r.code).toBe(EXIT.ok);
    expect(r.stdout).toMatch(/Solver trace \(Levenberg–Marquardt\): \d+ trial steps\./);
    expect(r.stdout).toMatch(/iteration +cost +trial cost +gradient +step +radius +ratio +accepted/);
    const j = await cli(unboundedCooling(), 'fit', 'cooling.lsq', '--trace', '--json', '-');
    const result = JSON.parse(j.stdout) as RunResult;
    expect(validateResult(result).errors).toBe('');
    const t = result.fits[0].trace!;
    expect(t.solver).toBe('levenberg_marquardt');
    expect(t.records.length).toBeGreaterThan(0);
    // accepted trials lower the cost; their count is the iteration count
    expect(t.records.filter((x) => x.accepted)).toHaveLength(result.fits[0].iterations);
    for (const x of t.records.filter((y) => y.accepted)) expect(x.trialCost!).toBeLessThan(x.cost);
  });

  it('a bounded fit records the reflective method, with step kinds and the parameters scaled by their bounds', async () => {
    const j = await cli(sampleCopy('doseresponse'), 'fit', 'doseresponse.lsq', '--trace', '--json', '-');
    const result = JSON.parse(j.stdout) as RunResult;
    expect(validateResult(result).errors).toBe('');
    const fit = result.fits[0];
    expect(fit.boundsMethod).toBe('reflective');
    expect(fit.trace!.solver).toBe('reflective_trust_region');
    expect(fit.trace!.records.every((x) => x.kind !== undefined && Array.isArray(x.active))).toBe(true);
  });

  it('without --trace there is no trace', async () => {
    const j = await cli(sampleCopy('cooling'), 'fit', 'cooling.lsq', '--json', '-');
    expect((JSON.parse(j.stdout) as RunResult).fits[0].trace).toBeUndefined();
  });
});
