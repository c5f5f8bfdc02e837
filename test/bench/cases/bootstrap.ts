/**
 * (21) Bootstrap cost: `runPlan` of an invented 100-point exponential decay
 * with `bootstrap 2000` (residual resampling; plus 100 leave-one-out refits
 * for BCa), in this thread (`threads: 1`) and on two worker threads
 * (dist/worker.js, engine/groups/bootstrap-threads.ts). The figure is the
 * one-thread time; the run also checks that both give bit-identical intervals
 * (each refit depends only on its index). Goal: 2000 refits within 3 s, about
 * 1.5 ms per refit of 100 rows. Measured 2026-12-03 on this 2-core machine
 * under a load average of 19: 1210 ms in one thread, 4050 ms on two workers
 * (the workers lose under such load; AUTO_MIN_REFIT_ROWS keeps jobs of this
 * size in one thread).
 */
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { runPlan } from '../../../engine/runner';
import { defaultWorkerFile } from '../../../engine/groups/fit-groups';
import { analyze } from '../../../parser/index';
import { measure } from '../harness';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

export async function benchBootstrap(ctx: BenchContext): Promise<BenchRow> {
  const n = 100;
  const replicates = ctx.quick ? 200 : 2000;
  const csv = ['t,y', ...Array.from({ length: n }, (_, i) => {
    const t = i * 0.1;
    return `${t.toFixed(2)},${(4 * Math.exp(-0.35 * t) + 0.3 + 0.02 * Math.sin(13 * i)).toFixed(5)}`;
  })].join('\n') + '\n';
  writeFileSync(path.join(ctx.tmp, 'decay.csv'), csv);
  const spec = `data decay = "decay.csv"
fit d on decay {
  model y = a * exp(-k * t) + c
  param a = 4
  param k = 0.3
  param c = 0
  bootstrap ${replicates}
}
`;
  const plan = analyze(spec).plan;
  const workerFile = defaultWorkerFile();
  const once = async (threads: number | undefined) => {
    const r = await runPlan(plan, { baseDir: ctx.tmp, specText: spec, ...(threads !== undefined ? { threads } : {}), workerFile: threads === 1 ? null : workerFile });
    const f = r.fits[0];
    if (f.bootstrap?.status !== 'computed') throw new Error(`bootstrap not computed: ${f.bootstrap?.note ?? f.stop.message}`);
    return f.parameters.map((p) => p.bootstrap);
  };
  const runs = ctx.quick ? 1 : 3;
  let one: unknown;
  let all: unknown;
  const single = await measure(async () => { one = await once(1); }, runs, 0);
  const cores = await measure(async () => { all = await once(2); }, runs, 0);
  const identical = JSON.stringify(one) === JSON.stringify(all);
  if (!identical) throw new Error('bootstrap intervals differ between one thread and all cores');
  return {
    id: 21,
    name: `Bootstrap: ${replicates} refits of a ${n}-point exponential (+${n} leave-one-out)`,
    value: single.median,
    unit: 'ms',
    spread: [single.min, single.max],
    text: `${fmt(single.median)} ms in one thread (${fmt(single.median / replicates)} ms per refit); ${fmt(cores.median)} ms on 2 worker threads; identical: ${identical}`,
    goal: `≤ 3000 ms for 2000 refits`,
    met: single.median <= 3000,
    details: { n, replicates, workerFile, oneThreadMs: single, twoWorkersMs: cores, identical },
  };
}
