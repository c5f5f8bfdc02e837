/**
 * Hostile names through `leastwise fit --report`: column names and group
 * labels from a data file someone else wrote. Charts are drawn (one file per
 * chart and group, none overwritten), the report shows the labels, and the
 * built executable never passes a terminal control character from the data
 * to stdout or stderr (while `--json -` keeps the exact labels).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { cleanTemp, cli, ROOT, tempDir } from './helpers';
import { mdText } from '../../../engine/front/views/escape';
import { csvField, HOSTILE_COLUMNS, HOSTILE_LABELS, TERMINAL_UNSAFE } from '../../fixtures/hostile-names';

afterAll(cleanTemp);

const DIST = join(ROOT, 'dist', 'cli.js');

/** Rows y = 2 + 0.5·x + small scatter, 6 per group label. */
function groupCsv(labels: readonly string[]): string {
  const lines = ['x,y,grp'];
  labels.forEach((g, k) => {
    for (let i = 0; i < 6; i++) lines.push(`${i},${(2 + 0.5 * i + 0.01 * (((i + k) * 7) % 5)).toFixed(3)},${csvField(g)}`);
  });
  return lines.join('\n') + '\n';
}

const spec = (x: string, y: string, per = '') =>
  `data d = "d.csv"\nfit f on d {\n  model "${y}" = a + b * "${x}"\n  param a\n  param b\n${per}}\n`;

describe('cli fit --report with hostile names', () => {
  it('hostile group labels: every chart of every group written under its own name, the report lists every group', async () => {
    const dir = tempDir();
    // labels that clash once sanitised, and a few of the worst (all of them: test/front/views/hostile-names.test.ts)
    const labels = ['a b', 'a_b', 'a/b', 'a.b', '<script>alert(1)</script>', 'two\nlines', 'esc\u001b[2J', 'a"b', 'constructor', 'B7'];
    writeFileSync(join(dir, 'd.csv'), groupCsv(labels));
    writeFileSync(join(dir, 's.lsq'), spec('x', 'y', '  per grp\n'));
    const r = await cli(dir, 'fit', 's.lsq', '--report', 'out/report.md', '--charts', 'all-charts', '--quiet');
    expect(r.code, r.stderr).toBe(0);
    const all = readdirSync(join(dir, 'all-charts'));
    expect(all.filter((f) => !f.includes('~groups-'))).toHaveLength(5 * labels.length); // no two groups share a file
    // and the charts across groups, once (no plate map: the labels are not wells)
    expect(all.filter((f) => f.includes('~groups-')).sort()).toEqual(['f~groups-group-a.svg', 'f~groups-group-b.svg', 'f~groups-overlay.svg', 'f~groups-residuals-by-group.svg']);
    const md = readFileSync(join(dir, 'out', 'report.md'), 'utf8');
    expect(md).toContain(`${labels.length} groups`);
    for (const g of labels) expect(md, JSON.stringify(g)).toContain(`| ${mdText(g)} |`);
    expect(md).not.toMatch(/<script|<img src=x/i);
  }, 60_000);

  it('hostile column names as predictor and response: charts drawn, axis titles as written', async () => {
    // a representative subset end to end (test/front/views/hostile-names.test.ts draws every name)
    const names = ['then', 'constructor', '__proto__', 'a\\b', '\\', '${x}', 'a`b`c', '<script>alert(1)</script>', 'a|b', 'title'];
    for (const n of names) expect(HOSTILE_COLUMNS).toContain(n);
    for (const name of names) {
      const dir = tempDir();
      const other = name === 'y' ? 'yy' : 'y';
      const rows = Array.from({ length: 10 }, (_, i) => `${i},${(1 + 0.3 * i + 0.02 * ((i * 3) % 4)).toFixed(3)}`);
      writeFileSync(join(dir, 'd.csv'), [`${csvField(name)},${other}`, ...rows].join('\n') + '\n');
      writeFileSync(join(dir, 's.lsq'), spec(name, other));
      const r = await cli(dir, 'fit', 's.lsq', '--report', 'r.md', '--quiet');
      expect(r.code, `${name}: ${r.stderr}`).toBe(0);
      const charts = readdirSync(join(dir, 'r-charts'));
      expect(charts, name).toHaveLength(5);
      const fitSvg = readFileSync(join(dir, 'r-charts', 'f-fit.svg'), 'utf8');
      const xml = name.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
      expect(fitSvg.includes(`>${xml}<`) || fitSvg.includes(`>${xml}\u2060<`), name).toBe(true);
    }
  }, 120_000);
});

describe('cli (built dist/cli.js) output boundary', () => {
  beforeAll(() => {
    // as test/front/cli/dist.test.ts: build the CLI bundle when it is missing or older than the sources
    const newest = (d: string): number => readdirSync(d, { withFileTypes: true }).reduce((t, e) => Math.max(t, e.isDirectory() ? newest(join(d, e.name)) : statSync(join(d, e.name)).mtimeMs), 0);
    const sources = Math.max(statSync(join(ROOT, 'cli.ts')).mtimeMs, newest(join(ROOT, 'engine')), newest(join(ROOT, 'parser')));
    if (!existsSync(DIST) || statSync(DIST).mtimeMs < sources) execFileSync(process.execPath, ['build.mjs', 'cli'], { cwd: ROOT, stdio: 'pipe' });
  });

  it('control characters from data files reach the terminal escaped; --json - keeps the labels exact', () => {
    const dir = tempDir();
    const labels = HOSTILE_LABELS.filter((l) => TERMINAL_UNSAFE.test(l) || l.includes('\n'));
    writeFileSync(join(dir, 'd.csv'), groupCsv(labels));
    writeFileSync(join(dir, 's.lsq'), spec('x', 'y', '  per grp\n'));
    const run = (...args: string[]) => spawnSync(process.execPath, [DIST, ...args], { cwd: dir, encoding: 'utf8' });
    const text = run('fit', 's.lsq');
    expect(text.status, text.stderr).toBe(0);
    expect(TERMINAL_UNSAFE.test(text.stdout)).toBe(false);
    expect(TERMINAL_UNSAFE.test(text.stderr)).toBe(false);
    expect(text.stdout).toContain('esc\\u001b[2J');
    expect(text.stdout).toContain('two\\u000alines'); // a label cannot start a line of its own
    const json = run('fit', 's.lsq', '--json', '-');
    expect(TERMINAL_UNSAFE.test(json.stdout)).toBe(false);
    const groups = (JSON.parse(json.stdout) as { fits: { group: string }[] }).fits.map((f) => f.group);
    expect(new Set(groups)).toEqual(new Set(labels));
    // a bad cell's text in an error message
    writeFileSync(join(dir, 'd.csv'), `x,y,grp\n1,2\u001b]0;pwned\u0007,a\n2,3,a\n`);
    const bad = run('fit', 's.lsq');
    expect(bad.status).toBe(2);
    expect(bad.stderr).toContain('\\u001b]0;pwned\\u0007');
    expect(TERMINAL_UNSAFE.test(bad.stderr + bad.stdout)).toBe(false);
  }, 60_000);
});
