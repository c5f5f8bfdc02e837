/**
 * (14-17) Side by side with what an analyst would otherwise run: a short
 * general-purpose script (python3 with numpy and scipy, reading the CSV with
 * pandas when installed, else numpy's C reader; test/bench/reference/
 * script_fit.py) against our CLI on the same generated CSV files, as whole
 * processes, in alternating rounds (ours, script, script, ours, ...), wall
 * time; ratio = ours / script per round (median and spread).
 *
 *  14  4-parameter logistic, 1e6 points, from CSV (our summary printed)
 *  15  cubic polynomial, 1e6 points, from CSV
 *  16  the 4PL with `--json`: time against the summary run, peak memory
 *      against the script's; plus a 1e7-row line with summary and `--json`
 *  17  10,000 per-well 4PL fits (12 doses each): given starts and automatic
 *      starts against the script's loop over groups (fits per second, CPU)
 *
 * Peak memory and CPU time come from each process's own accounting at exit
 * (getrusage: Node via reference/rusage-preload.cjs, the script itself), the
 * same figures on both sides. Without python3/numpy/scipy the comparisons
 * print "skipped (python3/numpy/scipy not found)" and only our side is timed.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, rmSync, statSync, writeFileSync, createWriteStream } from 'node:fs';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { statsOf, type Stats } from '../harness';
import { gaussian, rng } from '../../fixtures/random';
import { groupedLogisticCsv, logistic4, LOGISTIC_MODEL } from '../data';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

/** The repository: the first folder up from the bundle (dist/bench.js) that holds the reference script, else the working directory. */
function repoRoot(): string {
  for (let dir = __dirname; ; dir = path.dirname(dir)) {
    if (existsSync(path.join(dir, 'test', 'bench', 'reference', 'script_fit.py'))) return dir;
    if (path.dirname(dir) === dir) return process.cwd();
  }
}
export const ROOT = repoRoot();
/** Our CLI bundle: beside this bundle when copied with it (the bench test runs a private copy), else dist/cli.js. */
export const CLI = existsSync(path.join(__dirname, 'cli.js')) ? path.join(__dirname, 'cli.js') : path.join(ROOT, 'dist', 'cli.js');
const SCRIPT = path.join(ROOT, 'test', 'bench', 'reference', 'script_fit.py');
export const PRELOAD = path.join(ROOT, 'test', 'bench', 'reference', 'rusage-preload.cjs');

export interface ProcessRun {
  wallMs: number;
  cpuS: number;
  maxRssMb: number;
  status: number | null;
  stderr: string;
}

export interface ScriptVersions {
  python: string;
  numpy: string;
  scipy: string;
  pandas: string | null;
}

/** Versions of the reference stack, or null when python3, numpy or scipy is missing. */
export function scriptVersions(): ScriptVersions | null {
  const r = spawnSync('python3', [SCRIPT, '--versions'], { encoding: 'utf8' });
  if (r.status !== 0) return null;
  try {
    return JSON.parse(r.stdout) as ScriptVersions;
  } catch {
    return null;
  }
}

/** Runs one command as a whole process; its stdout is discarded (counted as written), wall time measured here, CPU and peak memory from the process's own accounting. */
export function runProcess(cmd: string, args: string[], tmp: string): ProcessRun {
  const usage = path.join(tmp, `rusage-${process.pid}.json`);
  rmSync(usage, { force: true });
  const t0 = performance.now();
  const r = spawnSync(cmd, args, { env: { ...process.env, LEASTWISE_BENCH_RUSAGE: usage }, stdio: ['ignore', 'ignore', 'pipe'], encoding: 'utf8', maxBuffer: 1 << 26 });
  const wallMs = performance.now() - t0;
  let cpuS = NaN;
  let maxRssMb = NaN;
  if (existsSync(usage)) {
    const u = JSON.parse(readFileSync(usage, 'utf8')) as { maxRssKb: number; userS: number; sysS: number };
    cpuS = u.userS + u.sysS;
    maxRssMb = u.maxRssKb / 1024;
  }
  return { wallMs, cpuS, maxRssMb, status: r.status, stderr: (r.stderr ?? '').slice(-2000) };
}

/** Our CLI as a user runs it (`node dist/cli.js ARGS`), with the accounting preload. */
export function ours(args: string[], tmp: string): ProcessRun {
  return runProcess(process.execPath, ['--require', PRELOAD, CLI, ...args], tmp);
}

export function script(args: string[], tmp: string): ProcessRun {
  return runProcess('python3', [SCRIPT, ...args], tmp);
}

export interface PairedRuns {
  ours: ProcessRun[];
  other: ProcessRun[];
  ratio: Stats;
}

/** A then B, B then A, ... after one warm-up pair; ratio per round. */
export function paired(a: () => ProcessRun, b: () => ProcessRun, rounds: number): PairedRuns {
  a();
  b();
  const ra: ProcessRun[] = [];
  const rb: ProcessRun[] = [];
  for (let i = 0; i < rounds; i++) {
    if (i % 2 === 0) {
      ra.push(a());
      rb.push(b());
    } else {
      rb.push(b());
      ra.push(a());
    }
  }
  return { ours: ra, other: rb, ratio: statsOf(ra.map((r, i) => r.wallMs / rb[i].wallMs)) };
}

const wall = (runs: readonly ProcessRun[]): Stats => statsOf(runs.map((r) => r.wallMs));
const cpu = (runs: readonly ProcessRun[]): Stats => statsOf(runs.map((r) => r.cpuS));
const rss = (runs: readonly ProcessRun[]): Stats => statsOf(runs.map((r) => r.maxRssMb));
const failedRuns = (runs: readonly ProcessRun[]): ProcessRun | undefined => runs.find((r) => r.status !== 0);

/** Writes a CSV of n rows (`x,y`) in streaming fashion; y = f(x) + N(0, noise). */
async function writeXY(file: string, n: number, x: (i: number) => number, f: (x: number) => number, noise: number, seed: number): Promise<void> {
  if (existsSync(file)) return;
  const g = gaussian(rng(seed));
  const out = createWriteStream(file);
  out.write('x,y\n');
  let chunk = '';
  for (let i = 0; i < n; i++) {
    const xi = x(i);
    chunk += `${xi.toPrecision(8)},${(f(xi) + noise * g()).toPrecision(8)}\n`;
    if (chunk.length > 1 << 20) {
      if (!out.write(chunk)) await new Promise<void>((r) => out.once('drain', () => r()));
      chunk = '';
    }
  }
  out.write(chunk);
  await new Promise<void>((resolve, reject) => out.end((e?: Error | null) => (e ? reject(e) : resolve())));
}

function writeSpec(file: string, data: string, model: string, params: string[], extra: string[] = []): void {
  writeFileSync(file, [`data d = "${data}"`, 'fit f on d {', `  model y = ${model}`, ...params.map((p) => `  param ${p}`), ...extra.map((e) => `  ${e}`), '}', ''].join('\n'));
}

const logDose = (n: number) => (i: number) => 0.001 * 10 ** ((5 * i) / (n - 1));

/** The 4PL data of cases 11 and 13 (written once per run): 4PL(2, 98, 0.7, 1.3) + N(0, 1), doses log-spaced 1e-3…1e2; the spec gives ordinary starts. */
async function logisticFiles(dir: string, n: number): Promise<{ csv: string; spec: string }> {
  const csv = path.join(dir, `logistic-${n}.csv`);
  await writeXY(csv, n, logDose(n), (x) => logistic4(x, 2, 98, 0.7, 1.3), 1, 5);
  const spec = path.join(dir, `logistic-${n}.lsq`);
  writeSpec(spec, path.basename(csv), LOGISTIC_MODEL, ['bottom = 0', 'top = 100', 'ec50 = 1 in [0, inf]', 'hill = 1']);
  return { csv, spec };
}

interface Prepared {
  dir: string;
  versions: ScriptVersions | null;
}

function skippedText(what: string): string {
  return `${what}; script side skipped (python3/numpy/scipy not found)`;
}

function versionsText(v: ScriptVersions): string {
  return `python ${v.python}, numpy ${v.numpy}, scipy ${v.scipy}, CSV by ${v.pandas ? `pandas ${v.pandas}` : "numpy's C reader"}`;
}

function assertOk(runs: readonly ProcessRun[], who: string): void {
  const bad = failedRuns(runs);
  if (bad) throw new Error(`${who} exited ${bad.status}: ${bad.stderr.trim().split('\n').slice(-3).join(' | ')}`);
}

async function comparisonRow(ctx: BenchContext, prep: Prepared, id: number, name: string, oursArgs: string[], scriptArgs: string[], rounds: number): Promise<BenchRow> {
  if (!prep.versions) {
    const runs = [ours(oursArgs, prep.dir)];
    assertOk(runs, 'leastwise');
    return { id, name, value: null, unit: '', spread: null, text: skippedText(`ours ${fmt(wall(runs).median / 1000)} s`), goal: '≤ 1.0 (aim ≤ 0.5)', met: null, details: { ours: runs } };
  }
  const p = paired(() => ours(oursArgs, prep.dir), () => script(scriptArgs, prep.dir), rounds);
  assertOk(p.ours, 'leastwise');
  assertOk(p.other, 'reference script');
  const o = wall(p.ours);
  const s = wall(p.other);
  return {
    id,
    name,
    value: p.ratio.median,
    unit: '×',
    spread: [p.ratio.min, p.ratio.max],
    text: `ratio ${fmt(p.ratio.median)} (${fmt(p.ratio.min)}–${fmt(p.ratio.max)}): ours ${fmt(o.median / 1000)} s, script ${fmt(s.median / 1000)} s; peak ${fmt(rss(p.ours).median)} vs ${fmt(rss(p.other).median)} MB`,
    goal: '≤ 1.0 (aim ≤ 0.5)',
    met: p.ratio.median <= 1.0,
    details: { rounds, oursMs: o, scriptMs: s, ratio: p.ratio, oursPeakMb: rss(p.ours), scriptPeakMb: rss(p.other), oursCpuS: cpu(p.ours), scriptCpuS: cpu(p.other), stack: versionsText(prep.versions) },
    note: versionsText(prep.versions),
  };
}

async function prepare(ctx: BenchContext): Promise<Prepared> {
  const versions = scriptVersions();
  if (!versions) ctx.log('  python3/numpy/scipy not found: the script side is skipped');
  return { dir: ctx.tmp, versions };
}

export async function benchVersusLogistic(ctx: BenchContext): Promise<BenchRow> {
  const prep = await prepare(ctx);
  const n = ctx.quick ? 20_000 : 1_000_000;
  const { csv, spec } = await logisticFiles(prep.dir, n);
  return comparisonRow(ctx, prep, 14, `4-parameter logistic, ${fmt(n, 1)} points from CSV, ours / script`, ['fit', spec], ['--csv', csv, '--model', 'logistic4'], ctx.quick ? 1 : 5);
}

export async function benchVersusCubic(ctx: BenchContext): Promise<BenchRow> {
  const prep = await prepare(ctx);
  const n = ctx.quick ? 20_000 : 1_000_000;
  const csv = path.join(prep.dir, `cubic-${n}.csv`);
  await writeXY(csv, n, (i) => -2 + (4 * i) / (n - 1), (x) => 1.5 - 0.8 * x + 0.3 * x * x + 0.05 * x * x * x, 0.2, 7);
  const spec = path.join(prep.dir, `cubic-${n}.lsq`);
  writeSpec(spec, path.basename(csv), 'a + b*x + c*x^2 + d*x^3', ['a', 'b', 'c', 'd']);
  return comparisonRow(ctx, prep, 15, `cubic polynomial, ${fmt(n, 1)} points from CSV, ours / script`, ['fit', spec], ['--csv', csv, '--model', 'cubic'], ctx.quick ? 1 : 5);
}

/** (13) `--json` of the 1e6-point 4PL against its summary run and the script's peak memory; a 1e7-row line, summary and JSON. */
export async function benchJsonOutput(ctx: BenchContext): Promise<BenchRow> {
  const prep = await prepare(ctx);
  const n = ctx.quick ? 20_000 : 1_000_000;
  const { csv, spec } = await logisticFiles(prep.dir, n);
  const json = path.join(prep.dir, 'out.json');
  const rounds = ctx.quick ? 1 : 3;
  const p = paired(() => ours(['fit', spec, '--json', json], prep.dir), () => ours(['fit', spec], prep.dir), rounds);
  assertOk(p.ours, 'leastwise --json');
  assertOk(p.other, 'leastwise');
  const jsonBytes = existsSync(json) ? statSync(json).size : 0;
  let scriptPeak: Stats | null = null;
  if (prep.versions) {
    const s = [script(['--csv', csv, '--model', 'logistic4'], prep.dir)];
    assertOk(s, 'reference script');
    scriptPeak = rss(s);
  }
  // 1e7 rows: does it work at all (summary and JSON), and how long it takes
  const big: Record<string, unknown> = {};
  if (!ctx.quick) {
    const nBig = 10_000_000;
    const bigCsv = path.join(prep.dir, 'line-1e7.csv');
    await writeXY(bigCsv, nBig, (i) => i / nBig, (x) => 3 + 2 * x, 0.1, 11);
    const bigSpec = path.join(prep.dir, 'line-1e7.lsq');
    writeSpec(bigSpec, path.basename(bigCsv), 'a + b*x', ['a', 'b']);
    const sum = ours(['fit', bigSpec], prep.dir);
    const js = ours(['fit', bigSpec, '--json', path.join(prep.dir, 'big.json')], prep.dir);
    big.summary = { ok: sum.status === 0, s: sum.wallMs / 1000, peakMb: sum.maxRssMb, error: sum.status === 0 ? undefined : sum.stderr.trim().split('\n').pop() };
    big.json = { ok: js.status === 0, s: js.wallMs / 1000, peakMb: js.maxRssMb, error: js.status === 0 ? undefined : js.stderr.trim().split('\n').pop() };
    rmSync(path.join(prep.dir, 'big.json'), { force: true });
  }
  const oursPeak = rss(p.ours);
  const bigText = ctx.quick ? '' : `; 1e7 rows: summary ${(big.summary as { ok: boolean }).ok ? 'ok' : 'FAILED'}, JSON ${(big.json as { ok: boolean }).ok ? 'ok' : 'FAILED'}`;
  const memMet = scriptPeak === null ? null : oursPeak.median <= scriptPeak.median;
  return {
    id: 16,
    name: `--json of the ${fmt(n, 1)}-point 4PL fit: time vs summary run; peak memory vs the script`,
    value: p.ratio.median,
    unit: '×',
    spread: [p.ratio.min, p.ratio.max],
    text: `${fmt(p.ratio.median)}× the summary run (${fmt(wall(p.ours).median / 1000)} s vs ${fmt(wall(p.other).median / 1000)} s, ${fmt(jsonBytes / 2 ** 20)} MiB JSON); peak ${fmt(oursPeak.median)} MB vs script ${scriptPeak ? fmt(scriptPeak.median) + ' MB' : 'skipped'}${bigText}`,
    goal: '≤ 1.3×; peak ≤ script; 1e7 rows work',
    met: p.ratio.median <= 1.3 && memMet !== false && (ctx.quick || ((big.summary as { ok: boolean }).ok && (big.json as { ok: boolean }).ok)),
    details: { rounds, jsonMs: wall(p.ours), summaryMs: wall(p.other), ratio: p.ratio, oursPeakMb: oursPeak, scriptPeakMb: scriptPeak, jsonBytes, rows1e7: big, stack: prep.versions ? versionsText(prep.versions) : null },
  };
}

const WELL_DOSES = [0.003, 0.01, 0.03, 0.1, 0.3, 1, 3, 10, 30, 100, 300, 1000];

/** Invented screening plates: one 4PL per well (12 doses), per-well constants, N(0, 1.5) noise. */
function writeWells(file: string, wells: number): void {
  if (!existsSync(file)) writeFileSync(file, groupedLogisticCsv(wells, { header: 'well,x,y', prefix: 'W', doses: WELL_DOSES, ec50Low: 0.05, ec50Decades: 2.5, seeds: [23, 29] }));
}

/** (14) Per-group fits from the CLI (all cores) against the script's loop over groups. */
export async function benchVersusGroups(ctx: BenchContext): Promise<BenchRow> {
  const prep = await prepare(ctx);
  const wells = ctx.quick ? 200 : 10_000;
  const csv = path.join(prep.dir, `wells-${wells}.csv`);
  writeWells(csv, wells);
  const given = path.join(prep.dir, 'wells-given.lsq');
  writeSpec(given, path.basename(csv), LOGISTIC_MODEL, ['bottom = 0', 'top = 100', 'ec50 = 1 in [0, inf]', 'hill = 1'], ['per well']);
  const auto = path.join(prep.dir, 'wells-auto.lsq');
  writeSpec(auto, path.basename(csv), LOGISTIC_MODEL, ['bottom', 'top', 'ec50 in [0, inf]', 'hill in [0.1, 10]'], ['per well']);
  const rounds = ctx.quick ? 1 : 3;
  const scriptArgs = ['--csv', csv, '--model', 'logistic4', '--group', 'well'];
  // exit 3 (some wells not converged) is a finished run here; only 2 is a failure
  const okOurs = (runs: readonly ProcessRun[], who: string) => {
    const bad = runs.find((r) => r.status !== 0 && r.status !== 3);
    if (bad) throw new Error(`${who} exited ${bad.status}: ${bad.stderr.trim().split('\n').slice(-3).join(' | ')}`);
  };
  let p: PairedRuns;
  let autoRuns: ProcessRun[];
  if (prep.versions) {
    p = paired(() => ours(['fit', given, '--quiet'], prep.dir), () => script(scriptArgs, prep.dir), rounds);
    assertOk(p.other, 'reference script');
  } else {
    const r = [ours(['fit', given, '--quiet'], prep.dir)];
    p = { ours: r, other: [], ratio: statsOf([]) };
  }
  okOurs(p.ours, 'leastwise (given starts)');
  autoRuns = Array.from({ length: rounds }, () => ours(['fit', auto, '--quiet'], prep.dir));
  okOurs(autoRuns, 'leastwise (automatic starts)');
  const g = wall(p.ours);
  const a = wall(autoRuns);
  const fitsPerS = wells / (g.median / 1000);
  const autoPerS = wells / (a.median / 1000);
  const speedup = prep.versions ? statsOf(p.ratio.runs ? p.ours.map((r, i) => p.other[i].wallMs / r.wallMs) : []) : null;
  const autoSpeedup = prep.versions ? wall(p.other).median / a.median : null;
  // CPU time (all threads) is the steadier figure on a shared machine: the script's CPU over ours, per side's median
  const cpuSpeedup = prep.versions ? cpu(p.other).median / cpu(p.ours).median : null;
  const autoCpuSpeedup = prep.versions ? cpu(p.other).median / cpu(autoRuns).median : null;
  const text = prep.versions
    ? `given starts ${fmt(speedup!.median)}× faster than the script by wall time (${fmt(fitsPerS)} fits/s, CPU ${fmt(cpu(p.ours).median)} s vs ${fmt(cpu(p.other).median)} s: ×${fmt(cpuSpeedup!)}); automatic starts ${fmt(autoSpeedup)}× by wall (${fmt(autoPerS)} fits/s, CPU ${fmt(cpu(autoRuns).median)} s: ×${fmt(autoCpuSpeedup!)}, ${fmt(cpu(autoRuns).median / cpu(p.ours).median)}× given)`
    : skippedText(`given ${fmt(fitsPerS)} fits/s, automatic ${fmt(autoPerS)} fits/s`);
  return {
    id: 17,
    name: `${fmt(wells, 2)} per-well 4PL fits (12 doses), CLI on all cores vs the script's loop`,
    value: speedup ? Math.min(speedup.median, autoSpeedup!) : null,
    unit: '× faster',
    spread: speedup ? [speedup.min, speedup.max] : null,
    text,
    goal: '≥ 10× (≥ 5,000 fits/s), automatic starts included',
    met: speedup ? Math.min(speedup.median, autoSpeedup!) >= 10 && Math.min(fitsPerS, autoPerS) >= 5000 : null,
    details: { wells, rounds, givenMs: g, autoMs: a, scriptMs: prep.versions ? wall(p.other) : null, cpuSpeedup, autoCpuSpeedup, givenCpuS: cpu(p.ours), autoCpuS: cpu(autoRuns), scriptCpuS: prep.versions ? cpu(p.other) : null, fitsPerS, autoPerS, stack: prep.versions ? versionsText(prep.versions) : null },
    note: prep.versions ? versionsText(prep.versions) : undefined,
  };
}
