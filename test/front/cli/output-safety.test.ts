/**
 * `leastwise fit` and `new` never write over an input (engine/io guard.ts):
 * every way of pointing an output at the spec or a declared data file - by
 * its own name, a symbolic link, a hard link, the spec run through a link, a
 * data file that failed to load, one left out by --fit, one declared but not
 * used, a chart file, a group table, `new --out` - is exit 2 with a located
 * message, and NOTHING is written: the folder holds exactly the bytes it held
 * before (no output, no temporary file). Also: several outputs are committed
 * together or not at all (a report that cannot be written keeps the JSON from
 * being written).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { cpSync, linkSync, mkdirSync, readdirSync, readFileSync, statSync, symlinkSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { EXIT } from '../../../engine/front/cli/io';
import { cleanTemp, cli, SAMPLES, tempDir } from './helpers';

afterAll(cleanTemp);

/** Every file under `dir` (links read through), with its bytes as hex, plus each symbolic link's own kind. */
function snapshot(dir: string): Map<string, string> {
  const out = new Map<string, string>();
  const walk = (d: string): void => {
    for (const e of readdirSync(d, { withFileTypes: true })) {
      const p = join(d, e.name);
      const key = relative(dir, p);
      if (e.isDirectory()) {
        out.set(key + '/', 'dir');
        walk(p);
      } else out.set(key, `${e.isSymbolicLink() ? 'link:' : ''}${readFileSync(p).toString('hex')}`);
    }
  };
  walk(dir);
  return out;
}

/** The cooling sample plus extra declared data: a spare file no fit uses and a second fit's file. */
function workspace(extraSpec = ''): string {
  const dir = tempDir('lw-safe-');
  cpSync(join(SAMPLES, 'cooling'), dir, { recursive: true });
  writeFileSync(join(dir, 'spare.csv'), 'a,b\n1,2\n2,4\n3,6\n');
  writeFileSync(join(dir, 'second.csv'), 'u,v\n1,2.1\n2,3.9\n3,6.2\n4,7.9\n');
  const spec = readFileSync(join(dir, 'cooling.lsq'), 'utf8');
  writeFileSync(
    join(dir, 'cooling.lsq'),
    spec.replace('const ambient', 'data spare = "spare.csv"\ndata other = "second.csv"\nconst ambient') +
      '\nfit slope on other {\n  model v = k * u\n  param k = 1\n}\n' +
      extraSpec,
  );
  return dir;
}

function lineOf(dir: string, file: string, prefix: string): number {
  return readFileSync(join(dir, file), 'utf8').split('\n').findIndex((l) => l.startsWith(prefix)) + 1;
}

/** stderr without the checker's warnings (the spare data file is declared and unused on purpose). */
function errors(stderr: string): string {
  return stderr.split('\n').filter((l) => !/: warning: /.test(l)).join('\n');
}

const NEVER = 'inputs are never written, so nothing was written';

describe('output safety (cli)', () => {
  it('refuses a symbolic link to a data file as --json, at the data statement', async () => {
    const dir = workspace();
    symlinkSync('cooling.csv', join(dir, 'result.json'));
    const before = snapshot(dir);
    const r = await cli(dir, 'fit', 'cooling.lsq', '--json', 'result.json');
    expect(r.code).toBe(EXIT.inputError);
    expect(errors(r.stderr)).toBe(
      `cooling.lsq:${lineOf(dir, 'cooling.lsq', 'data bench')}:1: error: refusing to write result.json (--json): it is the data file "cooling.csv" (data bench) under another name (a link); ${NEVER}\n`,
    );
    expect(r.stdout).toBe('');
    expect(snapshot(dir)).toEqual(before);
  });

  it('refuses a hard link to a data file as --report', async () => {
    const dir = workspace();
    linkSync(join(dir, 'cooling.csv'), join(dir, 'report.md'));
    const before = snapshot(dir);
    const r = await cli(dir, 'fit', 'cooling.lsq', '--report', 'report.md', '--json', 'out.json');
    expect(r.code).toBe(EXIT.inputError);
    expect(errors(r.stderr)).toContain(`cooling.lsq:${lineOf(dir, 'cooling.lsq', 'data bench')}:1: error: refusing to write report.md (--report): it is the data file "cooling.csv" (data bench) under another name (a link); ${NEVER}`);
    // neither the report, its chart folder nor the JSON appeared
    expect(snapshot(dir)).toEqual(before);
  });

  it('refuses --json naming the spec when the spec is run through a symbolic link', async () => {
    const dir = workspace();
    symlinkSync('cooling.lsq', join(dir, 'alias.lsq'));
    const before = snapshot(dir);
    const r = await cli(dir, 'fit', 'alias.lsq', '--json', 'cooling.lsq');
    expect(r.code).toBe(EXIT.inputError);
    expect(errors(r.stderr)).toBe(`error: refusing to write cooling.lsq (--json): it is the spec of this run under another name (a link); ${NEVER}\n`);
    expect(snapshot(dir)).toEqual(before);
  });

  it('refuses a data file that fails to load (a ragged row) as --json', async () => {
    const dir = workspace('\ndata ragged = "ragged.csv"\nfit r on ragged {\n  model y = c * x\n  param c = 1\n}\n');
    writeFileSync(join(dir, 'ragged.csv'), 'x,y\n1,2\n2,4,9\n3,6\n');
    const before = snapshot(dir);
    const r = await cli(dir, 'fit', 'cooling.lsq', '--json', 'ragged.csv');
    expect(r.code).toBe(EXIT.inputError);
    expect(errors(r.stderr)).toBe(`cooling.lsq:${lineOf(dir, 'cooling.lsq', 'data ragged')}:1: error: refusing to write ragged.csv (--json): it is the data file "ragged.csv" (data ragged); ${NEVER}\n`);
    expect(snapshot(dir)).toEqual(before);
  });

  it('refuses the data of a fit left out by --fit', async () => {
    const dir = workspace();
    const before = snapshot(dir);
    const r = await cli(dir, 'fit', 'cooling.lsq', '--fit', 'newton', '--json', 'second.csv');
    expect(r.code).toBe(EXIT.inputError);
    expect(errors(r.stderr)).toBe(`cooling.lsq:${lineOf(dir, 'cooling.lsq', 'data other')}:1: error: refusing to write second.csv (--json): it is the data file "second.csv" (data other); ${NEVER}\n`);
    expect(snapshot(dir)).toEqual(before);
  });

  it('refuses a declared data file that no fit uses', async () => {
    const dir = workspace();
    const before = snapshot(dir);
    const r = await cli(dir, 'fit', 'cooling.lsq', '--quiet', '--json', './sub/../spare.csv');
    expect(r.code).toBe(EXIT.inputError);
    expect(errors(r.stderr)).toContain(`cooling.lsq:${lineOf(dir, 'cooling.lsq', 'data spare')}:1: error: refusing to write spare.csv (--json): it is the data file "spare.csv" (data spare); ${NEVER}`);
    expect(snapshot(dir)).toEqual(before);
  });

  it('refuses a declared data file that does not exist yet (the output would create an input)', async () => {
    const dir = workspace('\ndata later = "later.csv"\n');
    const before = snapshot(dir);
    const r = await cli(dir, 'fit', 'cooling.lsq', '--fit', 'newton', '--json', 'later.csv');
    expect(r.code).toBe(EXIT.inputError);
    // check reports the missing file first: nothing is fitted, nothing written
    expect(errors(r.stderr)).toContain('data file not found: later.csv');
    expect(snapshot(dir)).toEqual(before);
  });

  it('refuses a --groups table that is a link to the data', async () => {
    const dir = tempDir('lw-safe-');
    cpSync(join(SAMPLES, 'plate'), dir, { recursive: true });
    mkdirSync(join(dir, 'tables'));
    symlinkSync('../reads.csv', join(dir, 'tables', 'wells.csv'));
    const before = snapshot(dir);
    const r = await cli(dir, 'fit', 'plate.lsq', '--quiet', '--groups', 'tables/wells.csv', '--json', 'plate.json');
    expect(r.code).toBe(EXIT.inputError);
    expect(errors(r.stderr)).toMatch(/^plate\.lsq:\d+:1: error: refusing to write tables\/wells\.csv \(--groups\): it is the data file "reads\.csv" \(data \w+\) under another name \(a link\); inputs are never written, so nothing was written\n$/);
    expect(snapshot(dir)).toEqual(before);
  });

  it('refuses --charts when a chart file would replace a data file, and writes no chart at all', async () => {
    const dir = workspace();
    // the data of fit newton stored under the name of its first chart
    mkdirSync(join(dir, 'charts'));
    cpSync(join(dir, 'cooling.csv'), join(dir, 'charts', 'newton-fit.svg'));
    const spec = readFileSync(join(dir, 'cooling.lsq'), 'utf8').replace('"cooling.csv"', '"charts/newton-fit.svg"');
    writeFileSync(join(dir, 'cooling.lsq'), spec);
    const before = snapshot(dir);
    const r = await cli(dir, 'fit', 'cooling.lsq', '--charts', 'charts', '--json', 'out.json');
    expect(r.code).toBe(EXIT.inputError);
    expect(errors(r.stderr)).toBe(`cooling.lsq:${lineOf(dir, 'cooling.lsq', 'data bench')}:1: error: refusing to write charts/newton-fit.svg (--charts): it is the data file "charts/newton-fit.svg" (data bench); ${NEVER}\n`);
    expect(r.stdout).toBe('');
    expect(snapshot(dir)).toEqual(before);
  });

  it('refuses a report whose chart folder holds a data file under a chart name', async () => {
    const dir = workspace();
    mkdirSync(join(dir, 'r-charts'));
    symlinkSync('../second.csv', join(dir, 'r-charts', 'slope-fit.svg'));
    const before = snapshot(dir);
    const r = await cli(dir, 'fit', 'cooling.lsq', '--report', 'r.md');
    expect(r.code).toBe(EXIT.inputError);
    expect(errors(r.stderr)).toContain(`cooling.lsq:${lineOf(dir, 'cooling.lsq', 'data other')}:1: error: refusing to write r-charts/slope-fit.svg (a chart of --report): it is the data file "second.csv" (data other) under another name (a link); ${NEVER}`);
    expect(snapshot(dir)).toEqual(before);
  });

  it('refuses two outputs naming one file', async () => {
    const dir = workspace();
    const before = snapshot(dir);
    const r = await cli(dir, 'fit', 'cooling.lsq', '--json', 'same.md', '--report', './same.md');
    expect(r.code).toBe(EXIT.inputError);
    expect(errors(r.stderr)).toBe('error: --json and --report would both write same.md; nothing was written\n');
    expect(snapshot(dir)).toEqual(before);
  });

  it('writes every output of a clean run, and no temporary file', async () => {
    const dir = workspace();
    const r = await cli(dir, 'fit', 'cooling.lsq', '--json', 'out/result.json', '--report', 'out/report.md', '--quiet');
    expect(r.code).toBe(EXIT.ok);
    expect(readdirSync(join(dir, 'out')).sort()).toEqual(['report-charts', 'report.md', 'result.json']);
    expect(readdirSync(join(dir, 'out', 'report-charts')).length).toBe(10);
    expect(JSON.parse(readFileSync(join(dir, 'out', 'result.json'), 'utf8')).fits).toHaveLength(2);
  });

  it('writes to a device such as /dev/null without replacing it', async () => {
    const dir = workspace();
    const r = await cli(dir, 'fit', 'cooling.lsq', '--quiet', '--json', '/dev/null');
    expect(r.code).toBe(EXIT.ok);
    expect(statSync('/dev/null').isCharacterDevice()).toBe(true);
  });

  it('keeps the permissions of an output it replaces, and writes through a link to an earlier output', async () => {
    const dir = workspace();
    writeFileSync(join(dir, 'keep.json'), 'old');
    const { chmodSync } = await import('node:fs');
    chmodSync(join(dir, 'keep.json'), 0o640);
    symlinkSync('keep.json', join(dir, 'via-link.json'));
    const r = await cli(dir, 'fit', 'cooling.lsq', '--json', 'via-link.json', '--quiet');
    expect(r.code).toBe(EXIT.ok);
    expect(statSync(join(dir, 'keep.json')).mode & 0o777).toBe(0o640);
    expect(JSON.parse(readFileSync(join(dir, 'keep.json'), 'utf8')).version).toBe(1);
    expect(readdirSync(dir).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });

  it('writes no JSON when the report cannot be written (all outputs or none), leaving the earlier JSON as it was', async () => {
    const dir = workspace();
    writeFileSync(join(dir, 'out.json'), '{"earlier": true}\n');
    writeFileSync(join(dir, 'blocker'), 'a file where the report folder should be\n');
    const before = snapshot(dir);
    const r = await cli(dir, 'fit', 'cooling.lsq', '--quiet', '--json', 'out.json', '--report', 'blocker/report.md');
    expect(r.code).toBe(EXIT.inputError);
    expect(errors(r.stderr)).toMatch(/^error: cannot write blocker\/report-charts: (ENOTDIR|EEXIST)\n$/);
    expect(snapshot(dir)).toEqual(before);
  });

  it('writes no JSON when the report\'s chart folder is taken by a file', async () => {
    const dir = workspace();
    writeFileSync(join(dir, 'out.json'), '{"earlier": true}\n');
    writeFileSync(join(dir, 'r-charts'), 'not a folder\n');
    const before = snapshot(dir);
    const r = await cli(dir, 'fit', 'cooling.lsq', '--quiet', '--json', 'out.json', '--report', 'r.md', '--groups', 'g.csv');
    // --groups without a per-group fit is refused before anything else
    expect(r.code).toBe(EXIT.inputError);
    const r2 = await cli(dir, 'fit', 'cooling.lsq', '--quiet', '--json', 'out.json', '--report', 'r.md');
    expect(r2.code).toBe(EXIT.inputError);
    expect(errors(r2.stderr)).toMatch(/^error: cannot write r-charts: (EEXIST|ENOTDIR)\n$/);
    expect(snapshot(dir)).toEqual(before);
  });
});

describe('output safety (cli new)', () => {
  it('refuses --out that is a link to the CSV it reads', async () => {
    const dir = tempDir('lw-safe-');
    cpSync(join(SAMPLES, 'cooling', 'cooling.csv'), join(dir, 'cooling.csv'));
    symlinkSync('cooling.csv', join(dir, 'cooling-spec.lsq'));
    linkSync(join(dir, 'cooling.csv'), join(dir, 'hard.lsq'));
    const before = snapshot(dir);
    const soft = await cli(dir, 'new', 'cooling.csv', '--out', 'cooling-spec.lsq');
    expect(soft.code).toBe(EXIT.inputError);
    expect(soft.stderr).toBe(`error: refusing to write cooling-spec.lsq (--out): it is the file cooling.csv that this command reads under another name (a link); ${NEVER}\n`);
    const hard = await cli(dir, 'new', 'cooling.csv', '--out', 'hard.lsq');
    expect(hard.code).toBe(EXIT.inputError);
    expect(hard.stderr).toContain('refusing to write hard.lsq (--out): it is the file cooling.csv that this command reads under another name (a link)');
    const same = await cli(dir, 'new', 'cooling.csv', '--out', 'cooling.csv');
    expect(same.code).toBe(EXIT.inputError);
    expect(same.stderr).toBe(`error: refusing to write cooling.csv (--out): it is the file cooling.csv that this command reads; ${NEVER}\n`);
    expect(snapshot(dir)).toEqual(before);
  });
});
