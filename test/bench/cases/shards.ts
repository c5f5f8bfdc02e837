/**
 * (20) Shards side by side on this machine: the screen of the cluster example
 * (samples/cluster/make-screen.mjs, 2,400 compounds × 8 doses, a
 * four-parameter logistic per compound) fitted by `leastwise fit --threads 1`
 * as one process, then as N shards (`--shard k/N --threads 1`) started at
 * once, as the tasks of a Slurm array on one node would run, plus the
 * `gather` that joins them. The figure is the speed-up of the shards' wall
 * time over the single process, for N = the core count; the goal is near the
 * core count (at least 0.75 per core: each shard also reads the whole CSV and
 * computes the shared start). Also reported: CPU per shard (which should
 * fall as 1/N for the fitting), the gathering's time, and the throughput per
 * node (compounds per second on all cores).
 */
import { spawn } from 'node:child_process';
import { copyFileSync, existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { execFileSync } from 'node:child_process';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';
import { CLI, ours, PRELOAD, ROOT as REPO_ROOT, type ProcessRun } from './versus-script';

/** Start `node cli.js args` for every args list at once; resolves with each process's run when all have ended. */
function concurrently(argsList: string[][], tmp: string): Promise<{ wallMs: number; runs: ProcessRun[] }> {
  const t0 = performance.now();
  return Promise.all(
    argsList.map(
      (args, k) =>
        new Promise<ProcessRun>((resolve) => {
          const usage = path.join(tmp, `rusage-shard-${k}.json`);
          rmSync(usage, { force: true });
          const started = performance.now();
          const child = spawn(process.execPath, ['--require', PRELOAD, CLI, ...args], { env: { ...process.env, LEASTWISE_BENCH_RUSAGE: usage }, stdio: ['ignore', 'ignore', 'pipe'] });
          let stderr = '';
          child.stderr.on('data', (d) => (stderr += String(d)));
          child.on('close', (status) => {
            const u = existsSync(usage) ? (JSON.parse(readFileSync(usage, 'utf8')) as { maxRssKb: number; userS: number; sysS: number }) : null;
            resolve({ wallMs: performance.now() - started, cpuS: u ? u.userS + u.sysS : NaN, maxRssMb: u ? u.maxRssKb / 1024 : NaN, status, stderr: stderr.slice(-2000) });
          });
        }),
    ),
  ).then((runs) => ({ wallMs: performance.now() - t0, runs }));
}

export async function benchShards(ctx: BenchContext): Promise<BenchRow> {
  const compounds = ctx.quick ? 200 : 2400;
  const cores = os.availableParallelism();
  const n = Math.max(2, cores);
  const spec = path.join(ctx.tmp, 'screen.lsq');
  copyFileSync(path.join(REPO_ROOT, 'samples', 'cluster', 'screen.lsq'), spec);
  writeFileSync(path.join(ctx.tmp, 'screen.csv'), execFileSync(process.execPath, [path.join(REPO_ROOT, 'samples', 'cluster', 'make-screen.mjs'), String(compounds)], { maxBuffer: 1 << 28 }));
  const rounds = ctx.quick ? 1 : 3;
  const single: number[] = [];
  const sharded: number[] = [];
  const shardCpu: number[] = [];
  const gatherMs: number[] = [];
  let singleCpu = NaN;
  for (let r = 0; r < rounds; r++) {
    ctx.log(`shards: round ${r + 1} of ${rounds}`);
    const one = ours(['fit', spec, '--threads', '1', '--quiet', '--json', path.join(ctx.tmp, 'whole.json')], ctx.tmp);
    if (one.status !== 0 && one.status !== 3) throw new Error(`unsharded fit failed: ${one.stderr}`);
    single.push(one.wallMs);
    singleCpu = one.cpuS;
    const files = Array.from({ length: n }, (_, k) => path.join(ctx.tmp, `shard-${k + 1}.json`));
    const run = await concurrently(files.map((f, k) => ['fit', spec, '--shard', `${k + 1}/${n}`, '--threads', '1', '--quiet', '--json', f]), ctx.tmp);
    const bad = run.runs.find((x) => x.status !== 0 && x.status !== 3);
    if (bad) throw new Error(`a shard failed: ${bad.stderr}`);
    sharded.push(run.wallMs);
    shardCpu.push(...run.runs.map((x) => x.cpuS));
    const g = ours(['gather', spec, ...files, '--quiet', '--json', path.join(ctx.tmp, 'gathered.json')], ctx.tmp);
    if (g.status !== 0 && g.status !== 3) throw new Error(`gather failed: ${g.stderr}`);
    gatherMs.push(g.wallMs);
  }
  const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
  const speedups = single.map((s, i) => s / sharded[i]);
  const speedup = median(speedups);
  const perNode = compounds / (median(sharded) / 1000);
  return {
    id: 20,
    name: 'Shards side by side',
    value: speedup,
    unit: '×',
    spread: rounds > 1 ? [Math.min(...speedups), Math.max(...speedups)] : null,
    text: `${n} shards ${fmt(speedup)}× faster than one process (${fmt(median(sharded) / 1000)} s vs ${fmt(median(single) / 1000)} s for ${compounds} compounds); CPU per shard ${fmt(median(shardCpu))} s vs ${fmt(singleCpu)} s; gather ${fmt(median(gatherMs) / 1000)} s; ${fmt(perNode)} compounds/s on ${n} cores`,
    goal: `≥ ${fmt(0.75 * n)}× (0.75 per core)`,
    met: speedup >= 0.75 * n,
    details: { compounds, shards: n, singleMs: single, shardedMs: sharded, shardCpuS: shardCpu, singleCpuS: singleCpu, gatherMs, compoundsPerSecondPerNode: perNode },
  };
}
