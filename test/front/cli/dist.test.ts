/**
 * The built executable (`node dist/cli.js`), as users run it. Builds the CLI
 * bundle first when it is missing or older than the sources.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { cleanTemp, hasStackTrace, ROOT, sampleCopy, validateResult } from './helpers';

const DIST = join(ROOT, 'dist', 'cli.js');

function newestSource(dir: string): number {
  let t = 0;
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) t = Math.max(t, newestSource(p));
    else if (e.name.endsWith('.ts') || e.name.endsWith('.json')) t = Math.max(t, statSync(p).mtimeMs);
  }
  return t;
}

function run(cwd: string, ...args: string[]) {
  const r = spawnSync(process.execPath, [DIST, ...args], { cwd, encoding: 'utf8' });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

beforeAll(() => {
  const sources = Math.max(statSync(join(ROOT, 'cli.ts')).mtimeMs, newestSource(join(ROOT, 'engine')), newestSource(join(ROOT, 'parser')));
  if (!existsSync(DIST) || statSync(DIST).mtimeMs < sources) execFileSync(process.execPath, ['build.mjs', 'cli'], { cwd: ROOT, stdio: 'pipe' });
});
afterAll(cleanTemp);

describe('cli (built dist/cli.js)', () => {
  it('fits the README sample and exits 0', () => {
    const dir = sampleCopy('cooling');
    const r = run(dir, 'fit', 'cooling.lsq');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('Fit newton: temp_C against time_min');
    expect(r.stdout).toContain('5 of 5 expectations passed.');
  });

  it('writes schema-valid JSON to stdout and SVG charts', () => {
    const dir = sampleCopy('doseresponse');
    const r = run(dir, 'fit', 'doseresponse.lsq', '--json', '-', '--charts', 'charts');
    expect(r.code).toBe(0);
    const v = validateResult(JSON.parse(r.stdout));
    expect(v.ok, v.errors).toBe(true);
    expect(readdirSync(join(dir, 'charts'))).toHaveLength(5);
    expect(readFileSync(join(dir, 'charts', 'inhibition-fit.svg'), 'utf8')).toMatch(/^<\?xml[^>]*>\s*<svg /);
  });

  it('exits 1, 2 and 3 as documented, without stack traces', () => {
    const dir = sampleCopy('cooling');
    const spec = readFileSync(join(dir, 'cooling.lsq'), 'utf8');
    writeFileSync(join(dir, 'fail.lsq'), spec.replace('expect newton.rise within 158 .. 170', 'expect newton.rise within 100 .. 110'));
    writeFileSync(join(dir, 'broken.lsq'), spec.replace('param tau  = 10', 'param tau  = = 10'));
    writeFileSync(join(dir, 'slow.lsq'), spec.replace('  sigma temp_sd', '  sigma temp_sd\n  iterations 1'));
    const fail = run(dir, 'fit', 'fail.lsq', '--quiet');
    const broken = run(dir, 'fit', 'broken.lsq');
    const slow = run(dir, 'fit', 'slow.lsq', '--quiet');
    const missing = run(dir, 'fit', 'missing.lsq');
    expect([fail.code, broken.code, slow.code, missing.code]).toEqual([1, 2, 3, 2]);
    expect(broken.stderr).toMatch(/^broken\.lsq:\d+:\d+: error: /);
    for (const r of [fail, broken, slow, missing]) expect(hasStackTrace(r.stderr)).toBe(false);
  });
});
