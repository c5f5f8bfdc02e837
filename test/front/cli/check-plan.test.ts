import { afterAll, describe, expect, it } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { EXIT } from '../../../engine/front/cli/io';
import { cleanTemp, cli, sampleCopy, SAMPLE_NAMES } from './helpers';

afterAll(cleanTemp);

describe('cli/check', () => {
  it('passes every sample with no diagnostics', async () => {
    for (const name of SAMPLE_NAMES) {
      const dir = sampleCopy(name);
      const r = await cli(dir, 'check', `${name}.lsq`);
      expect(r.code, `${name}: ${r.stdout}`).toBe(EXIT.ok);
      expect(r.stdout).toBe('');
      expect(r.stderr).toBe('1 file checked: 0 errors, 0 warnings\n');
    }
  });

  it('reports located errors, reading CSV headers for column names', async () => {
    const dir = sampleCopy('cooling');
    writeFileSync(join(dir, 'typo.lsq'), 'data bench = "cooling.csv"\nfit f on bench {\n  model temp_C = 20 + a * exp(-time_mn / 10)\n  param a = 1\n}\n');
    const r = await cli(dir, 'check', 'typo.lsq', 'cooling.lsq');
    expect(r.code).toBe(EXIT.inputError);
    const lines = r.stdout.trim().split('\n');
    expect(lines.length).toBeGreaterThanOrEqual(1);
    expect(lines[0]).toMatch(/^typo\.lsq:3:\d+: error: .*time_mn.*time_min/);
    for (const l of lines) expect(l).toMatch(/^typo\.lsq:\d+:\d+: (error|warning): /);
    expect(r.stderr).toMatch(/^2 files checked: [1-9]\d* errors?, 0 warnings\n$/);
  });

  it('locates syntax errors and missing files', async () => {
    const dir = sampleCopy('cooling');
    writeFileSync(join(dir, 'broken.lsq'), 'data bench = "cooling.csv"\nfit f on bench {\n  model temp_C = 20 + * 3\n}\n');
    const r = await cli(dir, 'check', 'broken.lsq', 'nowhere.lsq');
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stdout).toMatch(/^broken\.lsq:3:\d+: error: /m);
    expect(r.stdout).toContain('nowhere.lsq: error: cannot read file: no such file\n');
  });

  it('reports a missing data file at its data statement', async () => {
    const dir = sampleCopy('cooling');
    writeFileSync(join(dir, 'lost.lsq'), '# lost data\ndata bench = "lost.csv"\nfit f on bench {\n  model y = a * x\n  param a = 1\n}\n');
    const r = await cli(dir, 'check', 'lost.lsq');
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stdout).toBe("lost.lsq:2:1: error: data file not found: lost.csv (paths are relative to the spec's folder)\n");
  });

  it('needs at least one file', async () => {
    const r = await cli(sampleCopy('cooling'), 'check');
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stderr).toContain('check needs a spec file');
  });
});

describe('cli/plan', () => {
  it('prints the plan JSON of a spec', async () => {
    const r = await cli(sampleCopy('enzyme'), 'plan', 'enzyme.lsq');
    expect(r.code).toBe(EXIT.ok);
    const plan = JSON.parse(r.stdout);
    expect(plan.version).toBe(1);
    expect(plan.fits.map((f: { name: string }) => f.name)).toEqual(['mm', 'hill']);
    expect(plan.queries.map((q: { kind: string }) => q.kind)).toEqual(['compare', 'predict']);
    expect(plan.expectations).toHaveLength(3);
  });

  it('prints nothing on stdout for a spec with errors', async () => {
    const dir = sampleCopy('enzyme');
    writeFileSync(join(dir, 'bad.lsq'), 'fit f on nothing {\n  model y = a * x\n}\n');
    const r = await cli(dir, 'plan', 'bad.lsq');
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/^bad\.lsq:1:\d+: error: /);
  });
});
