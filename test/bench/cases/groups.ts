/**
 * (7) Per-group four-parameter logistic fits on a generated 10,000-group
 * file with `fitGroupsParallel` on all available cores (worker threads
 * running dist/worker.js), against the same call on one thread, side by
 * side. Timings include reading and splitting the CSV.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import { analyze } from '../../../parser/index';
import { defaultWorkerFile, fitGroupsParallel } from '../../../engine/parallel/fit-groups';
import { buildGroupTable } from '../../../engine/group/table';
import { compare, gaussian, rng } from '../harness';
import { logistic4, LOGISTIC_MODEL } from '../data';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

const DOSES = [0.01, 0.03, 0.1, 0.3, 1, 3, 10, 30, 100];

/** Invented assay plates: per-plate 4PL constants, N(0, 1.5) noise. */
export function writePlates(dir: string, plates: number): void {
  const g = gaussian(rng(17));
  const u = rng(19);
  const lines = ['plate,dose,signal'];
  for (let p = 0; p < plates; p++) {
    const label = `P${String(p).padStart(5, '0')}`;
    const bottom = 2 + 4 * u();
    const top = 90 + 15 * u();
    const ec50 = 0.2 * 10 ** (1.5 * u());
    const hill = 0.7 + 1.2 * u();
    for (const d of DOSES) lines.push(`${label},${d},${(logistic4(d, bottom, top, ec50, hill) + 1.5 * g()).toFixed(3)}`);
  }
  writeFileSync(`${dir}/plates.csv`, lines.join('\n') + '\n');
  writeFileSync(
    `${dir}/plates.lsq`,
    ['data plates = "plates.csv"', 'fit hill on plates {', `  model signal = ${LOGISTIC_MODEL.replace(/\bx\b/g, 'dose')}`, '  param bottom = 0', '  param top = 100', '  param ec50 = 1 in [0, inf]', '  param hill = 1', '  per plate', '}', ''].join('\n'),
  );
}

export async function benchGroups(ctx: BenchContext): Promise<BenchRow> {
  const plates = ctx.quick ? 200 : 10_000;
  writePlates(ctx.tmp, plates);
  const spec = readFileSync(`${ctx.tmp}/plates.lsq`, 'utf8');
  const a = analyze(spec);
  if (a.diagnostics.some((d) => d.severity === 'error')) throw new Error('plate spec does not check');
  const threads = os.availableParallelism();
  const workers = defaultWorkerFile();
  let last: Awaited<ReturnType<typeof fitGroupsParallel>> = [];
  const runs = ctx.quick ? 1 : 3;
  const cmp = await compare(
    async () => {
      last = await fitGroupsParallel(a.plan, 'hill', { baseDir: ctx.tmp, threads });
    },
    () => fitGroupsParallel(a.plan, 'hill', { baseDir: ctx.tmp, threads: 1, workerFile: null }),
    runs,
    0,
  );
  const table = buildGroupTable(last);
  const rate = plates / (cmp.ours.median / 1000);
  return {
    id: 7,
    name: `Per-group 4PL fits, ${fmt(plates, 2)} groups, ${threads} threads`,
    value: rate,
    unit: 'fits/s',
    spread: [plates / (cmp.ours.max / 1000), plates / (cmp.ours.min / 1000)],
    text: `${fmt(rate)} fits/s (${fmt(cmp.ours.median / 1000)} s; one thread ${fmt(plates / (cmp.other.median / 1000))} fits/s, speed-up ${fmt(1 / cmp.ratio.median)}×; ${table.summary.converged}/${plates} converged)`,
    goal: '≥ 1,000 fits/s',
    met: rate >= 1000,
    details: { plates, threads, workerFile: workers, parallelMs: cmp.ours, oneThreadMs: cmp.other, speedup: 1 / cmp.ratio.median, summary: table.summary },
    ...(workers === null ? { note: 'no dist/worker.js beside the script: groups were fitted in process' } : {}),
  };
}
