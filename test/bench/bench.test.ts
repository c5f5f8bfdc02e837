import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFile } from 'node:child_process';
import { existsSync, readFileSync, rmSync } from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import { textReport, type BenchReport } from './report';
import { buildBundles, REPO_ROOT, removeBuilt, tempDir, type Built } from '../fixtures/built';

/** Benchmark 10 drives Chromium; without it that row carries the error (as the panel tests skip). */
const haveChromium = existsSync(process.env.CHROMIUM ?? '/usr/bin/chromium');

const run = promisify(execFile);

let built: Built | undefined;
let report: BenchReport;
let markdown: string;
let mdDir: string | undefined;

beforeAll(async () => {
  built = await buildBundles();
  mdDir = tempDir('leastwise-bench-md-');
  const md = path.join(mdDir, 'bench.md');
  // the copied bench.js finds playwright-core (kept external) through NODE_PATH
  const env = { ...process.env, NODE_PATH: path.join(REPO_ROOT, 'node_modules') };
  const { stdout } = await run(process.execPath, [built.bench, '--quick', '--json', '--markdown', md], { maxBuffer: 16 << 20, timeout: 600_000, env });
  report = JSON.parse(stdout) as BenchReport;
  markdown = readFileSync(md, 'utf8');
}, 660_000);

afterAll(() => {
  removeBuilt(built);
  if (mdDir) rmSync(mdDir, { recursive: true, force: true });
});

describe('test/bench/bench (script structure, --quick)', () => {
  it('reports every benchmark in order, none failing to run', () => {
    expect(report.quick).toBe(true);
    expect(report.rows.map((r) => r.id)).toEqual(Array.from({ length: 22 }, (_, i) => i + 1));
    if (!haveChromium) console.warn('benchmark 10 not checked: no Chromium (set CHROMIUM)');
    for (const r of report.rows.filter((x) => haveChromium || x.id !== 10)) {
      expect(r.details.error, `row ${r.id}: ${r.text}`).toBeUndefined();
      expect(typeof r.value).toBe('number');
      expect(r.goal.length).toBeGreaterThan(0);
      expect(typeof r.met).toBe('boolean');
    }
  });

  it('describes the machine and the date', () => {
    expect(report.machine.cores).toBeGreaterThan(0);
    expect(report.machine.node).toBe(process.version);
    expect(Number.isNaN(Date.parse(report.machine.date))).toBe(false);
    expect(report.machine.cpu.length).toBeGreaterThan(0);
  });

  it('prints a text table with a line per benchmark and writes the Markdown table', () => {
    const text = textReport(report).split('\n');
    for (let id = 1; id <= 22; id++) expect(text.some((l) => l.startsWith(`${id} `))).toBe(true);
    const rows = markdown.split('\n').filter((l) => /^\| \d+ \|/.test(l));
    expect(rows).toHaveLength(22);
    expect(markdown).toContain(report.machine.cpu);
  });

  it('gives ratios measured side by side with their spread', () => {
    for (const id of [2, 3]) {
      const r = report.rows.find((x) => x.id === id)!;
      expect(r.spread).not.toBeNull();
      expect(r.spread![0]).toBeLessThanOrEqual(r.spread![1]);
    }
  });
});
