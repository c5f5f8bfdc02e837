/**
 * JSON output of any size (engine/run/json.ts `writeJson`, streamed by
 * `fit --json`): the same bytes to a file and to stdout, and a 5-million-row
 * fit whose JSON (about 1.25 GB, more than V8's longest string of about 2²⁹
 * characters, where `--json` used to fail with "Invalid string length")
 * comes out whole and well-formed. The output is checked by a streaming JSON
 * checker (json-stream-check.ts), itself checked against JSON.parse first.
 *
 * The 5-million-row case ("json: 5 million rows (long)") is a long test: it
 * runs when LEASTWISE_LONG_TESTS=1, which test/run-all.sh (CI, `npm run
 * test:all`) sets; a plain `npx vitest run` lists it as skipped. Measured on
 * this project's 2-core build machine, shared with other jobs: 40 s alone
 * (CSV generation ~3 s, fit and write ~20 s, the streaming check ~8 s for
 * 1.25 GB of JSON), 79 s inside the full suite; 1.25 GB of temporary disk.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { spawn, spawnSync } from 'node:child_process';
import { closeSync, createReadStream, openSync, readFileSync, statSync, writeFileSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { cleanTemp, privateCliBuild, tempDir } from './helpers';
import { JsonStreamChecker } from './json-stream-check';

let cli = '';
beforeAll(async () => {
  cli = await privateCliBuild();
}, 120_000);
afterAll(cleanTemp);

const SPEC = 'data d = "line.csv"\nfit line on d {\n  model y = a + b * x\n  param a = 0\n  param b = 1\n}\n';

/** An invented straight line, y = 2 + 3x with a deterministic wobble of ±0.05, written in blocks (no giant string). */
function writeLineCsv(path: string, rows: number): void {
  const fd = openSync(path, 'w');
  try {
    writeSync(fd, 'x,y\n');
    let block = '';
    for (let i = 0; i < rows; i++) {
      const x = i * 1e-3;
      block += `${x},${2 + 3 * x + (((i * 7919) % 1000) - 500) * 1e-4}\n`;
      if (block.length > 1 << 20) {
        writeSync(fd, block);
        block = '';
      }
    }
    writeSync(fd, block);
  } finally {
    closeSync(fd);
  }
}

function check(text: string): string | null {
  const c = new JsonStreamChecker();
  const bytes = Buffer.from(text, 'utf8');
  for (let i = 0; i < bytes.length; i += 7) c.feed(bytes.subarray(i, i + 7));
  return c.end();
}

async function checkFile(path: string): Promise<JsonStreamChecker & { result: string | null }> {
  const c = new JsonStreamChecker(1000);
  for await (const chunk of createReadStream(path, { highWaterMark: 1 << 22 })) c.feed(chunk as Buffer);
  return Object.assign(c, { result: c.end() });
}

describe('streaming JSON checker (test helper)', () => {
  it('agrees with JSON.parse on valid, truncated and mutated texts (fast-check, seeded)', () => {
    fc.assert(
      fc.property(fc.json(), fc.nat(), fc.integer({ min: 0, max: 255 }), (text, at, byte) => {
        expect(check(text)).toBeNull();
        const cut = text.slice(0, at % (text.length + 1));
        const mutated = text.slice(0, at % (text.length + 1)) + String.fromCharCode(byte) + text.slice((at % (text.length + 1)) + 1);
        for (const t of [cut, mutated]) {
          let parses = true;
          try {
            JSON.parse(t);
          } catch {
            parses = false;
          }
          expect(check(t) === null, JSON.stringify(t)).toBe(parses);
        }
      }),
      { seed: 20261203, numRuns: 2000 },
    );
  });
});

describe('fit --json streams (built CLI)', () => {
  it('writes the same bytes to a file and to stdout', () => {
    const dir = tempDir('lw-json-');
    writeFileSync(join(dir, 'line.lsq'), SPEC);
    writeLineCsv(join(dir, 'line.csv'), 30_000);
    const file = spawnSync(process.execPath, [cli, 'fit', 'line.lsq', '--json', 'out.json', '--quiet'], { cwd: dir, encoding: 'utf8' });
    expect(file.status, file.stderr).toBe(0);
    const out = spawnSync(process.execPath, [cli, 'fit', 'line.lsq', '--json', '-'], { cwd: dir, maxBuffer: 1 << 30 });
    expect(out.status).toBe(0);
    const a = readFileSync(join(dir, 'out.json'));
    // startedAt and timings differ between runs: compare with them blanked
    const blank = (b: Buffer) => b.toString('utf8').replace(/"startedAt": "[^"]*"/, '"startedAt": ""').replace(/"(elapsedMs|durationMs|ms)": [\d.e+-]+/g, '"$1": 0');
    expect(blank(out.stdout)).toBe(blank(a));
    expect(JSON.parse(a.toString('utf8')).fits[0].points.residual).toHaveLength(30_000);
  });

  it.runIf(process.env.LEASTWISE_LONG_TESTS === '1')('json: 5 million rows (long) - a fit of 5e6 rows writes its whole JSON (more than the longest string V8 can hold)', async () => {
    const dir = tempDir('lw-json-5m-');
    writeFileSync(join(dir, 'line.lsq'), SPEC);
    writeLineCsv(join(dir, 'line.csv'), 5_000_000);
    const child = spawn(process.execPath, [cli, 'fit', 'line.lsq', '--json', 'out.json', '--quiet'], { cwd: dir, stdio: ['ignore', 'ignore', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (b: Buffer) => (stderr += b.toString('utf8')));
    const code = await new Promise<number | null>((resolve) => child.on('exit', resolve));
    expect(stderr).toBe('');
    expect(code).toBe(0);
    const size = statSync(join(dir, 'out.json')).size;
    expect(size).toBeGreaterThan(2 ** 30); // every character is one byte here: more than 2²⁹ characters, twice over
    const checked = await checkFile(join(dir, 'out.json'));
    expect(checked.result).toBeNull();
    const residual = checked.arrays.find((a) => a.path === 'fits.*.points.residual');
    expect(residual?.length).toBe(5_000_000);
  }, 600_000);
});
