/**
 * Atomic outputs (engine/io/stage.ts) with the built CLI in a child process:
 * a run killed (SIGKILL) in the middle of writing its JSON leaves the previous
 * complete output as it was and no partial file under the output's name; the
 * next run into the folder removes the killed run's temporary file. The child
 * stops mid-write through the writer's test hook
 * (LEASTWISE_TEST_PAUSE_WRITE_AFTER, cli.ts) and says so on stderr; the test
 * waits for that line (a condition, not a sleep), with a deadline that fails
 * the test instead of hanging.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { cleanTemp, privateCliBuild, tempDir } from './helpers';

let cli = '';
beforeAll(async () => {
  cli = await privateCliBuild();
}, 120_000);
afterAll(cleanTemp);

/** Invented calibration line: `rows` rows of y = 2 + 3x with a small deterministic wobble (`shift` moves the intercept). */
function lineCsv(rows: number, shift = 0): string {
  const lines = ['x,y'];
  for (let i = 0; i < rows; i++) lines.push(`${i * 0.01},${(2 + shift + 0.03 * i + 0.01 * Math.sin(i)).toFixed(6)}`);
  return lines.join('\n') + '\n';
}

const SPEC = 'data d = "line.csv"\nfit line on d {\n  model y = a + b * x\n  param a = 0\n  param b = 1\n}\n';

/** Resolves with the child's stderr once `pattern` appears in it; rejects at the deadline or when the child ends first. */
function waitForStderr(child: ReturnType<typeof spawn>, pattern: RegExp, deadlineMs: number): Promise<RegExpExecArray> {
  return new Promise((resolve, reject) => {
    let text = '';
    const timer = setTimeout(() => reject(new Error(`no ${pattern} on stderr within ${deadlineMs} ms; stderr: ${text.slice(0, 500)}`)), deadlineMs);
    child.stderr!.on('data', (b: Buffer) => {
      text += b.toString('utf8');
      const m = pattern.exec(text);
      if (m) {
        clearTimeout(timer);
        resolve(m);
      }
    });
    child.on('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`the child exited (${code}) before ${pattern}; stderr: ${text.slice(0, 500)}`));
    });
  });
}

describe('atomic outputs (built CLI, child process)', () => {
  it('a run killed mid-write leaves the previous JSON intact and no partial file; the next run cleans up', async () => {
    const dir = tempDir('lw-atomic-');
    writeFileSync(join(dir, 'line.lsq'), SPEC);
    writeFileSync(join(dir, 'line.csv'), lineCsv(20_000));
    const first = spawnSync(process.execPath, [cli, 'fit', 'line.lsq', '--json', 'out.json', '--quiet'], { cwd: dir, encoding: 'utf8', timeout: 120_000 });
    expect(first.status, first.stderr).toBe(0);
    const previous = readFileSync(join(dir, 'out.json'));
    expect(previous.length).toBeGreaterThan(1 << 20); // a few MiB: many chunks

    // new data, so a finished second run would write different bytes
    writeFileSync(join(dir, 'line.csv'), lineCsv(20_000, 1));
    const child = spawn(process.execPath, [cli, 'fit', 'line.lsq', '--json', 'out.json', '--quiet'], {
      cwd: dir,
      env: { ...process.env, LEASTWISE_TEST_PAUSE_WRITE_AFTER: String(256 * 1024) },
      stdio: ['ignore', 'ignore', 'pipe'],
    });
    const exited = new Promise<NodeJS.Signals | null>((resolve) => child.on('exit', (_code, signal) => resolve(signal)));
    let temp: string;
    try {
      temp = (await waitForStderr(child, /leastwise-test: paused writing (.+)\n/, 90_000))[1];
    } finally {
      child.kill('SIGKILL');
    }
    expect(await exited).toBe('SIGKILL');

    // mid-write: the temporary file holds part of the new JSON, the output still the old one
    expect(temp.startsWith(dir)).toBe(true);
    const partial = statSync(temp).size;
    expect(partial).toBeGreaterThanOrEqual(256 * 1024);
    expect(partial).toBeLessThan(previous.length);
    expect(readFileSync(join(dir, 'out.json')).equals(previous)).toBe(true);
    expect(JSON.parse(previous.toString('utf8')).fits[0].name).toBe('line');
    // the only other file is the killed run's hidden temporary file, never a partial out.json
    expect(readdirSync(dir).sort()).toEqual([temp.slice(dir.length + 1), 'line.csv', 'line.lsq', 'out.json'].sort());

    const again = spawnSync(process.execPath, [cli, 'fit', 'line.lsq', '--json', 'out.json', '--quiet'], { cwd: dir, encoding: 'utf8', timeout: 120_000 });
    expect(again.status, again.stderr).toBe(0);
    expect(readdirSync(dir).sort()).toEqual(['line.csv', 'line.lsq', 'out.json']);
    const now = readFileSync(join(dir, 'out.json'));
    expect(now.equals(previous)).toBe(false);
    expect(JSON.parse(now.toString('utf8')).fits[0].name).toBe('line');
  });
});
