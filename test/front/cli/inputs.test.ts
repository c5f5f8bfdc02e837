/**
 * Only regular files are read (engine/io/input.ts): a named pipe, /dev/stdin,
 * a device or a folder as a data file or as the spec gets a located message
 * from `check`, `fit` and `new` instead of blocking. Run with the built CLI in
 * a child process with a deadline: if reading a pipe ever blocks again, the
 * child is killed and the test fails instead of hanging the suite.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { cleanTemp, privateCliBuild, SAMPLES, tempDir } from './helpers';

let cli = '';
beforeAll(async () => {
  cli = await privateCliBuild();
}, 120_000);
afterAll(cleanTemp);

/** Deadline of one child run; a blocked read ends there as a failure. */
const DEADLINE_MS = 30_000;

function run(cwd: string, ...args: string[]): { code: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd, encoding: 'utf8', timeout: DEADLINE_MS, input: '' });
  if (r.error && (r.error as NodeJS.ErrnoException).code === 'ETIMEDOUT') throw new Error(`leastwise ${args.join(' ')} blocked for ${DEADLINE_MS} ms (killed)`);
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** The cooling sample with its data statement pointing at `path`, plus a named pipe, a folder. */
function workspace(path: string): string {
  const dir = tempDir('lw-inputs-');
  const spec = readFileSync(join(SAMPLES, 'cooling', 'cooling.lsq'), 'utf8').replace('"cooling.csv"', JSON.stringify(path));
  writeFileSync(join(dir, 'spec.lsq'), spec);
  execFileSync('mkfifo', [join(dir, 'pipe.csv')]);
  execFileSync('mkfifo', [join(dir, 'pipe.lsq')]);
  mkdirSync(join(dir, 'folder.csv'));
  return dir;
}

const dataLine = (dir: string): number => readFileSync(join(dir, 'spec.lsq'), 'utf8').split('\n').findIndex((l) => l.startsWith('data ')) + 1;

describe('inputs: regular files only (built CLI)', () => {
  const cases: [string, string][] = [
    ['pipe.csv', 'a named pipe'],
    // the child's stdin: libuv connects it through a socket pair (a pipe elsewhere)
    ['/dev/stdin', '(a named pipe|a socket)'],
    ['/dev/null', 'a device'],
    ['folder.csv', 'a folder'],
  ];
  for (const [path, kind] of cases) {
    it(`check and fit refuse ${path} as a data file (${kind}), at the data statement`, () => {
      const dir = workspace(path);
      const message = new RegExp(`^spec\\.lsq:${dataLine(dir)}:1: error: cannot read data file ${path.replace(/\./g, '\\.')}: it is ${kind}, not a regular file \\(only regular files are read\\)$`, 'm');
      const checked = run(dir, 'check', 'spec.lsq');
      expect(checked.code).toBe(2);
      expect(checked.stdout).toMatch(message);
      const fitted = run(dir, 'fit', 'spec.lsq');
      expect(fitted.code).toBe(2);
      expect(fitted.stderr).toMatch(message);
    });
  }

  it('refuses a named pipe or a folder as the spec', () => {
    const dir = workspace('cooling.csv');
    for (const cmd of ['check', 'fit', 'plan']) {
      const r = run(dir, cmd, 'pipe.lsq');
      expect(r.code).toBe(2);
      expect(r.stdout + r.stderr).toContain('pipe.lsq: error: cannot read file: it is a named pipe, not a regular file (only regular files are read)');
    }
    mkdirSync(join(dir, 'dir.lsq'));
    expect(run(dir, 'check', 'dir.lsq').stdout).toContain('dir.lsq: error: cannot read file: it is a folder, not a regular file (only regular files are read)');
  });

  it('new refuses a named pipe or a device as the CSV', () => {
    const dir = workspace('cooling.csv');
    const pipe = run(dir, 'new', 'pipe.csv');
    expect(pipe.code).toBe(2);
    expect(pipe.stderr).toBe('pipe.csv: error: cannot read file: it is a named pipe, not a regular file (only regular files are read)\n');
    const dev = run(dir, 'new', '/dev/zero', '--out', 'z.lsq');
    expect(dev.code).toBe(2);
    expect(dev.stderr).toBe('/dev/zero: error: cannot read file: it is a device, not a regular file (only regular files are read)\n');
  });
});
