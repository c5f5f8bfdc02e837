/**
 * `leastwise fit` on per-group fits: the group table on stdout, `--groups`
 * CSV, exit codes with a failing group, JSON per group, the report, and the
 * built CLI fitting groups on worker threads (dist/worker.js beside it).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import Papa from 'papaparse';
import { EXIT } from '../../../engine/front/cli/io';
import type { RunResult } from '../../../engine/result';
import { cleanTemp, cli, privateCliBuild, tempDir, validateResult } from './helpers';

afterAll(cleanTemp);

/** Invented tensile-rig data: per specimen, force = stiffness·extension + preload with small deterministic scatter. */
function specimens(count: number, extra: string[] = []): string {
  const lines = ['specimen,extension_mm,force_N'];
  for (let s = 0; s < count; s++) {
    const id = `S${String(s + 1).padStart(2, '0')}`;
    const stiffness = 40 + 2.5 * (s % 7);
    const preload = 3 + 0.4 * (s % 4);
    for (let i = 0; i < 10; i++) {
      const ext = 0.1 * i;
      lines.push(`${id},${ext.toFixed(2)},${(stiffness * ext + preload + 0.05 * Math.sin(11.3 * (s + 1) * (i + 1))).toFixed(4)}`);
    }
  }
  return [...lines, ...extra].join('\n') + '\n';
}

const SPEC = `# Stiffness per specimen on a tensile rig (invented)
data rig = "rig.csv"

fit stiffness on rig {
  model force_N = k * extension_mm + preload
  param k [N/mm]
  param preload [N]
  per specimen
}
`;

/** A folder with rig.csv (12 specimens, plus `extra` lines) and rig.lsq. */
function rig(extra: string[] = [], spec = SPEC): string {
  const dir = tempDir('lw-groups-');
  writeFileSync(join(dir, 'rig.csv'), specimens(12, extra));
  writeFileSync(join(dir, 'rig.lsq'), spec);
  return dir;
}

/** One usable row for two parameters: fails alone. */
const LONELY = ['S99,0.10,7.2'];
/** Two rows for two parameters: no degrees of freedom (flagged, converged). */
const PAIR = ['S50,0.00,3.0', 'S50,0.50,25.0'];

describe('cli/fit per-group fits', () => {
  it('prints the group table, the summary across groups and the worst groups, not a block per group', async () => {
    const dir = rig([...LONELY, ...PAIR]);
    const r = await cli(dir, 'fit', 'rig.lsq');
    expect(r.stdout).toContain('Fit stiffness per group: force_N against extension_mm, 14 groups');
    expect(r.stdout).toContain('14 groups: 13 converged, 1 failed, 0 not converged; 2 flagged (1 failed, 1 no degrees of freedom).');
    expect(r.stdout).toMatch(/^ {2}group +n +k +se\(k\) +preload +se\(preload\) +R² +flags$/m);
    const num = '\\d+\\.\\d+(?:e-\\d+)?';
    for (let s = 1; s <= 12; s++) expect(r.stdout).toMatch(new RegExp(`^ {2}S${String(s).padStart(2, '0')} +10 +${num} +${num} +${num} +${num} +(?:0\\.99\\d*|1)$`, 'm'));
    expect(r.stdout).toMatch(/^ {2}S99 +1 +n\/a +n\/a +n\/a +n\/a +n\/a +failed$/m);
    expect(r.stdout).toMatch(/^ {2}S50 +2 +.* +no_dof$/m);
    expect(r.stdout).toMatch(/Across converged groups\n +median +Q1 +Q3 +IQR +groups\n.*\n {4}k +\d+\.\d+ +\d+\.\d+ +\d+\.\d+ +\d+\.?\d*(e[-+]\d+)? +13\n/);
    expect(r.stdout).toContain('Worst groups\n    S99: failed - failed:');
    // full blocks only for the two flagged groups
    expect(r.stdout.match(/^Fit stiffness \[[^\]]+\]/gm)).toEqual(['Fit stiffness [S99]', 'Fit stiffness [S50]']);
  });

  it('exits 3 when a group fails, still reporting every other group', async () => {
    const r = await cli(rig(LONELY), 'fit', 'rig.lsq', '--json', '-');
    expect(r.code).toBe(EXIT.notConverged);
    expect(r.stderr).toMatch(/^rig\.lsq:\d+:1: error: fit stiffness \[S99\] did not converge: failed: /m);
    const result = JSON.parse(r.stdout) as RunResult;
    expect(result.errors).toEqual([]);
    expect(result.fits).toHaveLength(13);
    expect(result.fits.filter((f) => f.stop.converged)).toHaveLength(12);
  });

  it('exits 0 when groups are only flagged (no degrees of freedom), with schema-valid JSON, one result per group', async () => {
    const r = await cli(rig(PAIR), 'fit', 'rig.lsq', '--json', '-');
    expect(r.code).toBe(EXIT.ok);
    const result = JSON.parse(r.stdout) as RunResult;
    const v = validateResult(result);
    expect(v.ok, v.errors).toBe(true);
    expect(result.fits.map((f) => f.group)).toEqual([...Array.from({ length: 12 }, (_, s) => `S${String(s + 1).padStart(2, '0')}`), 'S50']);
    expect(result.fits.every((f) => f.name === 'stiffness')).toBe(true);
  });

  it('writes the group table as CSV with --groups: one line per group, estimates as in the JSON', async () => {
    const dir = rig([...LONELY, ...PAIR]);
    const r = await cli(dir, 'fit', 'rig.lsq', '--groups', 'out/table.csv', '--json', 'out/result.json');
    expect(r.code).toBe(EXIT.notConverged);
    expect(r.stderr).toContain('wrote group table: out/table.csv');
    const parsed = Papa.parse<string[]>(readFileSync(join(dir, 'out', 'table.csv'), 'utf8').trimEnd());
    expect(parsed.errors).toEqual([]);
    const [header, ...rows] = parsed.data;
    expect(header).toEqual(['group', 'n', 'k', 'k_se', 'preload', 'preload_se', 'r2', 'chi2_reduced', 'stop', 'flags']);
    const result = JSON.parse(readFileSync(join(dir, 'out', 'result.json'), 'utf8')) as RunResult;
    expect(rows.map((row) => row[0])).toEqual(result.fits.map((f) => f.group));
    result.fits.forEach((f, i) => {
      const row = rows[i];
      expect(Number(row[1])).toBe(f.goodness.n);
      if (f.stop.code === 'failed') {
        expect(row.slice(2, 8)).toEqual(['', '', '', '', '', '']);
        expect(row.slice(8)).toEqual(['failed', 'failed']);
        return;
      }
      // shortest round-trip number text: the same doubles as the JSON
      expect(Number(row[2])).toBe(f.parameters[0].estimate);
      expect(row[3] === '' ? null : Number(row[3])).toBe(f.parameters[0].stderr);
      expect(Number(row[4])).toBe(f.parameters[1].estimate);
      expect(Number(row[6])).toBe(f.goodness.r2);
      expect(row[8]).toBe(f.stop.code);
    });
    expect(rows.find((row) => row[0] === 'S50')![9]).toBe('no_dof');
  });

  it('writes one CSV per per-group fit, named after the fit, when the spec has several', async () => {
    const spec = `${SPEC}
fit through_zero on rig {
  model force_N = k * extension_mm
  param k [N/mm]
  per specimen
}
`;
    const dir = rig([], spec);
    const r = await cli(dir, 'fit', 'rig.lsq', '--quiet', '--groups', 'tables.csv');
    expect(r.code).toBe(EXIT.ok);
    expect(readdirSync(dir).filter((f) => f.startsWith('tables')).sort()).toEqual(['tables-stiffness.csv', 'tables-through_zero.csv']);
    expect(readFileSync(join(dir, 'tables-through_zero.csv'), 'utf8').split('\n')[0]).toBe('group,n,k,k_se,r2,chi2_reduced,stop,flags');
    // --fit narrows it to one fit: the path is used as given
    const one = await cli(dir, 'fit', 'rig.lsq', '--quiet', '--fit', 'through_zero', '--groups', 'one.csv');
    expect(one.code).toBe(EXIT.ok);
    expect(existsSync(join(dir, 'one.csv'))).toBe(true);
  });

  it('refuses --groups without a per-group fit, over an input, and a bad --threads, with exit 2', async () => {
    const dir = rig();
    writeFileSync(join(dir, 'plain.lsq'), SPEC.replace('  per specimen\n', ''));
    const none = await cli(dir, 'fit', 'plain.lsq', '--groups', 'g.csv');
    expect(none.code).toBe(EXIT.inputError);
    expect(none.stderr).toContain('error: no fit of this run is fitted per group (per COLUMN), so --groups has nothing to write');
    const over = await cli(dir, 'fit', 'rig.lsq', '--groups', 'rig.csv');
    expect(over.code).toBe(EXIT.inputError);
    expect(over.stderr).toBe('rig.lsq:2:1: error: refusing to write rig.csv (--groups): it is the data file "rig.csv" (data rig); inputs are never written, so nothing was written\n');
    expect(readFileSync(join(dir, 'rig.csv'), 'utf8')).toBe(specimens(12));
    for (const bad of ['0', '1.5', 'many']) {
      const t = await cli(dir, 'fit', 'rig.lsq', '--threads', bad);
      expect(t.code).toBe(EXIT.inputError);
      expect(t.stderr).toContain(`--threads needs a whole number of at least 1, not '${bad}'`);
    }
  });

  it('with --threads says how the groups were fitted (from sources: in this thread)', async () => {
    const r = await cli(rig(), 'fit', 'rig.lsq', '--threads', '1');
    expect(r.code).toBe(EXIT.ok);
    expect(r.stderr).toContain('fit stiffness: groups fitted in this thread (one thread asked for)');
  });

  it('puts the group table and summary in the report, with charts only for the groups shown in full', async () => {
    const dir = rig(PAIR);
    const r = await cli(dir, 'fit', 'rig.lsq', '--quiet', '--report', 'report.md');
    expect(r.code).toBe(EXIT.ok);
    const md = readFileSync(join(dir, 'report.md'), 'utf8');
    expect(md).toContain('## Fit stiffness per group: force_N against extension_mm, 13 groups');
    expect(md).toMatch(/^\| group \| n \| k \| se\(k\) \| preload \| se\(preload\) \| R² \| flags \|$/m);
    expect(md).toMatch(/^\| S07 \| 10 \| /m);
    expect(md).toContain('### Across converged groups');
    expect(md).toContain('| stiffness (13 groups) | yes | 122 | per group |');
    expect(md.match(/^## Fit stiffness \[[^\]]+\]/gm)).toEqual(['## Fit stiffness [S50]']);
    const charts = readdirSync(join(dir, 'report-charts'));
    const perFit = charts.filter((f) => !f.includes('~groups-'));
    expect(perFit).toHaveLength(5);
    expect(perFit.filter((f) => f.startsWith('stiffness-S50-'))).toEqual(perFit);
    // the charts across groups: overlay, residuals by group, each parameter; no plate map (S07… are not well names: row S is beyond P)
    expect(charts.filter((f) => f.includes('~groups-')).sort()).toEqual(['stiffness~groups-group-k.svg', 'stiffness~groups-group-preload.svg', 'stiffness~groups-overlay.svg', 'stiffness~groups-residuals-by-group.svg']);
    expect(md).toContain('### Charts across groups');
    expect(md).toContain('![stiffness: every group\'s curve](report-charts/stiffness~groups-overlay.svg)');
    expect(md).not.toContain('plate map');
  });
});

describe('cli/fit per-group fits, built bundle', () => {
  let dist: string;

  beforeAll(async () => {
    // a private build of the CLI and the engine worker side by side (as in dist/), so concurrent rebuilds of dist/ do not matter
    dist = dirname(await privateCliBuild());
  }, 120_000);

  const run = (cwd: string, ...args: string[]) => spawnSync(process.execPath, [join(dist, 'cli.js'), ...args], { cwd, encoding: 'utf8', maxBuffer: 1 << 28 });

  it('fits the groups on worker threads found beside the bundle, with the same JSON as in one thread', () => {
    const dir = rig([...LONELY, ...PAIR]);
    const workers = run(dir, 'fit', 'rig.lsq', '--json', 'par.json', '--threads', '2');
    const single = run(dir, 'fit', 'rig.lsq', '--json', 'seq.json', '--threads', '1');
    expect(workers.status).toBe(EXIT.notConverged);
    expect(single.status).toBe(EXIT.notConverged);
    expect(workers.stderr).toContain('fit stiffness: groups fitted on 1 worker thread and this thread');
    expect(single.stderr).toContain('fit stiffness: groups fitted in this thread (one thread asked for)');
    const timeless = (file: string) => {
      const r = JSON.parse(readFileSync(join(dir, file), 'utf8')) as RunResult;
      return { ...r, provenance: { ...r.provenance, startedAt: '' }, fits: r.fits.map((f) => ({ ...f, elapsedMs: 0 })) };
    };
    expect(timeless('par.json')).toEqual(timeless('seq.json'));
    expect(workers.stdout).toBe(single.stdout);
  });
});
