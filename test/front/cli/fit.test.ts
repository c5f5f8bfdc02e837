import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { EXIT } from '../../../engine/front/cli/io';
import { runExitCode } from '../../../engine/front/cli/fit';
import { memoryIo } from '../../../engine/front/cli/io';
import { runCli } from '../../../engine/front/cli/main';
import { parseXml } from '../views/xml';
import { cleanTemp, cli, hasStackTrace, sampleCopy, validateResult } from './helpers';
import type { RunResult } from '../../../engine/result';

afterAll(cleanTemp);

function edit(dir: string, file: string, from: string | RegExp, to: string): void {
  const path = join(dir, file);
  const text = readFileSync(path, 'utf8');
  const next = text.replace(from, to);
  if (next === text) throw new Error(`edit of ${file} changed nothing`);
  writeFileSync(path, next);
}

describe('cli/fit', () => {
  it('shows the iterations of a fit on a terminal\'s progress line, then clears it', async () => {
    const dir = sampleCopy('cooling');
    // a clock that jumps a second per reading: every update passes the quiet period and the throttle
    let t = 0;
    const io = { ...memoryIo(dir, true), now: () => (t += 1000) };
    const code = await runCli(['fit', 'cooling.lsq'], io);
    expect(code).toBe(EXIT.ok);
    const lines = io.err.filter((e) => e.startsWith('\r\x1b[2K') && e.length > 5);
    expect(lines.some((l) => /fitting newton: iteration 1, objective \d/.test(l))).toBe(true);
    expect(lines.some((l) => l.endsWith('fitted newton (1 of 1)'))).toBe(true);
    expect(io.err.filter((e) => e !== '').at(-1)).toBe('\r\x1b[2K'); // cleared at the end
  });

  it('prints a summary and exits 0 when every expectation passes', async () => {
    const r = await cli(sampleCopy('cooling'), 'fit', 'cooling.lsq');
    expect(r.code).toBe(EXIT.ok);
    expect(r.stdout).toContain('Fit newton: temp_C against time_min (Levenberg–Marquardt, squared loss)');
    expect(r.stdout).toMatch(/^ {2}rise +\d+\.\d+ +\d\.\d+ +\d+\.\d+ +\d+\.\d+ +degC$/m);
    expect(r.stdout).toMatch(/reduced χ² \(χ²\/dof\) +\d/);
    expect(r.stdout).toContain('5 of 5 expectations passed.');
    expect(r.stderr).toBe('');
  });

  it('exits 1 when an expectation fails, naming its line', async () => {
    const dir = sampleCopy('cooling');
    edit(dir, 'cooling.lsq', 'expect newton.tau within 13.8 .. 14.6', 'expect newton.tau within 15 .. 16');
    const r = await cli(dir, 'fit', 'cooling.lsq', '--quiet');
    expect(r.code).toBe(EXIT.expectationFailed);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/^cooling\.lsq:\d+:1: error: expectation failed: newton\.tau within 15 \.\. 16 \(/m);
  });

  it('prints the derived quantities table (photometer LOD and LOQ) and their expectations', async () => {
    const r = await cli(sampleCopy('photometer'), 'fit', 'photometer.lsq');
    expect(r.code).toBe(EXIT.ok);
    const lines = r.stdout.split('\n');
    const at = lines.indexOf('Derived quantities');
    expect(at).toBeGreaterThan(0);
    expect(lines[at + 1]).toMatch(/^ {2}quantity +value +std\. error +95% interval +unit$/);
    expect(lines[at + 3]).toMatch(/^ {2}lod +0\.08\d+ +0\.000\d+ +\[0\.08\d+, 0\.08\d+\] +mg\/L$/);
    expect(lines[at + 4]).toMatch(/^ {2}loq +0\.2\d+ +0\.000\d+ +\[0\.2\d+, 0\.2\d+\] +mg\/L$/);
    expect(lines[at + 5]).toContain('lod, loq: standard error by the delta method');
    expect(r.stdout).toMatch(/PASS {2}lod below 0\.1 +actual 0\.08/);
  });

  it('exits 1 when an expectation on a derived quantity fails, naming its line', async () => {
    const dir = sampleCopy('photometer');
    edit(dir, 'photometer.lsq', 'expect lod below 0.1', 'expect lod below 0.05');
    const r = await cli(dir, 'fit', 'photometer.lsq', '--quiet');
    expect(r.code).toBe(EXIT.expectationFailed);
    const line = readFileSync(join(dir, 'photometer.lsq'), 'utf8').split('\n').indexOf('expect lod below 0.05') + 1;
    expect(r.stderr).toMatch(new RegExp(`^photometer\\.lsq:${line}:1: error: expectation failed: lod below 0\\.05 \\(lod = 0\\.08`, 'm'));
  });

  it('exits 3 when a fit does not converge (iteration limit 1), even with failed expectations', async () => {
    const dir = sampleCopy('cooling');
    edit(dir, 'cooling.lsq', '  sigma temp_sd', '  sigma temp_sd\n  iterations 1');
    const r = await cli(dir, 'fit', 'cooling.lsq');
    expect(r.code).toBe(EXIT.notConverged);
    expect(r.stdout).toContain('Stopped: NOT converged (max_iterations');
    // at the fit statement, like every other error
    const line = readFileSync(join(dir, 'cooling.lsq'), 'utf8').split('\n').findIndex((l) => l.startsWith('fit newton')) + 1;
    expect(line).toBeGreaterThan(0);
    expect(r.stderr).toMatch(new RegExp(`^cooling\\.lsq:${line}:1: error: fit newton did not converge: max_iterations`, 'm'));
    expect(r.stderr).not.toMatch(/^error:/m);
  });

  it('exits 2 with located messages for a broken spec and fits nothing', async () => {
    const dir = sampleCopy('cooling');
    edit(dir, 'cooling.lsq', 'exp(-time_min / tau)', 'exp(-time_min / tau');
    const r = await cli(dir, 'fit', 'cooling.lsq');
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/^cooling\.lsq:\d+:\d+: error: /);
    expect(r.stderr).toContain('nothing was fitted');
  });

  it('exits 2 for missing data, located at the data statement', async () => {
    const dir = sampleCopy('cooling');
    edit(dir, 'cooling.lsq', '"cooling.csv"', '"gone.csv"');
    const r = await cli(dir, 'fit', 'cooling.lsq', '--quiet');
    expect(r.code).toBe(EXIT.inputError);
    const line = readFileSync(join(dir, 'cooling.lsq'), 'utf8').split('\n').findIndex((l) => l.startsWith('data ')) + 1;
    expect(r.stderr).toMatch(new RegExp(`^cooling\\.lsq:${line}:\\d+: error: .*gone\\.csv`, 'm'));
    expect(r.stderr).toContain('nothing was fitted');
    expect(hasStackTrace(r.stderr)).toBe(false);
  });

  it('exits 2 for a bad cell, located at its file, line and column', async () => {
    const dir = sampleCopy('cooling');
    const csv = readFileSync(join(dir, 'cooling.csv'), 'utf8').split('\n');
    csv[4] = csv[4].replace(/^(\d+),([\d.]+),/, '$1,12x.5,'); // line 5 of the file, column 2 (temp_C)
    writeFileSync(join(dir, 'cooling.csv'), csv.join('\n'));
    const r = await cli(dir, 'fit', 'cooling.lsq', '--quiet');
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stderr).toMatch(/^cooling\.csv:5:2: error: .*12x\.5/m);
  });

  it('writes only JSON to stdout with --json -, valid against the result schema', async () => {
    const r = await cli(sampleCopy('drift'), 'fit', 'drift.lsq', '--json', '-');
    expect(r.code).toBe(EXIT.ok);
    const value = JSON.parse(r.stdout) as RunResult;
    const v = validateResult(value);
    expect(v.ok, v.errors).toBe(true);
    expect(value.provenance.specSha256).toMatch(/^[0-9a-f]{64}$/);
    expect(value.provenance.data[0].sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(value.provenance.toolVersion).toMatch(/^\d+\.\d+\.\d+/);
    expect(r.stderr).toBe('');
  });

  it('writes JSON, charts and a report with linked SVGs', async () => {
    const dir = sampleCopy('photometer');
    const r = await cli(dir, 'fit', 'photometer.lsq', '--json', 'out/result.json', '--charts', 'charts', '--report', 'out/report.md');
    expect(r.code).toBe(EXIT.ok);
    const json = JSON.parse(readFileSync(join(dir, 'out/result.json'), 'utf8'));
    expect(validateResult(json).ok).toBe(true);
    const svgs = readdirSync(join(dir, 'charts')).sort();
    expect(svgs).toEqual(['cal-fit.svg', 'cal-histogram.svg', 'cal-normal-qq.svg', 'cal-residuals-fitted.svg', 'cal-residuals-predictor.svg']);
    for (const f of svgs) expect(parseXml(readFileSync(join(dir, 'charts', f), 'utf8')).name).toBe('svg');
    const md = readFileSync(join(dir, 'out/report.md'), 'utf8');
    expect(md).toContain('](../charts/cal-fit.svg)');
    expect(md).toContain('## About this spec');
    expect(md).toContain('CAUTION: this is a demonstration, not a validated method.');
    expect(md).toMatch(/Use of results: .*validated under the applicable procedures and local regulations and reviewed by qualified people/);
    expect(md).toContain(json.provenance.specSha256);
    expect(r.stderr).toContain('wrote report: out/report.md');
  });

  it('puts report charts in a folder next to the report by default', async () => {
    const dir = sampleCopy('arrhenius');
    const r = await cli(dir, 'fit', 'arrhenius.lsq', '--report', 'cure.md', '--quiet');
    expect(r.code).toBe(EXIT.ok);
    expect(existsSync(join(dir, 'cure-charts', 'cure-fit.svg'))).toBe(true);
    expect(readFileSync(join(dir, 'cure.md'), 'utf8')).toContain('](cure-charts/cure-fit.svg)');
  });

  it('never writes over an input of the run', async () => {
    const dir = sampleCopy('cooling');
    const before = readFileSync(join(dir, 'cooling.csv'), 'utf8');
    const r = await cli(dir, 'fit', 'cooling.lsq', '--json', 'cooling.csv');
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stderr).toContain('refusing to write cooling.csv');
    expect(readFileSync(join(dir, 'cooling.csv'), 'utf8')).toBe(before);
  });

  it('runs only the fits named with --fit', async () => {
    const dir = sampleCopy('enzyme');
    const r = await cli(dir, 'fit', 'enzyme.lsq', '--fit', 'hill', '--json', '-');
    const value = JSON.parse(r.stdout) as RunResult;
    expect(value.fits.map((f) => f.name)).toEqual(['hill']);
    const bad = await cli(dir, 'fit', 'enzyme.lsq', '--fit', 'hil');
    expect(bad.code).toBe(EXIT.inputError);
    expect(bad.stderr).toBe("error: no fit named 'hil' in this spec (fits: mm, hill)\n");
  });

  it('maps results to exit codes with 2 > 3 > 1 > 0', () => {
    const base = { errors: [], fits: [], expectations: [] } as unknown as RunResult;
    const fit = (converged: boolean) => ({ stop: { converged } }) as RunResult['fits'][number];
    const exp = (passed: boolean) => ({ passed }) as RunResult['expectations'][number];
    expect(runExitCode(base)).toBe(0);
    expect(runExitCode({ ...base, expectations: [exp(false)] })).toBe(1);
    expect(runExitCode({ ...base, fits: [fit(false)], expectations: [exp(false)] })).toBe(3);
    expect(runExitCode({ ...base, errors: [{ code: 'x', message: 'm' }], fits: [fit(false)] })).toBe(2);
  });
});
